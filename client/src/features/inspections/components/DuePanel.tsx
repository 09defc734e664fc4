import { Link } from 'react-router-dom';
import { formatSiteTime } from '@shared/time/shifts';
import { Panel } from '@client/components/Page';
import { InspectionStateBadge } from '@client/components/InspectionStateBadge';
import { LoadError, Loading } from '@client/components/Status';
import { ButtonLink } from '@client/components/Button';
import type { DashboardPart } from '@client/lib/dashboard';
import type { DashboardAnswer } from '@shared/schemas/dashboard';

/**
 * "Excavations due for inspection" on the dashboards: the open excavations without a safe
 * inspection this shift, each with its state and, for those who may inspect, a button to do it.
 */
export function DuePanel({
  siteId,
  timeZone,
  canInspect,
  states,
}: {
  siteId: number;
  timeZone: string;
  canInspect: boolean;
  /** The open excavations still waiting, and how many are open, as the dashboard's one request answered them. */
  states: DashboardPart<NonNullable<DashboardAnswer['inspections']>>;
}) {
  return (
    <Panel title="Excavations due for inspection" level={3}>
      {states.error ? (
        <LoadError error={states.error} retry={states.retry} />
      ) : !states.data ? (
        <Loading what="Checking the inspections" />
      ) : (
        <>
          <p className="text-ink-soft">
            {states.data.shift.name} from {formatSiteTime(new Date(states.data.shift.start), timeZone)}; overdue from{' '}
            {formatSiteTime(new Date(states.data.shift.overdueFrom), timeZone, { clock: true })}.
          </p>
          {states.data.open === 0 ? (
            <p>No excavation is open.</p>
          ) : states.data.excavations.length === 0 ? (
            <p>Every open excavation has a safe inspection this shift.</p>
          ) : (
            <ul className="flex flex-col gap-3">
              {states.data.excavations.map((e) => (
                <li key={e.excavationId} className="flex flex-wrap items-center justify-between gap-2">
                  <span className="flex flex-wrap items-center gap-2">
                    <strong>{e.reference}</strong> {e.name} <InspectionStateBadge state={e.state} />
                  </span>
                  {canInspect ? (
                    <ButtonLink to={`/sites/${siteId}/excavations/${e.excavationId}/inspect`} aria-label={`Inspect ${e.reference}`}>
                      Inspect
                    </ButtonLink>
                  ) : (
                    <Link to={`/sites/${siteId}/excavations/${e.excavationId}/inspections`}>History</Link>
                  )}
                </li>
              ))}
            </ul>
          )}
          <p>
            <Link to={`/sites/${siteId}/inspections`}>All inspections on this site</Link>
          </p>
        </>
      )}
    </Panel>
  );
}
