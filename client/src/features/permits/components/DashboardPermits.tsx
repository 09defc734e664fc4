import { Link } from 'react-router-dom';
import { permitViewLabels, type PermitSummary } from '@shared/schemas/permits';
import { dashboardLists, type DashboardAnswer, type DashboardList } from '@shared/schemas/dashboard';
import type { DashboardPart } from '@client/lib/dashboard';
import { Panel } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { formatSiteTime } from '@shared/time/shifts';
import { needHints, needTitles, needsFirst } from './needsFirst';
import { StatusLabel } from './StatusLabel';

/** How many of a supervisor's own permits each group shows before its link to all of them. */
const SHOWN = 5;

type PermitPage = NonNullable<DashboardAnswer['live']>;
interface PanelProps {
  siteId: number;
  intro: string;
  timeZone: string;
  /** The list as the dashboard's one request answered it (dashboardLists in shared/schemas/dashboard.ts says what was asked). */
  list: DashboardPart<PermitPage>;
}

/**
 * A dashboard panel of one permit list of the site (awaiting my review, my requests, live now),
 * the first few with their status and window, and a link to the whole list.
 */
export function DashboardPermits({ view, ...props }: PanelProps & { view: DashboardList }) {
  if (view === 'mine') return <NeedsFirst {...props} />;
  return <PermitPanel view={view} {...props} />;
}

function PermitPanel({ siteId, view, intro, timeZone, list }: PanelProps & { view: Exclude<DashboardList, 'mine'> }) {
  // Awaiting review: oldest first; live now by when their window opens. Only the permits shown are
  // asked for, with the count of all of them (a big site has hundreds live).
  const shown = dashboardLists[view].limit;
  const title = permitViewLabels[view];
  const total = list.data?.total ?? list.data?.permits.length ?? 0;
  return (
    <Panel title={title} level={3}>
      <p className="text-ink-soft">{intro}</p>
      {list.error ? (
        <LoadError error={list.error} retry={list.retry} />
      ) : !list.data ? (
        <Loading what={`Loading ${title.toLowerCase()}`} />
      ) : list.data.permits.length === 0 ? (
        <p>None at the moment.</p>
      ) : (
        <ul className="flex flex-col gap-2">
          {list.data.permits.map((p) => (
            <PermitItem key={p.id} permit={p} timeZone={timeZone} />
          ))}
        </ul>
      )}
      <p>
        <Link to={`/sites/${siteId}/permits?view=${view}`}>{total > shown ? `All ${total}` : 'Open the list'}</Link>
      </p>
    </Panel>
  );
}

/**
 * A supervisor's own permits by what needs them first: returned for changes, drafts, then those
 * working today (needsFirst); what needs nothing from them stays in the full list.
 */
function NeedsFirst({ siteId, timeZone, list }: PanelProps) {
  const groups = list.data ? needsFirst(list.data.permits, new Date(), timeZone) : [];
  return (
    <Panel title="What needs you first" level={3}>
      {list.error ? (
        <LoadError error={list.error} retry={list.retry} />
      ) : !list.data ? (
        <Loading what="Loading your permits" />
      ) : groups.length === 0 ? (
        <p>Nothing needs you now: no request returned, no draft, nothing working today.</p>
      ) : (
        groups.map(({ need, permits }) => (
          <section key={need} aria-labelledby={`need-${need}`} className="flex flex-col gap-1" data-need={need}>
            <h4 id={`need-${need}`} className="font-semibold">
              {needTitles[need]} ({permits.length})
            </h4>
            <p className="text-sm text-ink-soft">{needHints[need]}</p>
            <ul className="flex flex-col gap-2">
              {permits.slice(0, SHOWN).map((p) => (
                <PermitItem key={p.id} permit={p} timeZone={timeZone} />
              ))}
            </ul>
            {permits.length > SHOWN ? (
              <p className="text-sm">
                <Link to={`/sites/${siteId}/permits?view=mine`}>{`All ${permits.length} ${needTitles[need].toLowerCase()}`}</Link>
              </p>
            ) : null}
          </section>
        ))
      )}
      <p>
        <Link to={`/sites/${siteId}/permits?view=mine`}>All my requests</Link>
      </p>
    </Panel>
  );
}

/** One permit of a dashboard list: its number and work (a link), status and window on the site's clock. */
function PermitItem({ permit: p, timeZone }: { permit: PermitSummary; timeZone: string }) {
  return (
    <li className="flex flex-col">
      <Link to={`/permits/${p.id}`} className="font-semibold">
        {p.number}: {p.description || 'no description yet'}
      </Link>
      <span className="text-sm">
        <StatusLabel status={p.status} /> · {formatSiteTime(p.windowStart, timeZone)} to {formatSiteTime(p.windowEnd, timeZone)}
      </span>
    </li>
  );
}
