import { useMemo, useState, type ReactNode } from 'react';
import { Link, useParams } from 'react-router-dom';
import { localProjection } from '@shared/geometry';
import type { PlantForCheck } from '@shared/permits/check';
import {
  attachmentKindLabels,
  attachmentKinds,
  commentSchema,
  commonConditions,
  editableStatuses,
  loadName,
  serviceCheckKeys,
  serviceCheckLabels,
  transitionRules,
  transitionSchema,
  type PermitAction,
  type PermitDetail,
  type PermitEvent,
} from '@shared/schemas/permits';
import { deviceTimeZone } from '@shared/time/shifts';
import { Button, ButtonLink, buttonClass } from '@client/components/Button';
import { Caution } from '@client/components/Caution';
import { CheckboxField, FormSummary, SelectField, TextField } from '@client/components/Fields';
import { Page, Panel } from '@client/components/Page';
import { LoadError, Loading, Notice } from '@client/components/Status';
import { ExclusionsOnTheGround } from '../components/ExclusionsOnTheGround';
import { ApiError, errorMessage, isApiError } from '@client/lib/api';
import { serverSummary } from '@client/lib/fieldLabels';
import { fieldSentence, maxLengths } from '@client/lib/forms';
import { parseId } from '@client/lib/session';
import {
  useAttach,
  useBriefing,
  useComment,
  useExcavations,
  usePermit,
  usePlant,
  useRevision,
  useSite,
  useTransition,
} from '../api/permits';
import { CheckSheets } from '../components/CheckSheet';
import { PlacementMap } from '../components/PlacementMap';
import { StatusLabel } from '../components/StatusLabel';
import { when } from '../components/time';
import { timelineLine } from '../components/timeline';
import { useFigures } from '@client/lib/units';
import { QuantityBox } from '@client/components/QuantityField';
import { fromSystem, inSystem, roundTo } from '@shared/units';

const decisionMax = maxLengths(transitionSchema.shape);
const commentMax = maxLengths(commentSchema.shape);

/** One permit: where it stands, the decision, the check sheet, what the viewer may do, the timeline. */
export function PermitPage() {
  const id = parseId(useParams().permitId) ?? 0;
  const permit = usePermit(id);
  if (permit.isPending) return <Loading what="Loading the permit" />;
  if (permit.isError)
    return (
      <Page title={isApiError(permit.error, 404) ? 'Permit not found' : 'The permit could not be loaded'}>
        <LoadError error={permit.error} retry={() => permit.refetch()} />
      </Page>
    );
  return <PermitView permit={permit.data} />;
}

