import { useParams } from 'react-router-dom';
import { ButtonLink } from '@client/components/Button';
import { Page } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { mayInspectOn, parseId, roleOnSite, useMe, useMySites } from '@client/lib/session';
import { useSiteDashboard } from '../api/dashboard';
import { AdministratorPanels, CoordinatorPanels, OperatorPanels, SupervisorPanels } from '../components/RolePanels';

/** The current site's dashboard: one section for my role there, and one more if I am an administrator. */
export function DashboardPage() {
  const siteId = parseId(useParams().siteId);
  const me = useMe();
  const sites = useMySites();
  const site = sites.data?.find((s) => s.id === siteId);
  const role = me.data && site ? roleOnSite(me.data, site.id) : null;
  const canInspect = !!site && mayInspectOn(me.data, site.id);
  // What every panel shows, in one request; asked for only where my role there has a panel that needs it.
  const dashboard = useSiteDashboard(site && (role === 'supervisor' || role === 'coordinator' || canInspect) ? site.id : null);
  if (me.isPending || sites.isPending) return <Loading what="Loading the dashboard" />;
  if (sites.isError) return <LoadError error={sites.error} retry={() => sites.refetch()} />;
  if (!me.data || !site) return null; // the site scope above has already answered this case

  const panelSite = {
    siteId: site.id,
    timeZone: site.timezone,
    canInspect,
    dashboard: { data: dashboard.data, error: dashboard.error, retry: () => void dashboard.refetch() },
  };
  return (
    <Page
      title={site.name}
      intro="Your dashboard for this site."
      documentTitle={`Dashboard, ${site.name}`}
      actions={
        role === 'supervisor' ? (
          <ButtonLink to={`/sites/${site.id}/permits/new`} variant="primary">
            Ask for a permit
          </ButtonLink>
        ) : null
      }
    >
      {role === 'supervisor' ? <SupervisorPanels site={panelSite} /> : null}
      {role === 'coordinator' ? <CoordinatorPanels site={panelSite} /> : null}
      {role === 'operator' ? <OperatorPanels site={panelSite} /> : null}
      {me.data.isAdmin ? <AdministratorPanels siteCount={sites.data.length} /> : null}
      {!role && !me.data.isAdmin ? <p>You hold no role on this site. Ask an administrator to add you.</p> : null}
    </Page>
  );
}
