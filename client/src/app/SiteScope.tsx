import { useEffect } from 'react';
import { Link, Navigate, Outlet, useParams } from 'react-router-dom';
import { Page } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { parseId, rememberedSiteId, rememberSiteId, useMe, useMySites } from '@client/lib/session';

/** Pages under /sites/:siteId: only for that site's members (and administrators); remembers the choice. */
export function SiteScope() {
  const siteId = parseId(useParams().siteId);
  const me = useMe();
  const sites = useMySites();
  const site = sites.data?.find((s) => s.id === siteId);
  const userId = me.data?.id;

  useEffect(() => {
    if (userId !== undefined && site) rememberSiteId(userId, site.id);
  }, [userId, site]);

  if (sites.isPending) return <Loading what="Loading the site" />;
  if (sites.isError) return <LoadError error={sites.error} retry={() => sites.refetch()} />;
  if (!site) {
    return (
      <Page title="Not one of your sites">
        <p>
          This site does not exist, or you are not a member of it. <Link to="/">Go to your own site</Link>.
        </p>
      </Page>
    );
  }
  return <Outlet />;
}

/** "/" opens the dashboard of the site chosen last on this device, or the first site. */
export function HomeRedirect() {
  const me = useMe();
  const sites = useMySites();
  if (sites.isPending || !me.data) return <Loading what="Finding your site" />;
  if (sites.isError) return <LoadError error={sites.error} retry={() => sites.refetch()} />;
  const remembered = rememberedSiteId(me.data.id);
  const site = sites.data.find((s) => s.id === remembered) ?? sites.data[0];
  if (site) return <Navigate to={`/sites/${site.id}`} replace />;
  if (me.data.isAdmin) return <Navigate to="/admin/sites" replace />;
  return (
    <Page title={`Welcome, ${me.data.name}`}>
      <p>You are not on any site yet. An administrator adds you to a site and gives you a role there; then your dashboard appears here.</p>
    </Page>
  );
}
