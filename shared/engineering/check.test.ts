import { describe, expect, it } from 'vitest';
import { runCheck } from './index';
import { SIX_PROFILE_TOP, SIX_RESULT, sixExcavation, sixRequest, withExcavation, withLoads } from './test-fixtures';
import type { SoilLayer } from './types';

describe('the check (docs/calculation.md, "The check")', () => {
  it('worked example 1 gives its result (docs/calculation.md; a hand check, common practice, no published source)', () => {
    const r = runCheck(sixRequest());
    expect(r).toMatchObject(SIX_RESULT);
    expect(r.profile[0]).toEqual(SIX_PROFILE_TOP);
    expect(r.caution).toMatch(/competent temporary works/);
  });

  it('works the soil out again when a layer of a list frozen only on the outside changes in place (Rankine: ½·Ka·γ·H², Ka = 1/3 for φ′ = 30°)', () => {
    // A frozen excavation and soil list are taken as unchanged when seen again (prepareCheck), but only
    // when every layer is frozen too. Dry sand, H = 3 m: ½ × 1/3 × 19 × 9 = 28.5 kN/m, then γ = 21: 31.5.
    const layer: SoilLayer = { top: 0, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 30, cohesion: 0 };
    const req = sixRequest({ excavation: Object.freeze(sixExcavation()), soil: Object.freeze([layer]) as SoilLayer[] });
    expect(runCheck(req, { standoffs: false }).forces.soil).toBeCloseTo(28.5, 3);
    layer.unitWeight = 21;
    expect(runCheck(req, { standoffs: false }).forces.soil).toBeCloseTo(31.5, 3);
  });

  it('profile depths are exact multiples of the step, ending at H (docs/calculation.md, "The check")', () => {
    const r = runCheck(withExcavation(sixRequest({ step: 0.05 }), { depth: 2.97 }), { standoffs: false });
    const zs = r.profile.map((p) => p.z);
    expect(zs.slice(0, 4)).toEqual([0, 0.05, 0.1, 0.15]);
    expect(zs[zs.length - 1]).toBe(2.97);
    expect(zs[zs.length - 2]).toBe(2.95);
    for (const z of zs) expect(String(z).length).toBeLessThanOrEqual(4);
  });

  it('zero design allowance with a surcharge: utilisation null, fails, and says so (docs/calculation.md, "The check")', () => {
    const r = runCheck(withExcavation(sixRequest(), { designSurcharge: 0 }));
    expect(r.utilisation).toBeNull();
    expect(r.passes).toBe(false);
    expect(r.warnings.some((w) => w.includes('no surcharge allowance'))).toBe(true);
    // With no allowance the strip may only stand where it no longer reaches: at H (hand reasoning).
    expect(r.loads[0].standoff).toBe(3);
  });

  it('zero design allowance and no surcharge reaching the support: utilisation 0, passes', () => {
    const r = runCheck(
      withLoads(withExcavation(sixRequest(), { designSurcharge: 0 }), [{ id: 'far', kind: 'strip', pressure: 60, width: 1, offset: 4 }]),
    );
    expect(r.utilisation).toBe(0);
    expect(r.passes).toBe(true);
  });

  it('a rated pressure that governs: max total 12.667 + 20 = 32.667 kPa at 2 m over 10 kPa (hand calculation; common practice, no published source)', () => {
    const r = runCheck(withExcavation(sixRequest(), { ratedPressure: 10 }));
    expect(r.maxTotalPressure).toBe(32.667);
    expect(r.utilisation).toBe(3.267);
    expect(r.governing).toBe('rated-pressure');
    expect(r.passes).toBe(false);
  });

  it('a rated pressure that does not govern leaves U = 2.0 (hand calculation; common practice, no published source)', () => {
    const r = runCheck(withExcavation(sixRequest(), { ratedPressure: 40 }));
    expect(r.utilisation).toBe(2);
    expect(r.governing).not.toBe('rated-pressure');
  });

  it('a rated pressure is checked at a band edge that falls between grid points', () => {
    // Band 1.02..1.04 m lies wholly between the 0.05 m grid points; 600 kPa·K = 200 kPa
    // (hand calculation, Rankine K = 1/3 for φ′ = 30° as in Craig's Soil Mechanics).
    const req = withLoads(withExcavation(sixRequest(), { ratedPressure: 100 }), [
      { id: 'thin', kind: 'strip', pressure: 600, width: 0.02, offset: 1.02 },
    ]);
    const r = runCheck(req, { standoffs: false });
    expect(r.profile.every((p) => p.surcharge === 0)).toBe(true);
    expect(r.maxTotalPressure).toBeCloseTo(200 + (19 * 1.04) / 3, 3);
  });

  it('Coulomb wall friction applies once: a blanket gives Ka·cos δ·q, not a further cos δ (docs/calculation.md, "Soil and water")', () => {
    const req = withLoads(withExcavation(sixRequest(), { wallFriction: 20 }), [{ id: 't', kind: 'blanket', pressure: 10 }]);
    const r = runCheck(req);
    expect(r.coefficients[0].K).toBe(0.2794); // Das, from memory
    expect(r.forces.surcharge).toBeCloseTo(0.279384 * 10 * 3, 3); // K·q·H, K = 0.2794 as above
  });

  it('elastic method: area loads analysed as strips say so, blankets still K·q (docs/calculation.md, "Elastic solutions")', () => {
    const req = withLoads(sixRequest({ method: 'elastic' }), [
      { id: 'mat', kind: 'area', pressure: 60, width: 1, length: 2, offset: 1 },
      { id: 't', kind: 'blanket', pressure: 10 },
    ]);
    const r = runCheck(req);
    expect(r.warnings.some((w) => w.includes('mat') && w.includes('strip'))).toBe(true);
    expect(r.loads[0]).toMatchObject({ top: 0, bottom: 3 });
    // Jarquio via Das: (60/90)·3·(atan(2/3) − atan(1/3)) in degrees = 26.3176 kN/m
    expect(r.loads[0].force).toBeCloseTo(((60 / 90) * 3 * ((Math.atan(2 / 3) - Math.atan(1 / 3)) * 180)) / Math.PI, 3);
    expect(r.loads[1].force).toBe(10);
  });

  it('a load inside the minimum clearance is flagged', () => {
    const r = runCheck(withLoads(sixRequest(), [{ id: 'close', kind: 'strip', pressure: 1, width: 1, offset: 0.2 }]));
    expect(r.warnings.some((w) => w.includes('close') && w.includes('minimum clearance'))).toBe(true);
  });
});
