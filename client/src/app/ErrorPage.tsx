import { isRouteErrorResponse, Link, useRouteError } from 'react-router-dom';
import { Page } from '@client/components/Page';

export function NotFound() {
  return (
    <Page title="Page not found">
      <p>There is no page at this address. It may have moved, or the link may be incomplete.</p>
      <p>
        <Link to="/">Go to your dashboard</Link>
      </p>
    </Page>
  );
}

/** Shown when a page fails while drawing. Nothing is lost on the server; reloading usually helps. */
export function ErrorPage() {
  const error = useRouteError();
  if (isRouteErrorResponse(error) && error.status === 404) return <NotFound />;
  if (import.meta.env.DEV) console.error(error);
  return (
    <div className="mx-auto max-w-prose px-4 py-12">
      <h1 className="text-3xl font-bold">This page stopped working</h1>
      <p className="mt-3">
        Something went wrong while showing it. What was saved before is safe. Reload the page, or go back to the start.
      </p>
      <p className="mt-3 flex flex-wrap gap-4">
        <a href={window.location.href}>Reload</a>
        <Link to="/">Go to your dashboard</Link>
      </p>
    </div>
  );
}
