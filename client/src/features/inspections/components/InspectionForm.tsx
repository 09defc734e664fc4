import { newUuid } from '@client/lib/random';
import { useCallback, useEffect, useRef, useState } from 'react';
import { useForm, type Path } from 'react-hook-form';
import {
  MAX_PHOTOS,
  answerLabels,
  checkAnswers,
  checklist,
  checkSchema,
  inspectionInputSchema,
  inspectionReasons,
  outcomeLabels,
  reasonLabels,
  type InspectionData,
} from '@shared/schemas/inspections';
import { Button } from '@client/components/Button';
import { FormSummary, TextAreaField, TextField } from '@client/components/Fields';
import { ApiError, isApiError } from '@client/lib/api';
import { applyServerErrors, maxLengths } from '@client/lib/forms';
import { namedSentence } from './named';
import { clearDraft, loadDraft, saveDraft, type DraftPhoto, type FormValues } from '../api/draft';
import type { RecordedInspection } from '../api/inspections';
import { ChoiceGroup } from './ChoiceGroup';

const max = maxLengths(inspectionInputSchema.shape);
const noteMax = maxLengths(checkSchema.shape).note;
import { PhotoPicker } from './PhotoPicker';

const emptyValues: FormValues = {
  reason: '',
  reasonDetail: '',
  inspectedAt: '',
  checklist: Object.fromEntries(checklist.map((c) => [c.key, { answer: '', note: '' }])),
  outcome: '',
  remarks: '',
};

const answerChoices = checkAnswers.map((a) => ({
  value: a,
  label: answerLabels[a],
  chosen:
    a === 'pass'
      ? 'peer-checked:border-safety-green peer-checked:bg-safety-green peer-checked:text-white'
      : a === 'fail'
        ? 'peer-checked:border-safety-red peer-checked:bg-safety-red peer-checked:text-white'
        : undefined,
}));
const outcomeChoices = [
  {
    value: 'safe',
    label: outcomeLabels.safe,
    chosen: 'peer-checked:border-safety-green peer-checked:bg-safety-green peer-checked:text-white',
  },
  {
    value: 'not-safe',
    label: outcomeLabels['not-safe'],
    chosen: 'peer-checked:border-safety-red peer-checked:bg-safety-red peer-checked:text-white',
  },
];
const reasonChoices = inspectionReasons.map((r) => ({ value: r, label: reasonLabels[r] }));

/** What each field is called on screen, for messages that name it. */
const fieldLabels: Record<string, string> = {
  reason: 'Why',
  reasonDetail: 'What happened',
  inspectedAt: 'Time of the inspection',
  outcome: 'Outcome',
  remarks: 'Remarks',
  ...Object.fromEntries(
    checklist.flatMap((c) => [
      [`checklist.${c.key}`, c.label],
      [`checklist.${c.key}.answer`, c.label],
      [`checklist.${c.key}.note`, `${c.label} note`],
    ]),
  ),
};
const shownFields = Object.keys(fieldLabels).filter((k) => !/^checklist\.[a-z]+$/.test(k)) as Path<FormValues>[];

/** The form's values as the API takes them; empty choices are left out so the schema names them. */
function toInput(values: FormValues, clientRef: string): unknown {
  return {
    clientRef,
    reason: values.reason || undefined,
    reasonDetail: values.reasonDetail,
    inspectedAt: values.inspectedAt ? localToIso(values.inspectedAt) : undefined,
    checklist: Object.fromEntries(Object.entries(values.checklist).map(([k, v]) => [k, { answer: v.answer || undefined, note: v.note }])),
    outcome: values.outcome || undefined,
    remarks: values.remarks,
  };
}

/** "2026-03-30T07:05" typed on the phone (its own clock) → an ISO instant; text that is no date is passed on for the schema to name. */
function localToIso(local: string): string {
  const d = new Date(local);
  return Number.isNaN(d.getTime()) ? local : d.toISOString();
}

/** A missing checklist item is reported at its answer. */
const fieldOf = (path: string) => (/^checklist\.[a-z]+$/.test(path) ? `${path}.answer` : path) as Path<FormValues>;

interface InspectionFormProps {
  userId: number;
  excavationId: number;
  reference: string;
  send: (data: InspectionData, photos: Blob[]) => Promise<RecordedInspection>;
  onRecorded: (r: RecordedInspection) => void;
}

