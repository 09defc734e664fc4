import { useLocation } from 'react-router-dom';
import { ButtonLink, ShowMore, buttonClass } from '@client/components/Button';
import { InspectionStateBadge } from '@client/components/InspectionStateBadge';
import { Page, Panel } from '@client/components/Page';
import { LoadError, Loading, Notice } from '@client/components/Status';
import { useInspectionHistory, type RecordedInspection } from '../api/inspections';
import { InspectionCard, PermitLinks } from '../components/InspectionCard';
import { usePageSite } from './site';

/** /sites/:siteId/excavations/:excavationId/inspections: the excavation's inspection record. */
export function HistoryPage() {
  const { site, excavationId, mayInspect } = usePageSite();
  const recorded = (useLocation().state as { recorded?: RecordedInspection } | null)?.recorded;
  const data = useInspectionHistory(excavationId);
  if (data.isPending || !site) return <Loading what="Loading the inspections" />;
  if (data.isError) return <LoadError error={data.error} retry={() => data.refetch()} />;
  const { excavation, inspections, inspectionState, timeZone } = data.data;
  return (
    <Page
      title={`Inspections of ${excavation.reference} ${excavation.name}`}
      documentTitle={`Inspections, ${excavation.reference}`}
      intro={inspectionState ? <InspectionStateBadge state={inspectionState} /> : `This excavation is ${excavation.state}.`}
      actions={
        <>
          {mayInspect && excavation.state === 'open' ? (
            <ButtonLink variant="primary" to={`/sites/${site.id}/excavations/${excavation.id}/inspect`}>
              Inspect now
            </ButtonLink>
          ) : null}
          <a className={buttonClass('secondary')} href={`/api/excavations/${excavation.id}/inspections.csv`} download>
            Download as CSV
          </a>
        </>
      }
    >
      <Notice>{recorded ? <RecordedNotice recorded={recorded} /> : null}</Notice>
      <Panel
        title={
          inspections.length
            ? data.hasNextPage
              ? `The newest ${inspections.length} inspections`
              : `${inspections.length} inspection${inspections.length === 1 ? '' : 's'}, newest first`
            : 'No inspections yet'
        }
      >
        {inspections.map((i) => (
          <InspectionCard key={i.id} inspection={i} timeZone={timeZone} />
        ))}
        <ShowMore pages={data} label="Show older inspections" busyText="Loading older inspections…" />
      </Panel>
    </Page>
  );
}

function RecordedNotice({ recorded }: { recorded: RecordedInspection }) {
  const c = recorded.consequences;
  if (recorded.inspection.outcome === 'safe') {
    const still = c?.stillSuspended ?? [];
    return (
      <>
        Inspection recorded: safe to work.{' '}
        {still.length ? (
          <>
            {still.length === 1 ? 'Its suspended permit stays' : `Its ${still.length} suspended permits stay`} suspended until a coordinator
            resumes {still.length === 1 ? 'it' : 'them'}: <PermitLinks permits={still} />.
          </>
        ) : null}
      </>
    );
  }
  return (
    <>
      Inspection recorded: not safe. Work in and beside it must stop.{' '}
      {c?.suspended.length ? (
        <>
          Suspended: <PermitLinks permits={c.suspended} />.{' '}
        </>
      ) : (
        'There was no live permit to suspend. '
      )}
      {c?.notSuspended.length ? (
        <>
          Could not suspend <PermitLinks permits={c.notSuspended} />: ask a coordinator to suspend them now.{' '}
        </>
      ) : null}
      {c?.notified.length ? `The site’s supervisors and coordinators have been e-mailed.` : ''}
    </>
  );
}
