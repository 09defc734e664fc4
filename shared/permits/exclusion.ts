import type { ExclusionBasis } from '../schemas/field';
import type { ExcavationCheck, PermitCheck, PermitDecision } from '../schemas/permits';

interface Exclusion {
  /** Distance (m) of the exclusion zone's boundary from the excavation's edge. */
  distance: number;
  basis: ExclusionBasis;
}

/**
 * The exclusion distance of one excavation under an approved revision, the one figure the operator's
 * phone and the permit page show: the coordinator's standoff when they set one,
 * else the check's standoff for that excavation; where the check found no standoff at all, the whole
 * reach of the search, 3H (never a smaller zone than the check supports); never below the site's
 * least clearance. Null before approval (nothing is permitted yet).
 */
export function exclusionDistance(
  rev: {
    decision: Pick<PermitDecision, 'action' | 'standoff'> | null;
    check: (Pick<PermitCheck, 'computedStandoff'> & { excavations: Pick<ExcavationCheck, 'excavationId' | 'standoff'>[] }) | null;
  },
  excavationId: number,
  minimumClearance: number,
  depth: number,
): Exclusion | null {
  if (rev.decision?.action !== 'approve') return null;
  const forThis = rev.check?.excavations.find((e) => e.excavationId === excavationId);
  const checked = forThis ? forThis.standoff : (rev.check?.computedStandoff ?? null);
  const own: Exclusion =
    rev.decision.standoff != null
      ? { distance: rev.decision.standoff, basis: 'set' }
      : checked !== null
        ? { distance: checked, basis: 'computed' }
        : { distance: 3 * depth, basis: 'whole-reach' };
  return own.distance < minimumClearance ? { distance: minimumClearance, basis: 'clearance' } : own;
}

/** Why the exclusion distance is what it is, in the same words on the phone and on the permit page. */
export function exclusionReason(basis: ExclusionBasis): string {
  switch (basis) {
    case 'set':
      return 'the coordinator set this standoff';
    case 'computed':
      return 'no standoff was set (approved as placed), so this is the standoff the check computed for this excavation';
    case 'whole-reach':
      return 'no standoff was set (approved as placed) and the check found none that works, so this is the whole reach of the check, 3 × the depth';
    case 'clearance':
      return 'this is the site’s least clearance from any edge, larger than the standoff';
  }
}

/**
 * The exclusion distance of one excavation as a sentence, the same on the permit page and the printed
 * permit (the phone says the first half in large type): `distance` already written in the reader's unit.
 */
export function exclusionSentence(reference: string, distance: string, basis: ExclusionBasis): string {
  return `Keep every part of the load at least ${distance} from the edge of ${reference}. Why ${distance}: ${exclusionReason(basis)}.`;
}
