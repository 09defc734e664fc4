import { Link } from 'react-router-dom';
import { permitViewLabels, type PermitSummary, type PermitView } from '@shared/schemas/permits';
import { Panel } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { formatSiteTime } from '@shared/time/shifts';
import { usePermitList } from '../api/permits';
import { needHints, needStatuses, needTitles, needsFirst } from './needsFirst';
import { StatusLabel } from './StatusLabel';

const SHOWN = 5;
/** Requests awaiting a decision are a coordinator's queue: each one is shown (up to this many), so none is a page away. */
const SHOWN_FOR_REVIEW = 20;

/**
 * A dashboard panel of one permit list of the site (awaiting my review, my requests, live now),
 * the first few with their status and window, and a link to the whole list.
 */
export function DashboardPermits({
  siteId,
  view,
  intro,
  timeZone,
}: {
  siteId: number;
  view: Exclude<PermitView, 'all'>;
  intro: string;
  timeZone: string;
}) {
  if (view === 'mine') return <NeedsFirst siteId={siteId} timeZone={timeZone} />;
  return <PermitPanel siteId={siteId} view={view} intro={intro} timeZone={timeZone} />;
}

function PermitPanel({
  siteId,
  view,
  intro,
  timeZone,
}: {
  siteId: number;
  view: Exclude<PermitView, 'all' | 'mine'>;
  intro: string;
  timeZone: string;
}) {
  // Awaiting review: oldest first; live now by when their window opens. Only the permits shown are
  // asked for, with the count of all of them (a big site has hundreds live).
  const shown = view === 'review' ? SHOWN_FOR_REVIEW : SHOWN;
  const list = usePermitList({
    siteId: String(siteId),
    view,
    sort: view === 'review' ? 'updated' : 'windowStart',
    order: 'asc',
    limit: String(shown),
    total: 'true',
  });
  const title = permitViewLabels[view];
  const total = list.data?.total ?? list.data?.permits.length ?? 0;
  return (
    <Panel title={title} level={3}>
      <p className="text-ink-soft">{intro}</p>
      {list.isPending ? (
        <Loading what={`Loading ${title.toLowerCase()}`} />
      ) : list.isError ? (
        <LoadError error={list.error} />
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
function NeedsFirst({ siteId, timeZone }: { siteId: number; timeZone: string }) {
  const list = usePermitList({ siteId: String(siteId), view: 'mine', status: needStatuses.join(','), sort: 'updated', order: 'desc' });
  const groups = list.data ? needsFirst(list.data.permits, new Date(), timeZone) : [];
  return (
    <Panel title="What needs you first" level={3}>
      {list.isPending ? (
        <Loading what="Loading your permits" />
      ) : list.isError ? (
        <LoadError error={list.error} />
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
