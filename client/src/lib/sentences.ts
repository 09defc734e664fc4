/** Field reasons as sentences (no zod here: the phone view uses it too). */

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
