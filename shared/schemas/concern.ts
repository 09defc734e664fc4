/**
 * A concern's limits and the reason a note is refused, without zod: the phone view checks a concern
 * with these before keeping it (so its bundle carries no schema library), and the server's
 * concernFormSchema (field.ts) applies the same rules.
 */

export const CONCERN_NOTE_MAX = 2000;
/** Photos per concern, and the largest photo the server takes (bytes); the phone shrinks larger ones first. */
export const CONCERN_PHOTOS_MAX = 3;
export const CONCERN_PHOTO_BYTES_MAX = 10 * 1024 * 1024;

/** Why a concern's note (already trimmed) is refused, or null when it is fine. */
export function concernNoteReason(note: string): string | null {
  if (note.length < 1) return 'is required: say what you saw';
  if (note.length > CONCERN_NOTE_MAX) return `must be at most ${CONCERN_NOTE_MAX} characters`;
  return null;
}
