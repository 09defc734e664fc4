import { Link } from 'react-router-dom';
import { permitViewLabels, type PermitView } from '@shared/schemas/permits';
import { Panel } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { formatDateTime } from '@client/lib/labels';
import { usePermitList } from '../api/permits';
import { StatusLabel } from './StatusLabel';

const SHOWN = 5;
/** Requests awaiting a decision are a coordinator's queue: each one is shown (up to this many), so none is a page away. */
const SHOWN_FOR_REVIEW = 20;

/**
 * A dashboard panel of one permit list of the site (awaiting my review, my requests, live now),
 * the first few with their status and window, and a link to the whole list.
 */
export function DashboardPermits({ siteId, view, intro }: { siteId: number; view: Exclude<PermitView, 'all'>; intro: string }) {
  // Awaiting review: oldest first; the others by when their window opens.
  const list = usePermitList({ siteId: String(siteId), view, sort: view === 'review' ? 'updated' : 'windowStart', order: 'asc' });
  const title = permitViewLabels[view];
  const shown = view === 'review' ? SHOWN_FOR_REVIEW : SHOWN;
  return (
    <Panel title={title} level={3}>
      <p className="text-ink-soft">{intro}</p>
      {list.isPending ? (
        <Loading what={`Loading ${title.toLowerCase()}`} />
      ) : list.isError ? (
        <LoadError error={list.error} />
      ) : list.data.length === 0 ? (
        <p>None at the moment.</p>
      ) : (
        <ul className="flex flex-col gap-2">
          {list.data.slice(0, shown).map((p) => (
            <li key={p.id} className="flex flex-col">
              <Link to={`/permits/${p.id}`} className="font-semibold">
                {p.number}: {p.description}
              </Link>
              <span className="text-sm">
                <StatusLabel status={p.status} /> · {formatDateTime(p.windowStart)} to {formatDateTime(p.windowEnd)}
              </span>
            </li>
          ))}
        </ul>
      )}
      <p>
        <Link to={`/sites/${siteId}/permits?view=${view}`}>
          {list.data && list.data.length > shown ? `All ${list.data.length}` : 'Open the list'}
        </Link>
      </p>
    </Panel>
  );
}