function PermitView({ permit }: { permit: PermitDetail }) {
  const rev = permit.current;
  const site = useSite(permit.siteId);
  const at = (iso: string | null) => when(iso, site.data?.timezone);
  const excavations = useExcavations(permit.siteId);
  const plantQ = usePlant();
  const proj = useMemo(() => (site.data ? localProjection([site.data.longitude, site.data.latitude]) : null), [site.data]);
  const frozen = rev.plantSnapshot;
  const editable = editableStatuses.includes(permit.status);
  // From review on, the machines as they were frozen with the revision (the library may have changed since).
  const plant = useMemo(
    () =>
      new Map<number, PlantForCheck>([
        ...(plantQ.data ?? []).map((p) => [p.id, p] as const),
        ...(frozen && !editable ? frozen.machines.map((m) => [m.id, m] as const) : []),
      ]),
    [plantQ.data, frozen, editable],
  );
  const named = (excavations.data ?? []).filter((e) => rev.excavationIds.includes(e.id));
  const standoff = rev.decision?.standoff ?? rev.check?.computedStandoff ?? null;
  const canEdit = editableStatuses.includes(permit.status) && permit.actions.includes('submit');

  return (
    <Page
      title={`Permit ${permit.number}`}
      intro={`${permit.kind === 'load' ? 'Load beside an excavation' : 'Dig: open or extend an excavation'} on ${permit.siteName}. Revision ${permit.revision}.`}
      actions={
        <>
          {canEdit ? (
            <ButtonLink to={`/permits/${permit.id}/edit`} variant="primary">
              Change the request
            </ButtonLink>
          ) : null}
          <a className={buttonClass('secondary')} href={`/api/permits/${permit.id}/pdf`} download>
            Download the permit (PDF)
          </a>
        </>
      }
    >
      <Panel title="Where it stands">
        <p className="text-lg">
          Status: <StatusLabel status={permit.status} />
        </p>
        <dl className="grid gap-x-6 gap-y-1 sm:grid-cols-[max-content_1fr]">
          <dt className="font-semibold">Window</dt>
          <dd>
            {at(rev.windowStart)} to {at(rev.windowEnd)}
          </dd>
          <dt className="font-semibold">Work</dt>
          <dd>{rev.description || '—'}</dd>
          <dt className="font-semibold">Requested by</dt>
          <dd>{permit.requestedBy.name}</dd>
          <dt className="font-semibold">Excavations</dt>
          <dd>{named.map((e) => `${e.reference} ${e.name}`).join('; ') || '—'}</dd>
          <dt className="font-semibold">Operators</dt>
          <dd>
            {rev.operators.length
              ? rev.operators.map((o) => `${o.name} (${o.briefedAt ? `briefed ${at(o.briefedAt)}` : 'not yet briefed'})`).join('; ')
              : 'None named'}
          </dd>
        </dl>
      </Panel>
      {rev.decision ? (
        <DecisionPanel permit={permit}>
          <ExclusionsOnTheGround rev={rev} excavations={excavations.data ?? []} minimumClearance={site.data?.minimumClearance ?? 0} />
        </DecisionPanel>
      ) : null}
      <Actions permit={permit} />
      {rev.dig ? (
        <Panel title="Dig: depth, support and buried services">
          <p>
            Depth {rev.dig.depth.toFixed(2)} m. Support: {rev.dig.supportMethod}
          </p>
          <ul>
            {serviceCheckKeys.map((k) => {
              const c = rev.dig!.servicesChecks[k];
              return (
                <li key={k}>
                  {serviceCheckLabels[k]}:{' '}
                  {c.state === 'done'
                    ? `done by ${c.by}, ${at(c.at)}`
                    : c.state === 'not-needed'
                      ? `not needed (${c.notes})`
                      : 'not done yet'}
                  {c.state === 'done' && c.notes ? ` – ${c.notes}` : ''}
                </li>
              );
            })}
          </ul>
        </Panel>
      ) : null}
      {proj && named.length ? (
        <Panel title="Plan">
          <PlacementMap
            proj={proj}
            excavations={named}
            loads={rev.loads}
            plant={plant}
            check={rev.check}
            verdict={rev.check?.verdict ?? null}
            standoff={standoff}
            editable={false}
          />
        </Panel>
      ) : null}
      <Panel title="Calculation sheet">
        {rev.check ? (
          <>
            <p className="text-sm text-ink-soft">
              Checked {at(rev.checkedAt)}; the server checks again at every save, submission and decision, and whenever a named excavation
              changes.
            </p>
            {rev.plantSnapshot && !editable && rev.plantSnapshot.machines.length ? (
              <p className="text-sm" data-testid="computed-with">
                Computed with {rev.plantSnapshot.machines.map((m) => m.name).join(', ')} as of {at(rev.plantSnapshot.takenAt)} (frozen when
                the request was sent for review; later changes to the plant library apply to new requests only).
              </p>
            ) : null}
            <CheckSheets check={rev.check} />
          </>
        ) : (
          <>
            <p>No check yet: place a load beside a named excavation.</p>
            <Caution />
          </>
        )}
      </Panel>
      <Attachments permit={permit} at={at} />
      <Timeline permit={permit} at={at} timeZone={site.data?.timezone ?? deviceTimeZone()} />
      <Revisions permit={permit} at={at} plant={plant} />
    </Page>
  );
}

function DecisionPanel({ permit, children }: { permit: PermitDetail; children?: ReactNode }) {
  const figures = useFigures();
  const d = permit.current.decision!;
  const title = d.action === 'approve' ? 'Approved' : d.action === 'return' ? 'Returned for changes' : 'Declined';
  return (
    <Panel title={`Decision: ${title}`}>
      {d.action === 'approve' ? (
        <>
          <p data-testid="decision-standoff">
            {d.standoff !== null
              ? `Standoff: keep every load at least ${figures.length(d.standoff, { rounding: 'up' })} from the excavation edge.`
              : 'Approved as placed on the plan (no standoff set).'}
          </p>
          {children}
          <p className="text-sm text-ink-soft">
            Computed standoff at the decision:{' '}
            {d.computedStandoff === undefined
              ? 'not recorded'
              : d.computedStandoff === null
                ? 'none within 3H'
                : figures.length(d.computedStandoff, { rounding: 'up' })}
            .
          </p>
          {d.conditions.length ? (
            <>
              <h3 className="font-semibold">Conditions</h3>
              <ol className="list-decimal pl-6">
                {d.conditions.map((c) => (
                  <li key={c}>{c}</li>
                ))}
              </ol>
            </>
          ) : null}
        </>
      ) : null}
      {d.reason ? (
        <p>
          {d.action === 'return' ? 'Comments' : 'Reason'}: {d.reason}
        </p>
      ) : null}
      <p className="text-sm">{d.signature}</p>
      <Caution />
    </Panel>
  );
}

