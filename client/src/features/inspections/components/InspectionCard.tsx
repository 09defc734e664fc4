import { answerLabels, checklist, outcomeLabels, reasonLabels, type Inspection } from '@shared/schemas/inspections';
import { Fragment } from 'react';
import { Link } from 'react-router-dom';
import { formatSiteTime } from '@shared/time/shifts';

/** Permit numbers as links to their pages, joined with commas. */
export function PermitLinks({ permits }: { permits: { id: number; reference: string }[] }) {
  return (
    <>
      {permits.map((p, n) => (
        <Fragment key={p.id}>
          {n ? ', ' : ''}
          <Link to={`/permits/${p.id}`}>{p.reference}</Link>
        </Fragment>
      ))}
    </>
  );
}

/** One inspection in the history: when, who, why, the verdict, what failed, the photos. */
export function InspectionCard({ inspection: i, timeZone }: { inspection: Inspection; timeZone: string }) {
  const failed = checklist.filter((c) => i.checklist[c.key]?.answer === 'fail');
  const notes = checklist.filter((c) => i.checklist[c.key]?.answer !== 'fail' && i.checklist[c.key]?.note);
  const na = checklist.filter((c) => i.checklist[c.key]?.answer === 'na');
  const safe = i.outcome === 'safe';
  return (
    <article className="flex flex-col gap-2 rounded-lg border border-rule bg-sheet p-4" aria-label={`Inspection ${i.id}`}>
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h3 className="text-lg font-semibold">{formatSiteTime(new Date(i.inspectedAt), timeZone)}</h3>
        <span className={`rounded-md px-2 py-0.5 font-bold text-white ${safe ? 'bg-safety-green' : 'bg-safety-red'}`}>
          {outcomeLabels[i.outcome]}
        </span>
      </div>
      <p>
        {i.inspector.name} · {i.shift.name} · {reasonLabels[i.reason]}
        {i.reasonDetail ? `: ${i.reasonDetail}` : ''}
      </p>
      {i.remarks ? <p className="font-semibold">{i.remarks}</p> : null}
      {failed.length ? (
        <ul className="list-disc pl-6">
          {failed.map((c) => (
            <li key={c.key}>
              <strong>{c.label}: failed.</strong> {i.checklist[c.key].note}
            </li>
          ))}
        </ul>
      ) : (
        <p className="text-ink-soft">
          Every check passed{na.length ? ` (not applicable: ${na.map((c) => c.label.toLowerCase()).join(', ')})` : ''}.
        </p>
      )}
      {notes.length ? (
        <ul className="text-ink-soft">
          {notes.map((c) => (
            <li key={c.key}>
              {c.label} ({answerLabels[i.checklist[c.key].answer].toLowerCase()}): {i.checklist[c.key].note}
            </li>
          ))}
        </ul>
      ) : null}
      {i.suspendedPermits.length ? (
        <p>
          Permits suspended by this inspection: <PermitLinks permits={i.suspendedPermits} />.
        </p>
      ) : null}
      {i.photos.length ? (
        <ul className="flex flex-wrap gap-2">
          {i.photos.map((p, n) => (
            <li key={p.id}>
              <a href={p.url} target="_blank" rel="noreferrer" className="block">
                <img
                  src={p.url}
                  alt={`Photo ${n + 1} of inspection ${i.id}: ${p.name}`}
                  loading="lazy"
                  className="h-24 w-32 rounded-md border border-rule object-cover"
                />
              </a>
            </li>
          ))}
        </ul>
      ) : null}
      {new Date(i.recordedAt).getTime() - new Date(i.inspectedAt).getTime() > 10 * 60_000 ? (
        <p className="text-sm text-ink-soft">Recorded later, at {formatSiteTime(new Date(i.recordedAt), timeZone)}.</p>
      ) : null}
    </article>
  );
}
