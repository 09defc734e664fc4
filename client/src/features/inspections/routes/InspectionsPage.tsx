import { Link } from 'react-router-dom';
import { formatSiteTime } from '@shared/time/shifts';
import { ButtonLink } from '@client/components/Button';
import { InspectionStateBadge } from '@client/components/InspectionStateBadge';
import { Page, Panel } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { useInspectionStates } from '@client/lib/inspectionStates';
import { useShifts } from '../api/inspections';
import { ShiftsForm } from '../components/ShiftsForm';
import { WeeklyReport } from '../components/WeeklyReport';
import { usePageSite } from './site';

/** /sites/:siteId/inspections: this shift's state of every open excavation, the weekly report, the shifts. */
export function InspectionsPage() {
  const { site, mayInspect, maySetShifts } = usePageSite();
  const states = useInspectionStates(site?.id ?? null);
  const shifts = useShifts(site?.id ?? 0);
  if (!site || states.isPending) return <Loading what="Loading the inspections" />;
  if (states.isError) return <LoadError error={states.error} retry={() => states.refetch()} />;
  const tz = site.timezone;
  const { shift, excavations } = states.data;
  return (
    <Page
      title="Inspections"
      intro="Open excavations are inspected by a competent person at the start of every shift, after any event that may have weakened them, and after any fall of material (UK CDM 2015 regulation 22 and Schedule 3; US OSHA 29 CFR 1926.651(k))."
    >
      <Panel title="This shift">
        <p>
          {shift.name} started {formatSiteTime(new Date(shift.start), tz)}; excavations without a safe inspection are overdue from{' '}
          {formatSiteTime(new Date(shift.overdueFrom), tz, { clock: true })}.
        </p>
        {excavations.length === 0 ? (
          <p>No excavation is open on this site.</p>
        ) : (
          <ul className="flex flex-col divide-y divide-rule">
            {excavations.map((e) => (
              <li key={e.excavationId} className="flex flex-wrap items-center justify-between gap-3 py-3">
                <div className="flex flex-col gap-1">
                  <span>
                    <strong>{e.reference}</strong> {e.name}
                  </span>
                  <span className="flex flex-wrap items-center gap-2 text-sm text-ink-soft">
                    <InspectionStateBadge state={e.state} />
                    {e.lastInspection
                      ? `Last: ${formatSiteTime(new Date(e.lastInspection.at), tz)} by ${e.lastInspection.inspector}`
                      : 'Never inspected'}
                  </span>
                </div>
                <div className="flex flex-wrap gap-2">
                  {mayInspect ? (
                    <ButtonLink
                      variant="primary"
                      to={`/sites/${site.id}/excavations/${e.excavationId}/inspect`}
                      aria-label={`Inspect ${e.reference}`}
                    >
                      Inspect
                    </ButtonLink>
                  ) : null}
                  <ButtonLink to={`/sites/${site.id}/excavations/${e.excavationId}/inspections`} aria-label={`History of ${e.reference}`}>
                    History
                  </ButtonLink>
                </div>
              </li>
            ))}
          </ul>
        )}
      </Panel>
      <Panel title="Weekly report">
        <p>Each excavation, each shift, who inspected, the outcome and the photos, ready to print.</p>
        <WeeklyReport siteId={site.id} timeZone={tz} />
      </Panel>
      <Panel title="Shifts">
        {shifts.isPending ? (
          <Loading what="Loading the shifts" />
        ) : shifts.isError ? (
          <LoadError error={shifts.error} retry={() => shifts.refetch()} />
        ) : maySetShifts ? (
          <ShiftsForm siteId={site.id} current={shifts.data} />
        ) : (
          <p>
            {shifts.data.shifts.map((s) => `${s.name} from ${s.start}`).join(', ')} ({shifts.data.timeZone}). A coordinator can change them.{' '}
            <Link to={`/sites/${site.id}`}>Back to the dashboard</Link>
          </p>
        )}
      </Panel>
    </Page>
  );
}
