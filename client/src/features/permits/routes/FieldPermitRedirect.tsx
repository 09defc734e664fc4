import { Navigate, useParams } from 'react-router-dom';

/**
 * The operator's link (e-mails, the printed QR code) until the phone view exists: it opens the
 * permit's own page. The phone feature replaces this route with its field view.
 */
export function FieldPermitRedirect() {
  return <Navigate to={`/permits/${useParams().permitId}`} replace />;
}
