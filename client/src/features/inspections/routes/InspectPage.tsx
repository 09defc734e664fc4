import { useNavigate } from 'react-router-dom';
import { ButtonLink } from '@client/components/Button';
import { InspectionStateBadge } from '@client/components/InspectionStateBadge';
import { Page } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { formatSiteTime } from '@shared/time/shifts';
import { useExcavationInspections, useRecordInspection } from '../api/inspections';
import { InspectionForm } from '../components/InspectionForm';
import { usePageSite } from './site';

/** /sites/:siteId/excavations/:excavationId/inspect: the inspection form, on a phone at the edge. */
export function InspectPage() {
  const { siteId, excavationId, me, site, mayInspect } = usePageSite();
  const navigate = useNavigate();
  const data = useExcavationInspections(excavationId);
  const record = useRecordInspection(siteId ?? 0, excavationId ?? 0);
  if (data.isPending || !me || !site) return <Loading what="Opening the excavation" />;
  if (data.isError) return <LoadError error={data.error} retry={() => data.refetch()} />;
  const { excavation, shift, inspectionState, timeZone } = data.data;
  const title = `Inspect ${excavation.reference} ${excavation.name}`;
  const back = `/sites/${site.id}/excavations/${excavation.id}/inspections`;

  if (!mayInspect) {
    return (
      <Page title={title}>
        <p>This site has not given you the inspection duty. Supervisors and coordinators inspect, and operators the site names.</p>
        <ButtonLink to={back}>See its inspections</ButtonLink>
      </Page>
    );
  }
  if (excavation.state !== 'open') {
    return (
      <Page title={title}>
        <p>
          {excavation.reference} is {excavation.state}. Only open excavations are inspected.
        </p>
        <ButtonLink to={back}>See its inspections</ButtonLink>
      </Page>
    );
  }
  return (
    <Page
      title={title}
      documentTitle={`Inspect ${excavation.reference}`}
      intro={
        <>
          Inspector: {me.name}. {shift.name} from {formatSiteTime(new Date(shift.start), timeZone)}.{' '}
          {inspectionState ? <InspectionStateBadge state={inspectionState} /> : null}
        </>
      }
    >
      <InspectionForm
        userId={me.id}
        excavationId={excavation.id}
        reference={excavation.reference}
        send={(d, photos) => record.mutateAsync({ data: d, photos })}
        onRecorded={(r) => navigate(back, { state: { recorded: r } })}
      />
    </Page>
  );
}
