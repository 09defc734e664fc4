import { useEffect, useId, useRef, useState } from 'react';
import { CONCERN_NOTE_MAX, CONCERN_PHOTOS_MAX, concernNoteReason } from '@shared/schemas/concern';
import { PHOTO_BYTES_MAX, PHOTO_TYPES } from '@client/lib/photos';
import { Button } from '@client/components/Button';
import { FormSummary } from '@client/components/Fields';
import { fieldsSummary } from '@client/lib/fieldLabels';
import { fieldSentence } from '@client/lib/sentences';
import { newIdempotencyKey } from '@client/lib/random';
import { addToOutbox, discardItem, type ConcernItem, type OutboxPhoto } from '../offline/outbox';
import { preparePhoto } from '../offline/photos';
import {
  concernField,
  concernLabel,
  concernLabels as labels,
  concernRefusal,
  type ConcernField,
  type CorrectingProps,
} from '../lib/concernFields';
import { useFieldPerson } from './FieldGate';
import { useFieldOutbox } from './FieldLayout';

/** Each field's message as a sentence naming it ("What you saw is required: say what you saw."). */
type Errors = Partial<Record<ConcernField, string>>;

function Problem({ id, field, errors }: { id: string; field: ConcernField; errors: Errors }) {
  const sentence = errors[field];
  return sentence ? (
    <p id={id} className="font-semibold text-error-text">
      {sentence}
    </p>
  ) : null;
}

/** A concern the server refused, as the form shows it: each reason next to its field, and the summary. */
function refusedConcernErrors(item: Pick<ConcernItem, 'fields'>): Errors {
  const errors: Errors = {};
  for (const [path, reason] of Object.entries(item.fields ?? {})) {
    const field = concernField(path);
    if (field) errors[field] ??= fieldSentence(concernLabel(path), reason);
  }
  return errors;
}

/**
 * Report a concern: which excavation, a note and photos from the camera. It goes into the outbox on
 * the phone first (never lost), and is sent now or when the signal returns; the coordinators and
 * supervisors are e-mailed and it shows on the permit's timeline.
 */
