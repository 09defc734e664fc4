import { newUuid } from '@client/lib/random';
import { useEffect, useId, useMemo, useRef } from 'react';
import type { DraftPhoto } from '../api/draft';
import { PHOTO_BYTES_MAX, PHOTO_TYPES, shrinkPhoto } from '@client/lib/photos';

/** Photos taken with the phone's camera or picked from its gallery, kept with the draft. */
export function PhotoPicker({
  photos,
  onChange,
  error,
  onError,
  max,
}: {
  photos: DraftPhoto[];
  onChange: (list: DraftPhoto[]) => void;
  error: string | null;
  onError: (message: string | null) => void;
  max: number;
}) {
  const id = useId();
  const input = useRef<HTMLInputElement>(null);
  const urls = useMemo(() => photos.map((p) => ({ id: p.id, url: URL.createObjectURL(p.blob) })), [photos]);
  useEffect(() => () => urls.forEach((u) => URL.revokeObjectURL(u.url)), [urls]);

  async function add(files: FileList | null) {
    if (!files?.length) return;
    const problems: string[] = [];
    const added: DraftPhoto[] = [];
    for (const f of Array.from(files)) {
      if (!PHOTO_TYPES.includes(f.type)) {
        problems.push(`${f.name} is not a PNG or JPEG photo.`);
        continue;
      }
      const blob = await shrinkPhoto(f); // a large photo may come back small enough
      if (!PHOTO_TYPES.includes(blob.type || f.type)) problems.push(`${f.name} is not a PNG or JPEG photo.`);
      else if (blob.size > PHOTO_BYTES_MAX) problems.push(`${f.name} is larger than 10 MB.`);
      else added.push({ id: newUuid(), name: f.name, blob });
    }
    const room = max - photos.length;
    if (added.length > room) problems.push(`At most ${max} photos go with one inspection; ${added.length - room} left out.`);
    onChange([...photos, ...added.slice(0, Math.max(room, 0))]);
    onError(problems.length ? problems.join(' ') : null);
    if (input.current) input.current.value = '';
  }

  return (
    <fieldset className="flex flex-col gap-3" aria-describedby={error ? `${id}-error` : `${id}-hint`}>
      <legend className="mb-1 text-lg font-semibold">Photos</legend>
      <p id={`${id}-hint`} className="text-ink-soft">
        PNG or JPEG, up to {max}. Large camera photos are made smaller on this phone before sending.
      </p>
      {photos.length ? (
        <ul className="grid grid-cols-2 gap-3 sm:grid-cols-4">
          {photos.map((p, i) => (
            <li key={p.id} className="flex flex-col gap-1">
              <img
                src={urls.find((u) => u.id === p.id)?.url}
                alt={`Photo ${i + 1}: ${p.name}`}
                className="aspect-[4/3] w-full rounded-md border border-rule object-cover"
              />
              <button
                type="button"
                className="min-h-11 rounded-md border border-rule-strong bg-sheet px-2 font-semibold text-accent"
                onClick={() => onChange(photos.filter((x) => x.id !== p.id))}
                aria-label={`Remove photo ${i + 1} (${p.name})`}
              >
                Remove
              </button>
            </li>
          ))}
        </ul>
      ) : null}
      {photos.length < max ? (
        <label className="inline-flex min-h-12 cursor-pointer items-center justify-center rounded-md border-2 border-accent bg-sheet px-4 font-semibold text-accent focus-within:outline focus-within:outline-3 focus-within:outline-accent">
          <input
            ref={input}
            type="file"
            accept="image/png,image/jpeg"
            capture="environment"
            multiple
            className="sr-only"
            onChange={(e) => void add(e.target.files)}
          />
          {photos.length ? 'Add another photo' : 'Add a photo'}
        </label>
      ) : null}
      {error ? (
        <p id={`${id}-error`} role="alert" className="text-sm font-semibold text-error-text">
          {error}
        </p>
      ) : null}
    </fieldset>
  );
}