/** What a person reads after each action succeeds (the panel stays to say it, even with nothing left to do). */
const doneMessages: Partial<Record<PermitAction, string>> = {
  submit: 'Sent for review. The coordinators are told by e-mail.',
  approve: 'Approved. The person who asked for it and the operators named on it are told by e-mail.',
  return: 'Returned for changes. The person who asked for it is told by e-mail, with your comments.',
  decline: 'Declined. The person who asked for it is told by e-mail.',
  suspend: 'Suspended. Everyone working under it is told to stop.',
  resume: 'Resumed: the permit is live again. The person who asked for it and the operators are told.',
  hand_back: 'Handed back: the permit is closed.',
  withdraw: 'Withdrawn: no work may be done under it.',
  revise: 'A new revision is open as a draft: change it and send it for review again.',
};

function Actions({ permit }: { permit: PermitDetail }) {
  const [open, setOpen] = useState<PermitAction | null>(null);
  const briefing = useBriefing(permit.id);
  const [done, setDone] = useState<string | null>(null);
  const shown = permit.actions;
  if (shown.length === 0 && !permit.briefingDue && !done) return null;
  return (
    <Panel title="What you can do">
      <Notice>{done}</Notice>
      {permit.briefingDue ? (
        <div className="flex flex-col gap-2">
          <p>
            You are named on this permit. Confirm once the supervisor has briefed you on the loads, the exclusion zone and the conditions.
          </p>
          <Button
            onClick={() => briefing.mutate(undefined, { onSuccess: () => setDone('Briefing confirmed.') })}
            busy={briefing.isPending}
            busyText="Confirming…"
          >
            I have been briefed
          </Button>
          {briefing.isError ? <FormSummary message={errorMessage(briefing.error)} /> : null}
        </div>
      ) : null}
      <div className="flex flex-wrap gap-3">
        {shown.map((a) => (
          <Button
            key={a}
            variant={open === a ? 'primary' : 'secondary'}
            onClick={() => setOpen(open === a ? null : a)}
            aria-expanded={open === a}
          >
            {transitionRules[a].label}
          </Button>
        ))}
      </div>
      {open ? (
        <TransitionForm
          key={open}
          permit={permit}
          action={open}
          onDone={(msg) => {
            setOpen(null);
            setDone(msg);
          }}
        />
      ) : null}
    </Panel>
  );
}