export function ConcernForm({ permit, correcting, onCorrect }: CorrectingProps) {
  const person = useFieldPerson();
  const { items, send } = useFieldOutbox();
  const ids = { note: useId(), photo: useId(), exc: useId() };
  const only = permit.excavations.length === 1 ? permit.excavations[0].id : null;
  const [excavationId, setExcavationId] = useState<number | null>(only);
  const [note, setNote] = useState('');
  const [photos, setPhotos] = useState<OutboxPhoto[]>([]);
  const [errors, setErrors] = useState<Errors>({});
  const [summary, setSummary] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [done, setDone] = useState<string | null>(null);
  /** The concern this form kept last: if the server refuses it, it comes back here at once. */
  const lastKept = useRef<string | null>(null);
  const loaded = useRef<string | null>(null);

  const refused = items.filter((i): i is ConcernItem => i.kind === 'concern' && i.permitId === permit.id && i.state === 'refused');
  const backNow = refused.find((i) => i.key === lastKept.current);
  useEffect(() => {
    if (backNow && correcting !== backNow.key) {
      lastKept.current = null;
      onCorrect(backNow.key);
    }
  }, [backNow, correcting, onCorrect]);

  // A refused concern put back: what was sent, each reason next to its field, the summary focused.
  const toCorrect = refused.find((i) => i.key === correcting);
  useEffect(() => {
    if (correcting === null && loaded.current) {
      // Discarded in the list: what is typed stays, the refusal goes.
      loaded.current = null;
      setErrors({});
      setSummary(null);
    }
    if (!toCorrect || loaded.current === toCorrect.key) return;
    loaded.current = toCorrect.key;
    setExcavationId(permit.excavations.some((x) => x.id === toCorrect.excavationId) ? toCorrect.excavationId : only);
    setNote(toCorrect.note);
    setPhotos(toCorrect.photos);
    setDone(null);
    const next = refusedConcernErrors(toCorrect);
    setErrors(next);
    setSummary(
      `Brink did not accept this concern. ${concernRefusal(toCorrect, true)} Send it again when it is right, or discard it in the list below.`,
    );
  }, [toCorrect, correcting, permit.excavations, only]);

  async function addPhotos(files: FileList | null) {
    if (!files?.length) return;
    setErrors((e) => ({ ...e, photo: undefined }));
    const photoProblem = (reason: string) => setErrors((e) => ({ ...e, photo: fieldSentence(labels.photo, reason) }));
    const room = CONCERN_PHOTOS_MAX - photos.length;
    if (files.length > room) {
      photoProblem(`can be at most ${CONCERN_PHOTOS_MAX} per concern`);
      return;
    }
    const ready: OutboxPhoto[] = [];
    for (const f of Array.from(files)) {
      if (!f.type.startsWith('image/')) {
        photoProblem('must be a photo (PNG or JPEG)');
        return;
      }
      const p = await preparePhoto(f);
      if (!PHOTO_TYPES.includes(p.type)) {
        photoProblem('must be a PNG or JPEG photo');
        return;
      }
      if (p.data.byteLength > PHOTO_BYTES_MAX) {
        photoProblem('is larger than 10 MB even after shrinking');
        return;
      }
      ready.push(p);
    }
    setPhotos((old) => [...old, ...ready]);
  }

  async function submit() {
    setDone(null);
    // The rules of the server's concernFormSchema, without zod (see shared/schemas/concern.ts).
    const text = note.trim();
    const excavation = permit.excavations.find((e) => e.id === Number(excavationId ?? NaN));
    const next: Record<string, string> = {};
    if (!excavation) next.excavationId = 'is required: choose the excavation';
    const noteReason = concernNoteReason(text);
    if (noteReason) next.note = noteReason;
    if (!excavation || noteReason) {
      setErrors(refusedConcernErrors({ fields: next }));
      setSummary(fieldsSummary(next, () => true));
      return;
    }
    setBusy(true);
    const key = newIdempotencyKey();
    try {
      await addToOutbox(key, person.id, permit, {
        kind: 'concern',
        excavationId: excavation.id,
        excavationReference: excavation.reference,
        note: text,
        photos,
      });
    } catch {
      setErrors({});
      setSummary(
        'This phone could not keep the concern (its storage is full or blocked). Nothing was sent; your note is still here. Try again, or phone the coordinator.',
      );
      setBusy(false);
      return;
    }
    // The corrected concern replaces the refused one it was made from.
    if (correcting) {
      await discardItem(correcting).catch(() => undefined);
      onCorrect(null);
    }
    lastKept.current = key;
    send();
    setNote('');
    setPhotos([]);
    setExcavationId(only);
    setErrors({});
    setSummary(null);
    setBusy(false);
    setDone(
      `Your concern about ${excavation.reference} is kept on this phone and is being sent. It stays in the list below until the server has it.`,
    );
  }

  if (!permit.excavations.length) return null;
  return (
    <section aria-labelledby="concern-title" className="flex flex-col gap-4 rounded-md border-2 border-ink bg-sheet p-4">
      <h2 id="concern-title" className="text-2xl font-bold">
        Report a concern
      </h2>
      <p>
        A crack at the edge, water coming in, a support that moved, a load too close: say what you saw. The coordinator and the supervisor
        are e-mailed.
      </p>
      <FormSummary message={summary} />
      <form
        noValidate
        className="flex flex-col gap-4"
        onSubmit={(e) => {
          e.preventDefault();
          void submit();
        }}
      >
        <fieldset aria-describedby={errors.excavationId ? `${ids.exc}-e` : undefined}>
          <legend className="mb-2 font-semibold">{labels.excavationId}</legend>
          <div className="flex flex-col gap-2">
            {permit.excavations.map((x) => (
              <label
                key={x.id}
                className="flex min-h-12 items-center gap-3 rounded-md border-2 border-rule-strong px-3 has-[:checked]:border-ink has-[:checked]:bg-accent-wash"
              >
                <input
                  type="radio"
                  name="excavation"
                  className="size-6 accent-accent"
                  checked={excavationId === x.id}
                  onChange={() => setExcavationId(x.id)}
                />
                <span>
                  <strong>{x.reference}</strong> {x.name}
                </span>
              </label>
            ))}
          </div>
          <Problem id={`${ids.exc}-e`} field="excavationId" errors={errors} />
        </fieldset>

        <div className="flex flex-col gap-1">
          <label htmlFor={ids.note} className="font-semibold">
            {labels.note}
          </label>
          <textarea
            id={ids.note}
            rows={4}
            maxLength={CONCERN_NOTE_MAX}
            value={note}
            onChange={(e) => setNote(e.target.value)}
            aria-invalid={errors.note ? true : undefined}
            aria-describedby={errors.note ? `${ids.note}-e` : undefined}
            className="w-full rounded-md border-2 border-rule-strong bg-sheet px-3 py-2 text-lg text-ink focus-visible:border-accent aria-[invalid=true]:border-error-text"
          />
          <Problem id={`${ids.note}-e`} field="note" errors={errors} />
        </div>

        <div className="flex flex-col gap-2">
          <span className="font-semibold">
            {labels.photo} (up to {CONCERN_PHOTOS_MAX}, optional)
          </span>
          <input
            id={ids.photo}
            type="file"
            accept="image/*"
            capture="environment"
            className="peer sr-only"
            aria-describedby={errors.photo ? `${ids.photo}-e` : undefined}
            onChange={(e) => {
              void addPhotos(e.target.files);
              e.target.value = '';
            }}
            disabled={photos.length >= CONCERN_PHOTOS_MAX}
          />
          <label
            htmlFor={ids.photo}
            className="inline-flex min-h-14 cursor-pointer items-center justify-center rounded-md border-2 border-accent bg-sheet px-4 text-xl font-semibold text-accent peer-focus-visible:outline peer-focus-visible:outline-3 peer-focus-visible:outline-accent peer-disabled:opacity-60"
          >
            {photos.length ? 'Take another photo' : 'Take a photo'}
          </label>
          <Problem id={`${ids.photo}-e`} field="photo" errors={errors} />
          {photos.length ? (
            <ul className="flex flex-col gap-2">
              {photos.map((p, i) => (
                <li key={i} className="flex items-center justify-between gap-3">
                  <span>
                    Photo {i + 1}: {(p.data.byteLength / 1024).toFixed(0)} kB
                  </span>
                  <Button variant="quiet" className="min-h-12" onClick={() => setPhotos((all) => all.filter((_, k) => k !== i))}>
                    Remove photo {i + 1}
                  </Button>
                </li>
              ))}
            </ul>
          ) : null}
        </div>

        <Button type="submit" className="min-h-16 w-full text-xl" busy={busy} busyText="Keeping it on the phone…">
          Send the concern
        </Button>
        <div role="status" aria-live="polite">
          {done ? <p className="rounded-md border-2 border-ink bg-accent-wash px-4 py-3">{done}</p> : null}
        </div>
      </form>
    </section>
  );
}
