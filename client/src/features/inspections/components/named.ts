import { fieldSentence } from '@client/lib/forms';

/**
 * A field's reason as a sentence that always names the field: "Remarks is required…" reads on
 * from the label; "choose pass, fail or not applicable" gets it in front ("Water: choose…").
 */
export function namedSentence(label: string, reason: string): string {
  const s = fieldSentence(label, reason);
  return s.startsWith(label) ? s : `${label}: ${reason.trim().replace(/[.!?]?$/, '.')}`;
}
