import { Link } from 'react-router-dom';
import { roleLabels } from '@shared/schemas/common';
import type { DashboardAnswer, DashboardList } from '@shared/schemas/dashboard';
import { Panel } from '@client/components/Page';
import { Loading } from '@client/components/Status';
import { usePeopleCount } from '../api/dashboard';
import { ComingPanel, RoleSection } from './RoleSection';
import type { DashboardPart } from '@client/lib/dashboard';
import { useDashboardSlots } from '../slots';

/** The dashboard's one answer as the page has it: there, still coming, or failed. */
type DashboardState = DashboardPart<DashboardAnswer>;

interface SiteOfPanel {
  siteId: number;
  timeZone: string;
  canInspect: boolean;
  dashboard: DashboardState;
}

/** One part of the answer for its panel: an answer without that part (it should not happen) is an error, not a wait. */
function partOf<K extends keyof DashboardAnswer>(d: DashboardState, key: K): DashboardPart<NonNullable<DashboardAnswer[K]>> {
  const data = d.data?.[key];
  const missing = d.data && !data ? new Error('This panel was not in the dashboard’s answer. Reload the page.') : null;
  return { data: data as NonNullable<DashboardAnswer[K]> | undefined, error: d.error ?? missing, retry: d.retry };
}

/** The inspection panel from its feature, or the "not yet connected" panel when the app gave none. */
function InspectionsDue({ site, fallback }: { site: SiteOfPanel; fallback: string }) {
  const { inspectionsDue: Due } = useDashboardSlots();
  return Due ? (
    <Due siteId={site.siteId} timeZone={site.timeZone} canInspect={site.canInspect} states={partOf(site.dashboard, 'inspections')} />
  ) : (
    <ComingPanel title="Excavations due for inspection" lists={fallback} />
  );
}

/** A permit list from the permits feature, or the "not yet connected" panel when the app gave none. */
function Permits({ site, view, title, intro }: { site: SiteOfPanel; view: DashboardList; title: string; intro: string }) {
  const { permits: List } = useDashboardSlots();
  return List ? (
    <List siteId={site.siteId} view={view} intro={intro} timeZone={site.timeZone} list={partOf(site.dashboard, view)} />
  ) : (
    <ComingPanel title={title} lists={intro} />
  );
}

export function SupervisorPanels({ site }: { site: SiteOfPanel }) {
  return (
    <RoleSection title={roleLabels.supervisor} intro="Ask for permits, brief the operators, hand permits back.">
      <Permits
        site={site}
        view="mine"
        title="What needs you first"
        intro="Your requests returned for changes, your drafts, and your permits working today."
      />
      <Permits site={site} view="live" title="Live now" intro="Permits working on this site now." />
      <InspectionsDue site={site} fallback="Open excavations not yet inspected this shift." />
    </RoleSection>
  );
}

export function CoordinatorPanels({ site }: { site: SiteOfPanel }) {
  return (
    <RoleSection title={roleLabels.coordinator} intro="Review and decide permits, keep the excavation register, suspend work when needed.">
      <Permits site={site} view="review" title="Permits awaiting my review" intro="Requests sent to you for a decision, oldest first." />
      <Permits site={site} view="live" title="Live now" intro="Every live permit on this site." />
      <InspectionsDue site={site} fallback="Open excavations not yet inspected this shift." />
    </RoleSection>
  );
}

export function OperatorPanels({ site }: { site: SiteOfPanel }) {
  return (
    <RoleSection title={roleLabels.operator} intro="See the permits that name you and where loads may go.">
      <Panel title="My permits" level={3}>
        <p>
          The permits that name you, with their exclusion zones, where you stand against them, the briefing to confirm and a way to report a
          concern. Made for your phone, and it keeps working with poor signal.
        </p>
        <p>
          <Link to="/field">Open my permits</Link>
        </p>
      </Panel>
      {site.canInspect ? <InspectionsDue site={site} fallback="Open excavations not yet inspected this shift." /> : null}
    </RoleSection>
  );
}

export function AdministratorPanels({ siteCount }: { siteCount: number | undefined }) {
  const people = usePeopleCount(true);
  return (
    <RoleSection title="Administrator" intro="People, invitations and sites.">
      <Panel title="People" level={3}>
        {people.data ? (
          <p>
            {people.data.active} active {people.data.active === 1 ? 'person' : 'people'}
            {people.data.total > people.data.active ? `, ${people.data.total - people.data.active} deactivated` : ''}.
          </p>
        ) : people.isError ? (
          <p>The list of people could not be loaded.</p>
        ) : (
          <Loading what="Counting people" />
        )}
        <p>
          <Link to="/admin/people">Manage people and invitations</Link>
        </p>
      </Panel>
      <Panel title="Sites" level={3}>
        {siteCount !== undefined ? <p>{siteCount === 1 ? '1 site' : `${siteCount} sites`} in Brink.</p> : null}
        <p>
          <Link to="/admin/sites">Manage sites</Link>
        </p>
      </Panel>
    </RoleSection>
  );
}
