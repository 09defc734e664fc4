import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { z } from 'zod';
import { ApiError, errorMessage } from './api';

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

const continuesLabel = /^(is|are|was|were|must|should|does|do|did|has|have|had|can|cannot|may|needs?|already)\b/;

/**
 * Reasons from the shared schemas mostly read on from the field's name ("is required", "must be …");
 * joined with the label they make a sentence: "E-mail is required." Any other reason is shown as a
 * sentence of its own ("Give both a site and a role, or neither.").
 */
export function fieldSentence(label: string, reason: string): string {
  const text = reason.trim();
  const sentence = continuesLabel.test(text) ? `${label} ${text}` : text.charAt(0).toUpperCase() + text.slice(1);
  return /[.!?]$/.test(sentence) ? sentence : `${sentence}.`;
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