function TransitionForm({ permit, action, onDone }: { permit: PermitDetail; action: PermitAction; onDone: (msg: string) => void }) {
  const figures = useFigures();
  const rule = transitionRules[action];
  const move = useTransition(permit.id);
  const computed = permit.current.check?.computedStandoff ?? null;
  const [reason, setReason] = useState('');
  const [withStandoff, setWithStandoff] = useState(action === 'approve' && computed !== null && computed > 0);
  // Offered: the computed standoff rounded up to 0.1 of the person's unit (0.1 m or 0.1 ft), never less.
  const [standoff, setStandoff] = useState<number | null>(() =>
    computed !== null ? fromSystem('length', roundTo(inSystem('length', computed, figures.system), 0.1, 'up'), figures.system) : null,
  );
  const [ticked, setTicked] = useState<string[]>([]);
  const [extra, setExtra] = useState('');
  const [password, setPassword] = useState('');
  const [error, setError] = useState<ApiError | null>(null);
  const f = error?.fields ?? {};

  async function go() {
    setError(null);
    const conditions = [
      ...ticked,
      ...extra
        .split('\n')
        .map((s) => s.trim())
        .filter(Boolean),
    ];
    try {
      await move.mutateAsync({
        action,
        version: permit.version,
        ...(reason.trim() ? { reason: reason.trim() } : {}),
        ...(rule.signed ? { password } : {}),
        ...(action === 'approve' ? { conditions, ...(withStandoff && standoff !== null ? { standoff } : {}) } : {}),
      });
      onDone(doneMessages[action] ?? `${rule.label}: done.`);
    } catch (e) {
      setError(e instanceof ApiError ? e : new ApiError(0, 'x', errorMessage(e)));
    }
  }

  return (
    <form
      noValidate
      className="flex flex-col gap-3 rounded-md border border-rule-strong p-4"
      onSubmit={(e) => {
        e.preventDefault();
        void go();
      }}
      aria-label={rule.label}
    >
      <FormSummary message={error ? serverSummary(error, (k) => ['standoff', 'reason', 'password'].includes(k)) : null} />
      {action === 'approve' ? (
        <>
          <p>
            Computed standoff:{' '}
            {computed === null
              ? 'none within 3H (the support must be redesigned or the loads reduced)'
              : figures.length(computed, { rounding: 'up' })}
            .
          </p>
          <CheckboxField label="Approve with a standoff" checked={withStandoff} onChange={(e) => setWithStandoff(e.target.checked)} />
          {withStandoff ? (
            <QuantityBox
              label="Standoff from the excavation edge"
              quantity="length"
              value={standoff}
              onChange={setStandoff}
              error={f.standoff}
              hint="At least the computed standoff, or give a reason below."
            />
          ) : null}
          <fieldset className="flex flex-col gap-1">
            <legend className="font-semibold">Conditions</legend>
            {commonConditions.map((c) => (
              <CheckboxField
                key={c.key}
                label={c.text}
                checked={ticked.includes(c.text)}
                onChange={(e) => setTicked(e.target.checked ? [...ticked, c.text] : ticked.filter((t) => t !== c.text))}
              />
            ))}
            <label className="flex flex-col gap-1">
              <span className="font-semibold">Other conditions (one a line)</span>
              <textarea
                className="min-h-20 rounded-md border border-rule-strong bg-sheet p-2"
                value={extra}
                onChange={(e) => setExtra(e.target.value)}
              />
            </label>
          </fieldset>
        </>
      ) : null}
      <label className="flex flex-col gap-1">
        <span className="font-semibold">
          {action === 'return'
            ? 'Comments for the requester'
            : rule.reason
              ? 'Reason'
              : action === 'approve'
                ? 'Reason (needed for a standoff below the computed one, or a failing check)'
                : 'Comment (optional)'}
        </span>
        <textarea
          className="min-h-20 rounded-md border border-rule-strong bg-sheet p-2"
          value={reason}
          maxLength={decisionMax.reason}
          onChange={(e) => setReason(e.target.value)}
          aria-invalid={f.reason ? true : undefined}
        />
        {f.reason ? <span className="text-sm font-semibold text-error-text">{fieldSentence('Reason', f.reason)}</span> : null}
      </label>
      {rule.signed ? (
        <TextField
          label="Password"
          hint="Type your password again: it signs the decision."
          type="password"
          autoComplete="current-password"
          value={password}
          onChange={(e) => setPassword(e.target.value)}
          error={f.password}
        />
      ) : null}
      <div>
        <Button type="submit" busy={move.isPending} busyText="Working…">
          {rule.label}
        </Button>
      </div>
    </form>
  );
}

function Attachments({ permit, at }: { permit: PermitDetail; at: (iso: string | null) => string }) {
  const attach = useAttach(permit.id);
  const [kind, setKind] = useState<string>('method-statement');
  const [file, setFile] = useState<File | null>(null);
  return (
    <Panel title="Attachments">
      {permit.attachments.length ? (
        <ul>
          {permit.attachments.map((a) => (
            <li key={a.id} className="flex flex-wrap items-center gap-3">
              {a.mime.startsWith('image/') ? <Thumbnail url={a.url} alt={a.name} /> : null}
              <span>
                <a href={a.url} target="_blank" rel="noopener">
                  {a.name}
                  <span className="sr-only"> (opens full size in a new tab)</span>
                </a>{' '}
                – {attachmentKindLabels[a.kind]}, {(a.size / 1024).toFixed(0)} KB, added by {a.addedBy} {at(a.addedAt)} (revision{' '}
                {a.revision})
              </span>
            </li>
          ))}
        </ul>
      ) : (
        <p>No attachments.</p>
      )}
      <form
        className="flex flex-wrap items-end gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          if (file) attach.mutate({ file, kind });
        }}
      >
        <SelectField
          label="Kind"
          value={kind}
          onChange={(e) => setKind(e.target.value)}
          options={attachmentKinds.map((k) => ({ value: k, label: attachmentKindLabels[k] }))}
        />
        <label className="flex flex-col gap-1">
          <span className="font-semibold">File (PDF up to 20 MB, photos up to 10 MB)</span>
          <input type="file" accept="application/pdf,image/png,image/jpeg" onChange={(e) => setFile(e.target.files?.[0] ?? null)} />
        </label>
        <Button type="submit" variant="secondary" disabled={!file} busy={attach.isPending} busyText="Uploading…">
          Attach
        </Button>
      </form>
      {attach.isError ? <FormSummary message={errorMessage(attach.error)} /> : null}
    </Panel>
  );
}

