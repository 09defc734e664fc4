import { fieldSentence } from '@client/lib/sentences';
import { Button } from './Button';

type RowErrors = Record<string, { message?: string } | undefined> | undefined;
interface ArrayErrors {
  message?: string;
  root?: { message?: string };
  [index: number]: RowErrors;
}

/**
 * The reasons react-hook-form holds for an editable list (soil layers, bearing elements) as sentences:
 * the list's own ("the shares must add up to 1") first, then each row's fields by their names.
 */
export function listErrorMessages(
  errors: ArrayErrors | undefined,
  rows: number,
  listLabel: string,
  rowLabel: (i: number, field: string) => string,
): string[] {
  if (!errors) return [];
  const out: string[] = [];
  for (const m of [errors.message, errors.root?.message]) if (m) out.push(fieldSentence(listLabel, m));
  for (let i = 0; i < rows; i++) {
    for (const [k, v] of Object.entries(errors[i] ?? {})) if (v?.message) out.push(fieldSentence(rowLabel(i, k), v.message));
  }
  return out;
}

/** The reasons under an editable list. */
export function ListErrors({ messages }: { messages: string[] }) {
  if (messages.length === 0) return null;
  return (
    <ul className="text-sm font-semibold text-error-text">
      {messages.map((m) => (
        <li key={m}>{m}</li>
      ))}
    </ul>
  );
}

/** "Remove" at the end of a row of an editable list; its accessible name says which row. */
export function RemoveRowButton({ label, onClick }: { label: string; onClick: () => void }) {
  return (
    <Button variant="quiet" className="min-h-9 px-2" aria-label={label} onClick={onClick}>
      Remove
    </Button>
  );
}
