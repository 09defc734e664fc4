import { fieldLabel, refusalSummary } from '@client/lib/fieldLabels';
import type { FieldPermit } from '@shared/schemas/field';
import type { ConcernItem } from '../offline/outbox';

/** The concern form's fields, as the form labels them. */
export const concernLabels = { excavationId: 'Which excavation', note: 'What you saw', photo: 'Photo' } as const;
export type ConcernField = keyof typeof concernLabels;

/** The form field a path the server names belongs to (`photo[1]` → photo), or null. */
export function concernField(path: string): ConcernField | null {
  if (path === 'excavationId' || path === 'note') return path;
  if (/^photo(\[\d+\])?$/.test(path)) return 'photo';
  return null;
}

/** A path the server names, in the form's words: `photo[1]` → "Photo 2". */
export function concernLabel(path: string): string {
  const nth = /^photo\[(\d+)\]$/.exec(path);
  if (nth) return `${concernLabels.photo} ${Number(nth[1]) + 1}`;
  const field = concernField(path);
  return field ? concernLabels[field] : fieldLabel(path);
}

/**
 * Why the server refused a kept concern, in words. `inForm`: it is back in the form, whose fields
 * show their own reasons, so only the others are spelt out.
 */
export function concernRefusal(item: Pick<ConcernItem, 'problem' | 'fields'>, inForm: boolean): string {
  return refusalSummary(
    { message: item.problem ?? '', fields: item.fields ?? {} },
    inForm ? (path) => concernField(path) !== null : () => false,
    concernLabel,
  );
}

/** The concern form and the list of concerns share which refused concern is back in the form. */
export interface CorrectingProps {
  permit: FieldPermit;
  /** The key (in the outbox) of a refused concern put back in the form to be corrected and sent again. */
  correcting: string | null;
  onCorrect: (key: string | null) => void;
}
