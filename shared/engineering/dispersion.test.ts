import { describe, expect, it } from 'vitest';
import { runCheck } from './index';
import { buildSoilModel, layerIndexAt } from './soil';
import { loadEffect } from './loads';
import { midpoint, sixRequest, withLoads, withSoil } from './test-fixtures';
import type { Load } from './types';

const K30 = 1 / 3; // Rankine Ka at 30° (Craig, Soil Mechanics)
const K20 = 0.4902906; // Rankine Ka at 20° (Craig, Soil Mechanics)

function single(load: Load, soil = sixRequest().soil) {
  return runCheck(withSoil(withLoads(sixRequest(), [load]), soil)).loads[0];
}

describe('dispersion-45 (common practice, no published source)', () => {
  it('hand check (docs/calculation.md, worked example 1): q = 60, B = 1, d = 1, H = 3, φ′ = 30° → 20 kPa from 1 m to 2 m, 20 kN/m', () => {
    const r = runCheck(sixRequest());
    expect(r.loads[0]).toMatchObject({ force: 20, top: 1, bottom: 2 });
    for (const p of r.profile) expect(p.surcharge).toBe(p.z >= 1 && p.z <= 2 ? 20 : 0);
  });

  it('offset 0: band from the surface, 20 kN/m and moment 20·(3² − 2²)/2 = 50 (hand calculation; common practice, no published source)', () => {
    expect(single({ id: 'a', kind: 'strip', pressure: 60, width: 1, offset: 0 })).toMatchObject({
      force: 20,
      moment: 50,
      top: 0,
      bottom: 1,
    });
  });

  it('band clipped at formation: d = 2.5 m gives half the band, 10 kN/m (hand calculation; common practice, no published source)', () => {
    expect(single({ id: 'a', kind: 'strip', pressure: 60, width: 1, offset: 2.5 })).toMatchObject({
      force: 10,
      moment: 2.5,
      top: 2.5,
      bottom: 3,
    });
  });

  it('offset beyond H: no pressure, no band, and a warning (docs/calculation.md, "Load spread at 45°")', () => {
    const r = runCheck(withLoads(sixRequest(), [{ id: 'far', kind: 'strip', pressure: 60, width: 1, offset: 3.5 }]));
    expect(r.loads[0]).toMatchObject({ force: 0, top: null, bottom: null });
    expect(r.warnings.some((w) => w.includes('far') && w.includes('beyond the reach'))).toBe(true);
    expect(r.forces.surcharge).toBe(0);
  });

  it('area load spreads sideways: f = L/(L + 2d) = 0.5 for L = 2, d = 1 → 10 kN/m (common practice)', () => {
    expect(single({ id: 'mat', kind: 'area', pressure: 60, width: 1, length: 2, offset: 1 }).force).toBe(10);
  });

  it('line load is a 0.3 m strip: force K·Q (common practice, no published source)', () => {
    const r = runCheck(withLoads(sixRequest(), [{ id: 'wall', kind: 'line', force: 18, offset: 1 }]));
    expect(r.loads[0]).toMatchObject({ force: 6, top: 1, bottom: 1.3 });
    expect(r.warnings.some((w) => w.includes('0.3 m wide'))).toBe(true);
  });

  it('point load on its default 0.3 m pad: q = P/0.09, f = 0.3/2.3 (common practice, no published source)', () => {
    const r = runCheck(withLoads(sixRequest(), [{ id: 'outrigger', kind: 'point', force: 9, offset: 1 }]));
    expect(r.loads[0].force).toBeCloseTo(K30 * 100 * (0.3 / 2.3) * 0.3, 3);
    expect(r.warnings.some((w) => w.includes('default pad'))).toBe(true);
  });

  it('a layer boundary inside the band: each part takes its own K (hand calculation; common practice, no published source) and a fine integral agrees', () => {
    const soil = [
      { top: 0, unitWeight: 19, frictionAngle: 30 },
      { top: 1.5, unitWeight: 19, frictionAngle: 20 },
    ];
    const load: Load = { id: 'a', kind: 'strip', pressure: 60, width: 1, offset: 1 };
    const got = single(load, soil);
    expect(got.force).toBeCloseTo(60 * (K30 * 0.5 + K20 * 0.5), 3);
    expect(got.moment).toBeCloseTo(60 * K30 * 0.875 + 60 * K20 * 0.625, 3);
    const req = withSoil(withLoads(sixRequest(), [load]), soil);
    const m = buildSoilModel(req.excavation, req.soil);
    const e = loadEffect(m, { method: 'dispersion-45', restraint: 'unyielding' }, load);
    const fine = midpoint((z) => e.pressureAt(z, layerIndexAt(m, z)), 0, 3);
    expect(Math.abs(e.force - fine) / fine).toBeLessThan(0.005);
  });
});
