import { describe, expect, it } from 'vitest';
import { exclusionDistance, exclusionReason } from './exclusion';

// The rule the phone and the permit page share (docs/phone-offline.md). The figures are invented
// to tell the branches apart; the rule is the product's own ("common practice, no published
// source": the coordinator's figure governs, else the check's, else 3H, never below the clearance).

function rev(standoff: number | null, perExcavation: number | null, action: 'approve' | 'return' = 'approve') {
  return {
    decision: { action, standoff },
    check: { computedStandoff: perExcavation, excavations: [{ excavationId: 7, standoff: perExcavation }] },
  };
}

describe('exclusionDistance', () => {
  it('takes the standoff the coordinator set', () => {
    expect(exclusionDistance(rev(3.5, 1.48), 7, 0.5, 2)).toEqual({ distance: 3.5, basis: 'set' });
  });
  it('approved as placed: the standoff the check computed for that excavation, said as such', () => {
    expect(exclusionDistance(rev(null, 1.48), 7, 0.5, 2)).toEqual({ distance: 1.48, basis: 'computed' });
    expect(exclusionReason('computed')).toMatch(/^no standoff was set \(approved as placed\)/);
  });
  it('no standoff found: the whole reach of the check, 3H', () => {
    expect(exclusionDistance(rev(null, null), 7, 0.5, 2)).toEqual({ distance: 6, basis: 'whole-reach' });
  });
  it('never below the site’s least clearance', () => {
    expect(exclusionDistance(rev(null, 0.2), 7, 0.5, 2)).toEqual({ distance: 0.5, basis: 'clearance' });
    expect(exclusionDistance(rev(0.3, 1.48), 7, 0.5, 2)).toEqual({ distance: 0.5, basis: 'clearance' });
  });
  it('nothing before approval', () => {
    expect(exclusionDistance(rev(3.5, 1.48, 'return'), 7, 0.5, 2)).toBeNull();
  });
});
