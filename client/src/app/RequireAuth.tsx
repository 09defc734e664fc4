import { Navigate, Outlet, useLocation } from 'react-router-dom';
import { Page } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { useMe } from '@client/lib/session';

/** Lets signed-in people through; sends everyone else to the sign-in page, to come back afterwards. */
export function RequireAuth() {
  const me = useMe();
  const location = useLocation();
  if (me.isPending) return <Loading what="Checking your sign-in" />;
  if (me.isError) return <LoadError error={me.error} retry={() => me.refetch()} />;
  if (!me.data) {
    const here = location.pathname + location.search;
    const next = here === '/' ? '' : `?next=${encodeURIComponent(here)}`;
    return <Navigate to={`/sign-in${next}`} replace />;
  }
  return <Outlet />;
}

/** The administration pages. The server refuses the calls anyway; this keeps others from a dead end. */
export function RequireAdmin() {
  const me = useMe();
  if (!me.data?.isAdmin) {
    return (
      <Page title="For administrators only">
        <p>These pages are for Brink's administrators. Ask one if you need a change to people or sites.</p>
      </Page>
    );
  }
  return <Outlet />;
}
