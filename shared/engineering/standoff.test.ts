import { describe, expect, it } from 'vitest';
import { prepareCheck } from './check';
import { blanketEffect } from './loads';
import { loadBreakpoints, runCheck, solveStandoff } from './index';
import { standoffSolver } from './standoff';
import { sixRequest, withExcavation, withLoads } from './test-fixtures';
import type { CheckRequest, PlacedLoad } from './types';

function solverFor(req: CheckRequest) {
  const ctx = prepareCheck(req);
  const blankets = req.loads.flatMap((l) => (l.kind === 'blanket' ? [blanketEffect(ctx.model, l.pressure)] : []));
  return standoffSolver(ctx, blankets);
}

describe('standoff (docs/calculation.md, "Standoff")', () => {
  it('the strip of worked example 1: its band may cover at most 0.5 m of the 3 m, so d ≥ 2.5 m (hand calculation; common practice, no published source)', () => {
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

  it("under OSHA's 2 ft (0.6096 m) a light load stands at 2 ft itself, a heavy one at the centimetre beyond its last failing offset (OSHA 29 CFR 1926.651(j)(2); NIST SP 811: 1 ft = 0.3048 m)", () => {
    const light = withLoads(sixRequest(), [{ id: 'light', kind: 'strip', pressure: 5, width: 1, offset: 2 }]);
    expect(runCheck({ ...light, minimumClearance: 0.6096 }).loads[0].standoff).toBe(0.6096);
    // Worked example 1's strip: 2.5 m whatever the clearance below it.
    expect(runCheck({ ...sixRequest(), minimumClearance: 0.6096 }).loads[0].standoff).toBe(2.5);
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

  it('a 45° band meeting a rated pressure at a layer top: the pressure jumps as its near edge passes the top, and the standoff lies beyond it (hand calculation; common practice, no published source)', () => {
    // A weak sand (φ′ 20°, Ka 0.4903) over a strong one from 1.5 m (φ′ 40°, Ka 0.2174; Craig). A 90 kPa
    // strip 0.2 m wide with its near edge just above 1.5 m still presses on the weak layer's bottom:
    // 0.4903·(28.5 + 90) = 58.1 kPa; just below, only the strong layer: 0.2174·(32.3 + 90) = 26.6 kPa.
    const soil = [
      { top: 0, unitWeight: 19, frictionAngle: 20 },
      { top: 1.5, unitWeight: 19, frictionAngle: 40 },
    ];
    const req = (d: number) =>
      withLoads(withExcavation({ ...sixRequest(), soil }, { ratedPressure: 40, designSurcharge: 100 }), [
        { id: 's', kind: 'strip', pressure: 90, width: 0.2, offset: d },
      ]);
    expect(runCheck(req(1.5 - 1e-6), { standoffs: false }).maxTotalPressure).toBeCloseTo(0.4903 * 118.5, 1);
    expect(runCheck(req(1.5 + 1e-6), { standoffs: false }).maxTotalPressure).toBeCloseTo(0.2174 * 122.3, 1);
    expect(runCheck(req(1.5 - 1e-6), { standoffs: false }).passes).toBe(false);
    expect(runCheck(req(1.5 + 1e-6), { standoffs: false }).passes).toBe(true);
    const r = runCheck(req(1));
    const s = r.loads[0].standoff as number;
    expect(s).toBeGreaterThanOrEqual(1.5);
    expect(s).toBeLessThanOrEqual(1.51);
    expect(runCheck(req(s), { standoffs: false }).passes).toBe(true);
  });

  // Force and moment are continuous in the offset at every break point but the NAVFAC m = 0.4 switch:
  // the 45° band only slides across a jump in K, and the elastic strip formula is smooth.
  const layered = withExcavation(
    {
      ...sixRequest(),
      soil: [
        { top: 0, unitWeight: 18, frictionAngle: 32 },
        { top: 1.2, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 26, cohesion: 3 },
        { top: 2.1, unitWeight: 18, undrainedShearStrength: 40 },
      ],
    },
    { groundwaterDepth: 1.7, ratedPressure: 80 },
  );
  const kinds: PlacedLoad[] = [
    { id: 'strip', kind: 'strip', pressure: 40, width: 0.7, offset: 1 },
    { id: 'line', kind: 'line', force: 20, offset: 1 },
    { id: 'area', kind: 'area', pressure: 40, width: 0.9, length: 2, offset: 1 },
    { id: 'point', kind: 'point', force: 80, offset: 1, padWidth: 0.5, padLength: 0.6 },
  ];
  it.each(['dispersion-45', 'elastic'] as const)(
    '%s: force and moment are continuous across every break point but m = 0.4 (elementary continuity of the published formulas)',
    (method) => {
      const req = { ...layered, method };
      const ctx = prepareCheck(req);
      for (const load of kinds) {
        const one = (d: number) => runCheck(withLoads(req, [{ ...load, offset: d }]), { standoffs: false });
        const bps = loadBreakpoints(ctx.model, load, method).filter((b) => b > 0);
        expect(bps.length).toBeGreaterThan(3);
        for (const b of bps) {
          const lo = one(b - 1e-7);
          const hi = one(b + 1e-7);
          const jump = method === 'elastic' && (load.kind === 'line' || load.kind === 'point') && Math.abs(b - 0.4 * 3) < 1e-9;
          if (jump) {
            expect(Math.abs(hi.forces.surcharge - lo.forces.surcharge), `${load.id} at m = 0.4`).toBeGreaterThan(0.01);
          } else {
            expect(Math.abs(hi.forces.surcharge - lo.forces.surcharge), `${load.id} force at ${b}`).toBeLessThanOrEqual(0.001);
            expect(Math.abs(hi.moments.surcharge - lo.moments.surcharge), `${load.id} moment at ${b}`).toBeLessThanOrEqual(0.001);
          }
        }
      }
    },
  );

  it('a machine of two elements is searched like one load, with both elements\' break points (docs/calculation.md, "Standoff")', () => {
    const req = withLoads(layered, []);
    const ctx = prepareCheck(req);
    const solver = standoffSolver(ctx, []);
    const a: PlacedLoad = { id: 'a', kind: 'area', pressure: 60, width: 0.6, length: 3, offset: 1 };
    const b: PlacedLoad = { id: 'b', kind: 'area', pressure: 60, width: 0.6, length: 3, offset: 2.3 };
    const answer = solver.searchGroup([
      { load: a, relative: 0 },
      { load: b, relative: 1.3 },
    ]);
    const both = (d: number) =>
      runCheck(
        withLoads(req, [
          { ...a, offset: d },
          { ...b, offset: d + 1.3 },
        ]),
        { standoffs: false },
      ).passes;
    expect(answer.standoff).not.toBeNull();
    const s = answer.standoff as number;
    for (let cm = Math.round(s * 100); cm <= 900; cm += 1) expect(both(cm / 100), `${cm / 100} m`).toBe(true);
    if (s > 0.6) expect(both(s - 0.01) && answer.failingBands.every((f) => f.to < s - 0.01)).toBe(false);
  });
});
