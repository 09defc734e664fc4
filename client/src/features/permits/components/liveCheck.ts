import { CheckInputError, isRefused, PlacementError, type Refused } from '@shared/permits/check';
import type { PermitCheck } from '@shared/schemas/permits';
import { fieldLabel } from '@client/lib/fieldLabels';

/** What the live check panel shows: a check, a placement it refuses (red), or why it cannot check yet (grey, never a verdict). */
export interface LiveOutcome {
  check: PermitCheck | null;
  refused: string | null;
  invalid: string | null;
}

/**
 * Runs the live check and words its refusals. Figures the shared schemas refuse (the same the server
 * refuses) give "Cannot check: <field as the form labels it> <reason>.", so a stockpile of unit
 * weight −19 or with no height never shows "Passes" or NaN.
 */
export function liveOutcome(run: () => PermitCheck | Refused): LiveOutcome {
  try {
    const outcome = run();
    if (isRefused(outcome)) return { check: null, refused: outcome.message, invalid: null };
    return { check: outcome, refused: null, invalid: null };
  } catch (e) {
    if (e instanceof CheckInputError)
      return { check: null, refused: null, invalid: `Cannot check: ${checkFieldWords(e.field)} ${e.reason}.` };
    if (e instanceof PlacementError) return { check: null, refused: e.message, invalid: null };
    return { check: null, refused: 'A load could not be placed: check its figures.', invalid: null };
  }
}

/** `loads[0].height` → "Load 1: Height (m)"; an excavation's figure "TR-01 soil[0].cohesion" → "TR-01 Layer 1 cohesion (kPa)". */
function checkFieldWords(field: string): string {
  const own = field.match(/^(\S+) (.+)$/);
  return own && !own[1].startsWith('loads[') ? `${own[1]} ${fieldLabel(own[2])}` : fieldLabel(field);
}
