import { describe, expect, it } from 'vitest';
import { prepareCheck } from './check';
import { blanketEffect } from './loads';
import { runCheck, solveStandoff } from './index';
import { standoffSolver } from './standoff';
import { sixRequest, withExcavation, withLoads } from './test-fixtures';
import type { CheckRequest, PlacedLoad } from './types';

function solverFor(req: CheckRequest) {
  const ctx = prepareCheck(req);
  const blankets = req.loads.flatMap((l) => (l.kind === 'blanket' ? [blanketEffect(ctx.model, l.pressure)] : []));
  return standoffSolver(ctx, blankets);
}

describe('standoff (engineering.md §5)', () => {
  it('the §6 strip: its band may cover at most 0.5 m of the 3 m, so d ≥ 2.5 m (hand calculation; common practice, no published source)', () => {
    const req = sixRequest();
    const load = req.loads[0] as PlacedLoad;
    expect(solveStandoff(req, load)).toBe(2.5);
    const s = solverFor(req);
    expect(s.passesAt(load, 2.5)).toBe(true);
    expect(s.passesAt(load, 2.49)).toBe(false);
    expect(s.passesAt(load, 2.48)).toBe(false);
  });

  it('a blanket counts with the load: 5 kPa of 10 used leaves a band of 0.25 m, d ≥ 2.75 m (hand calculation; common practice, no published source)', () => {
    const req = withLoads(sixRequest(), [...sixRequest().loads, { id: 't', kind: 'blanket', pressure: 5 }]);
    expect(runCheck(req).loads[0].standoff).toBe(2.75);
  });

  it('a light load stands at the minimum clearance, 0.6 m (OSHA 29 CFR 1926.651(j)(2))', () => {
    const req = withLoads(sixRequest(), [{ id: 'light', kind: 'strip', pressure: 5, width: 1, offset: 2 }]);
    expect(runCheck(req).loads[0].standoff).toBe(0.6);
  });

  it('no offset within 3H: null, with the redesign message', () => {
    const req = withLoads(withExcavation(sixRequest({ method: 'elastic' }), { designSurcharge: 1 }), [
      { id: 'heavy', kind: 'strip', pressure: 1000, width: 2, offset: 1 },
    ]);
    const r = runCheck(req);
    expect(r.loads[0].standoff).toBeNull();
    expect(r.warnings.some((w) => w.includes('heavy') && w.includes('redesigned or the load reduced'))).toBe(true);
  });

  it('blankets have no standoff', () => {
    const req = withLoads(sixRequest(), [{ id: 't', kind: 'blanket', pressure: 5 }]);
    expect(runCheck(req).loads[0].standoff).toBeNull();
  });

  it('with a rated pressure the standoff is where the largest total also fits (hand calculation; common practice, no published source)', () => {
    // Rated 30 kPa: the total at the band bottom b is 19·b/3 + 20 ≤ 30 only for b ≤ 1.58 m (d ≤ 0.58 m),
    // while the force limit needs d ≥ 2.5 m; no offset below H satisfies both, so d ≥ H = 3 m.
    const req = withExcavation(sixRequest(), { ratedPressure: 30 });
    expect(runCheck(req).loads[0].standoff).toBe(3);
  });

  it('an elastic strip standoff passes and the centimetre closer fails', () => {
    const req = withLoads(sixRequest({ method: 'elastic' }), [{ id: 'road', kind: 'strip', pressure: 20, width: 3, offset: 1 }]);
    const load = req.loads[0] as PlacedLoad;
    const s = solveStandoff(req, load);
    expect(s).not.toBeNull();
    const solver = solverFor(req);
    expect(solver.passesAt(load, s as number)).toBe(true);
    expect(solver.passesAt(load, (s as number) - 0.01)).toBe(false);
  });
});
