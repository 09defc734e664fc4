import { z } from 'zod';

let configured = false;

/**
 * Plain reasons for what the shared schemas leave to zod's defaults: an empty number box is
 * "is required", a word where a figure belongs "must be a number" (never "Invalid input: expected
 * number, received null"). Set once per process: by the server at start and by every browser form
 * (client/src/lib/forms.ts), so both sides word a refusal alike.
 */
export function setPlainMessages(): void {
  if (configured) return;
  configured = true;
  z.config({
    customError: (issue) => {
      if (issue.code === 'invalid_type') {
        if (issue.input === undefined || issue.input === null || issue.input === '') return 'is required';
        if (typeof issue.input === 'number' && Number.isNaN(issue.input)) return 'is required: type a figure';
        if (issue.expected === 'number') return 'must be a number';
      }
      return undefined;
    },
  });
}

/** "must be one of: Trench box, Hydraulic frames or Sheet piles" with the words people choose from, never the stored codes. */
export function oneOf(labels: Record<string, string>): string {
  const words = Object.values(labels);
  return `must be one of: ${words.length > 1 ? `${words.slice(0, -1).join(', ')} or ${words[words.length - 1]}` : words.join('')}`;
}