/** A small picture that opens full size, in a new tab, through Brink's access checks (the uploads route). */
function Thumbnail({ url, alt, label = 'Open full size' }: { url: string; alt: string; label?: string }) {
  return (
    <a href={url} target="_blank" rel="noopener" className="inline-flex flex-col items-start gap-1">
      <img src={url} alt={alt} loading="lazy" width={112} height={112} className="h-28 w-28 rounded border border-rule object-cover" />
      <span className="text-sm">
        {label}
        <span className="sr-only"> (opens in a new tab)</span>
      </span>
    </a>
  );
}

/** The photos sent with a concern (their upload ids, kept on the timeline event). */
function concernPhotoIds(e: PermitEvent): number[] {
  const ids = e.action === 'concern' ? e.detail.photoIds : undefined;
  return Array.isArray(ids) ? ids.filter((x): x is number => typeof x === 'number') : [];
}

function Timeline({ permit, at, timeZone }: { permit: PermitDetail; at: (iso: string | null) => string; timeZone: string }) {
  const comment = useComment(permit.id);
  const [text, setText] = useState('');
  const figures = useFigures();
  return (
    <Panel title="Timeline">
      <ol className="flex flex-col gap-2">
        {permit.events.map((e) => {
          const photos = concernPhotoIds(e);
          return (
            <li key={e.id} className="border-l-4 border-rule pl-3" data-testid="timeline-line">
              <p>
                <span className="font-semibold">{timelineLine(e, timeZone, figures)}</span>{' '}
                <span className="text-sm text-ink-soft">
                  {at(e.at)} (revision {e.revision})
                </span>
              </p>
              {e.comment ? <p className="whitespace-pre-wrap">“{e.actor.id === null ? figures.words(e.comment) : e.comment}”</p> : null}
              {photos.length ? (
                <ul className="mt-1 flex flex-wrap gap-3" aria-label={`Photos of the concern by ${e.actor.name}`}>
                  {photos.map((id, i) => (
                    <li key={id}>
                      <Thumbnail url={`/api/uploads/${id}`} alt={`Photo ${i + 1} of the concern by ${e.actor.name}`} />
                    </li>
                  ))}
                </ul>
              ) : null}
            </li>
          );
        })}
      </ol>
      <form
        className="flex flex-col gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          if (text.trim()) comment.mutate(text.trim(), { onSuccess: () => setText('') });
        }}
      >
        <label className="flex flex-col gap-1">
          <span className="font-semibold">Add a comment</span>
          <textarea
            className="min-h-16 rounded-md border border-rule-strong bg-sheet p-2"
            value={text}
            maxLength={commentMax.text}
            onChange={(e) => setText(e.target.value)}
          />
        </label>
        <div>
          <Button type="submit" variant="secondary" busy={comment.isPending} busyText="Adding…">
            Add comment
          </Button>
        </div>
      </form>
    </Panel>
  );
}

function Revisions({ permit, at, plant }: { permit: PermitDetail; at: (iso: string | null) => string; plant: Map<number, PlantForCheck> }) {
  const [shown, setShown] = useState<number | null>(null);
  const old = useRevision(permit.id, shown);
  if (permit.revisions.length < 2) return null;
  return (
    <Panel title="Revisions">
      <ul className="flex flex-wrap gap-3">
        {permit.revisions.map((r) => (
          <li key={r.revision}>
            <Button variant={shown === r.revision ? 'primary' : 'quiet'} onClick={() => setShown(r.revision)}>
              Revision {r.revision} ({at(r.createdAt)}
              {r.decision ? `, ${r.decision === 'approve' ? 'approved' : r.decision === 'return' ? 'returned' : 'declined'}` : ''})
            </Button>
          </li>
        ))}
      </ul>
      {old.data ? (
        <div className="flex flex-col gap-2">
          <p>
            Window {at(old.data.windowStart)} to {at(old.data.windowEnd)}. {old.data.description}
          </p>
          <p>Loads: {old.data.loads.map((l) => loadName(l, (id) => plant.get(id)?.name)).join(', ') || 'none'}</p>
          {old.data.decision ? (
            <p>
              Decision: {old.data.decision.action};{' '}
              {old.data.decision.standoff !== null ? `standoff ${old.data.decision.standoff.toFixed(2)} m; ` : ''}
              {old.data.decision.signature}
            </p>
          ) : null}
          {old.data.check ? <CheckSheets check={old.data.check} full={false} /> : null}
        </div>
      ) : null}
      <p className="text-sm">
        <Link to={`/sites/${permit.siteId}/permits`}>All permits of the site</Link>
      </p>
    </Panel>
  );
}
