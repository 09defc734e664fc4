import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { z } from 'zod';
import { ApiError, errorMessage } from './api';
import { fieldSentence } from './sentences';

export { fieldSentence };

/**
 * Puts the server's field reasons under the matching form fields and returns the sentence for the
 * form's summary. Reasons for fields the form does not show are added to the summary, so none is lost.
 * Never resets the form: what the person typed stays.
 */
export function applyServerErrors<T extends FieldValues>(
  error: unknown,
  setError: UseFormSetError<T>,
  shownFields: readonly Path<T>[],
  labels: Partial<Record<Path<T>, string>> = {},
): string {
  if (!(error instanceof ApiError)) return errorMessage(error);
  const unshown: string[] = [];
  for (const [serverName, reason] of Object.entries(error.fields)) {
    // The server names list items as `soil[0].top`; react-hook-form as `soil.0.top`.
    const name = serverName.replace(/\[(\d+)\]/g, '.$1');
    if ((shownFields as readonly string[]).includes(name) || (shownFields as readonly string[]).includes(name.split('.')[0])) {
      setError(name as Path<T>, { type: 'server', message: reason });
    } else {
      unshown.push(fieldSentence(labels[name as Path<T>] ?? name, reason));
    }
  }
  return [error.message, ...unshown].join(' ');
}

let configured = false;

/** Plain reasons for the cases the shared schemas leave to zod's defaults (an empty number box). */
export function configureFormMessages() {
  if (configured) return;
  configured = true;
  z.config({
    customError: (issue) => {
      if (issue.code === 'invalid_type') {
        if (issue.input === undefined || issue.input === null || issue.input === '') return 'is required';
        if (issue.expected === 'number') return 'must be a number';
      }
      return undefined;
    },
  });
}

// Every form that validates with the shared schemas imports this module, so the messages are set
// before the first check (and zod stays out of pages without forms, e.g. the phone view).
configureFormMessages();
