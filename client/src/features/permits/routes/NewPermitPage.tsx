import { useParams, useSearchParams } from 'react-router-dom';
import { parseId } from '@client/lib/session';
import { Editor } from './PermitEditPage';

/**
 * Asking for a permit: the request and the placing of its loads on one page (the editor of a draft,
 * not yet saved). `?excavation=ID` names the excavation it was asked from (the map, the register).
 */
export function NewPermitPage() {
  const siteId = parseId(useParams().siteId) ?? 0;
  const excavationId = parseId(useSearchParams()[0].get('excavation') ?? undefined);
  return <Editor permit={null} siteId={siteId} excavationId={excavationId} key={`${siteId}-${excavationId ?? ''}`} />;
}