/**
 * The inspection form, made for a phone in a glove: large choices, one column, every answer kept on
 * the phone as it is given (also photos), so a lost signal or a refused send loses nothing.
 */
export function InspectionForm({ userId, excavationId, reference, send, onRecorded }: InspectionFormProps) {
  const { register, handleSubmit, reset, setError, clearErrors, watch, getValues, formState } = useForm<FormValues>({
    defaultValues: emptyValues,
  });
  const { errors } = formState;
  const [photos, setPhotos] = useState<DraftPhoto[]>([]);
  const [photoError, setPhotoError] = useState<string | null>(null);
  const [clientRef, setClientRef] = useState<string>(() => newUuid());
  const [loaded, setLoaded] = useState(false);
  const [keptAt, setKeptAt] = useState<string | null>(null);
  const [summary, setSummary] = useState<string | null>(null);
  const [waitingForSignal, setWaitingForSignal] = useState(false);
  const [sending, setSending] = useState(false);

  useEffect(() => {
    let live = true;
    void loadDraft(userId, excavationId).then((draft) => {
      if (!live) return;
      if (draft) {
        reset({ ...emptyValues, ...draft.values, checklist: { ...emptyValues.checklist, ...draft.values.checklist } });
        setPhotos(draft.photos);
        setClientRef(draft.clientRef);
        setKeptAt(draft.savedAt);
      }
      setLoaded(true);
    });
    return () => {
      live = false;
    };
  }, [userId, excavationId, reset]);

  // Keep every answer on the phone as it is given (until the server has the form).
  const sent = useRef(false);
  const keep = useCallback(
    async (values: FormValues, list: DraftPhoto[]) => {
      if (sent.current) return;
      const savedAt = new Date().toISOString();
      if (await saveDraft(userId, excavationId, { values, photos: list, clientRef, savedAt })) setKeptAt(savedAt);
    },
    [userId, excavationId, clientRef],
  );
  const photosRef = useRef(photos);
  photosRef.current = photos;
  useEffect(() => {
    if (!loaded) return;
    let timer: ReturnType<typeof setTimeout> | undefined;
    const sub = watch((values) => {
      clearTimeout(timer);
      timer = setTimeout(() => void keep(values as FormValues, photosRef.current), 300);
    });
    return () => {
      clearTimeout(timer);
      sub.unsubscribe();
    };
  }, [loaded, watch, keep]);
  useEffect(() => {
    if (loaded) void keep(getValues(), photos);
  }, [photos, loaded, keep, getValues]);

  const submit = handleSubmit(async (values) => {
    setSummary(null);
    setPhotoError(null);
    clearErrors();
    const parsed = inspectionInputSchema.safeParse(toInput(values, clientRef));
    if (!parsed.success) {
      const named: string[] = [];
      parsed.error.issues.forEach((issue, i) => {
        const path = fieldOf(issue.path.join('.'));
        setError(path, { type: 'schema', message: issue.message }, { shouldFocus: i === 0 });
        named.push(namedSentence(fieldLabels[path] ?? path, issue.message));
      });
      setSummary(`Not sent yet: ${named.length === 1 ? 'one answer needs' : `${named.length} answers need`} attention. ${named.join(' ')}`);
      return;
    }
    setSending(true);
    try {
      const recorded = await send(
        parsed.data,
        photos.map((p) => p.blob),
      );
      sent.current = true;
      await clearDraft(userId, excavationId);
      setWaitingForSignal(false);
      onRecorded(recorded);
    } catch (error) {
      if (isApiError(error, 0)) {
        setWaitingForSignal(true);
        setSummary(error.message);
      } else if (error instanceof ApiError) {
        const photoFields = Object.entries(error.fields).filter(([k]) => k.startsWith('photos'));
        if (photoFields.length) setPhotoError(photoFields.map(([k, v]) => namedSentence(photoLabel(k, photos), v)).join(' '));
        setSummary(
          applyServerErrors(
            new ApiError(
              error.status,
              error.code,
              error.message,
              Object.fromEntries(Object.entries(error.fields).filter(([k]) => !k.startsWith('photos'))),
            ),
            setError,
            shownFields,
            fieldLabels,
          ),
        );
      } else {
        setSummary(applyServerErrors(error, setError, shownFields, fieldLabels));
      }
    } finally {
      setSending(false);
    }
  });

  // Back in signal: send what is waiting.
  useEffect(() => {
    if (!waitingForSignal) return;
    const again = () => void submit();
    window.addEventListener('online', again);
    return () => window.removeEventListener('online', again);
  }, [waitingForSignal, submit]);

  const reason = watch('reason');
  const outcome = watch('outcome');
  const answers = watch('checklist');
  const anyFail = Object.values(answers ?? {}).some((a) => a.answer === 'fail');

  if (!loaded) return <p role="status">Opening the form…</p>;
  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-6" aria-label={`Inspection of ${reference}`}>
      <FormSummary message={summary} />

      <ChoiceGroup legend="Why" choices={reasonChoices} columns={1} error={errors.reason?.message} registration={register('reason')} />
      {reason && reason !== 'shift-start' ? (
        <TextAreaField
          label="What happened"
          hint="The rain, strike, vibration or fall that makes this inspection needed."
          error={errors.reasonDetail?.message}
          maxLength={max.reasonDetail}
          {...register('reasonDetail')}
        />
      ) : null}

      <section aria-labelledby="checks-heading" className="flex flex-col gap-5">
        <div>
          <h2 id="checks-heading" className="text-xl font-bold">
            Checks
          </h2>
          <p className="text-ink-soft">Answer each one. A fail needs a note saying what is wrong.</p>
        </div>
        {checklist.map((c) => {
          const e = errors.checklist?.[c.key];
          const failed = answers?.[c.key]?.answer === 'fail';
          return (
            <div key={c.key} className="rounded-lg border border-rule bg-sheet p-4">
              <ChoiceGroup
                legend={c.label}
                hint={c.prompt}
                choices={answerChoices}
                error={e?.answer?.message}
                registration={register(`checklist.${c.key}.answer`)}
              >
                <TextAreaField
                  label={`${c.label} note`}
                  hint={failed ? 'Required: what is wrong, and where.' : 'Optional.'}
                  error={e?.note?.message}
                  maxLength={noteMax}
                  {...register(`checklist.${c.key}.note`)}
                />
              </ChoiceGroup>
            </div>
          );
        })}
      </section>

      <PhotoPicker photos={photos} onChange={setPhotos} error={photoError} onError={setPhotoError} max={MAX_PHOTOS} />

      <TextField
        label="Time of the inspection"
        type="datetime-local"
        hint="Leave empty for now. Set it only if you inspected earlier (up to 12 hours ago)."
        error={errors.inspectedAt?.message}
        {...register('inspectedAt')}
      />

      <ChoiceGroup
        legend="Outcome"
        choices={outcomeChoices}
        columns={2}
        error={errors.outcome?.message}
        registration={register('outcome')}
      />
      <TextAreaField
        label="Remarks"
        rows={3}
        hint={
          outcome === 'not-safe'
            ? 'Required: what must be put right before anyone works in or beside it.'
            : anyFail && outcome === 'safe'
              ? 'Required: why it is safe to work although a check failed (e.g. put right before work).'
              : 'Optional.'
        }
        error={errors.remarks?.message}
        maxLength={max.remarks}
        {...register('remarks')}
      />

      {outcome === 'not-safe' ? (
        <p className="rounded-md border-2 border-safety-red bg-sheet px-4 py-3 font-semibold">
          Recording “not safe” suspends every live permit on {reference} at once and e-mails the site’s supervisors and coordinators.
        </p>
      ) : null}

      <div className="flex flex-col gap-2">
        <Button type="submit" className="min-h-14 w-full text-lg" busy={sending} busyText="Sending…">
          {waitingForSignal ? 'Send again' : 'Record the inspection'}
        </Button>
        <p role="status" className="text-sm text-ink-soft">
          {keptAt
            ? `Your answers are kept on this phone (last at ${new Date(keptAt).toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit' })}) until they are sent.`
            : ''}
        </p>
      </div>
    </form>
  );
}

function photoLabel(field: string, photos: DraftPhoto[]): string {
  const m = /^photos\[(\d+)\]$/.exec(field);
  return m ? `Photo ${Number(m[1]) + 1} (${photos[Number(m[1])]?.name ?? 'unnamed'})` : 'Photos';
}
