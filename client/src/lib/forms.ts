import type { FieldErrors, FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { setPlainMessages } from '@shared/schemas/messages';
import { ApiError, errorMessage } from './api';
import { fieldSentence } from './sentences';
import { fieldLabel, serverSummary } from './fieldLabels';

export { fieldSentence };

/**
 * Puts the server's field reasons under the matching form fields and returns the sentence for the
 * form's summary (`serverSummary`: reasons for fields the form does not show are spelt out there, by
 * the one label mapping unless `labels` names them, so none is lost and none is said twice).
 * Never resets the form: what the person typed stays.
 */
export function applyServerErrors<T extends FieldValues>(
  error: unknown,
  setError: UseFormSetError<T>,
  shownFields: readonly Path<T>[],
  labels: Partial<Record<Path<T>, string>> = {},
): string {
  if (!(error instanceof ApiError)) return errorMessage(error);
  // The server names list items as `soil[0].top`; react-hook-form as `soil.0.top`.
  const formName = (serverName: string) => serverName.replace(/\[(\d+)\]/g, '.$1');
  const isShown = (serverName: string) => {
    const name = formName(serverName);
    return (shownFields as readonly string[]).includes(name) || (shownFields as readonly string[]).includes(name.split('.')[0]);
  };
  for (const [serverName, reason] of Object.entries(error.fields)) {
    if (isShown(serverName)) setError(formName(serverName) as Path<T>, { type: 'server', message: reason });
  }
  return serverSummary(error, isShown, (k) => labels[formName(k) as Path<T>] ?? fieldLabel(k));
}

/**
 * react-hook-form's nested errors as flat reasons named as the API names fields (`loads[0].height`,
 * `dig.servicesChecks.drawings.by`), so a page reads its form's own refusals and the server's alike.
 */
export function errorPaths(errors: FieldErrors): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (node: unknown, path: string) => {
    if (!node || typeof node !== 'object') return;
    const own = (node as { message?: unknown }).message;
    if (path && typeof own === 'string' && own) out[path] = own;
    for (const [k, v] of Object.entries(node)) {
      if (k === 'ref' || k === 'type' || k === 'types' || k === 'message') continue;
      const key = k === 'root' ? path : Array.isArray(node) ? `${path}[${k}]` : path ? `${path}.${k}` : k;
      walk(v, key);
    }
  };
  walk(errors, '');
  return out;
}

/** Plain reasons for the cases the shared schemas leave to zod's defaults (shared/schemas/messages.ts). */
export function configureFormMessages() {
  setPlainMessages();
}

// Every form that validates with the shared schemas imports this module, so the messages are set
// before the first check (and zod stays out of pages without forms, e.g. the phone view).
configureFormMessages();

/** Zod wrappers that hold the field's own schema (default, optional, nullable; a transform's input). */
type Wrapped = { unwrap?: () => unknown; in?: unknown; maxLength?: number | null };

/**
 * The most characters each text field of a shared schema's shape takes (its zod `.max`), for the
 * inputs' `maxLength`: the browser stops typing where the server would refuse.
 * `maxLengths(excavationFields).reference` → 40.
 */
export function maxLengths<K extends string>(shape: Record<K, unknown>): Partial<Record<K, number>> {
  const out: Partial<Record<K, number>> = {};
  for (const key of Object.keys(shape) as K[]) {
    let s = shape[key] as Wrapped | undefined;
    for (let depth = 0; s && s.maxLength === undefined && depth < 5; depth++)
      s = (typeof s.unwrap === 'function' ? s.unwrap() : s.in) as Wrapped;
    if (typeof s?.maxLength === 'number') out[key] = s.maxLength;
  }
  return out;
}
