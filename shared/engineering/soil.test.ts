import { describe, expect, it } from 'vitest';
import { buildSoilModel, GAMMA_WATER, layerIndexAt, soilPressure, waterPressure } from './soil';
import { runCheck } from './index';
import { midpoint, sixRequest, withExcavation, withLoads, withSoil } from './test-fixtures';
import type { CheckRequest } from './types';

const K30 = 1 / 3; // Rankine Ka at 30° (Craig, Soil Mechanics)

function model(req: CheckRequest) {
  return buildSoilModel(req.excavation, req.soil);
}

/** A fine numerical integral of soil and water pressure straight from the pointwise functions. */
function fineForces(req: CheckRequest): [number, number] {
  const m = model(req);
  const H = req.excavation.depth;
  return [
    midpoint((z) => soilPressure(m, layerIndexAt(m, z), z), 0, H),
    midpoint((z) => waterPressure(m, layerIndexAt(m, z), z), 0, H),
  ];
}

describe('soil and water (engineering.md §1; effective stress as in Craig, Soil Mechanics)', () => {
  it('dry sand, H = 3 m: soil force K·γ·H²/2 = 28.5 kN/m (engineering.md §6)', () => {
    const m = model(sixRequest());
    expect(m.soilForce).toBeCloseTo(28.5, 9);
    expect(m.waterForce).toBe(0);
  });

  it('water at the surface: soil K·(γsat − γw)·H²/2, water γw·H²/2 (hand calculation, effective stress; common practice, no published source)', () => {
    const req = withExcavation(sixRequest(), { groundwaterDepth: 0 });
    const m = model(req);
    expect(m.soilForce).toBeCloseTo((K30 * (20 - GAMMA_WATER) * 9) / 2, 9);
    expect(m.waterForce).toBeCloseTo((GAMMA_WATER * 9) / 2, 9);
    const [fs, fw] = fineForces(req);
    expect(m.soilForce).toBeCloseTo(fs, 6);
    expect(m.waterForce).toBeCloseTo(fw, 6);
  });

  it('water at formation and below formation: no water pressure above formation (hand calculation; common practice, no published source)', () => {
    for (const zw of [3, 5]) {
      const r = runCheck(withExcavation(sixRequest(), { groundwaterDepth: zw }), { standoffs: false });
      expect(r.forces.soil).toBe(28.5);
      expect(r.forces.water).toBe(0);
    }
  });

  it('water at mid-depth: σv and u change slope at the water table (hand calculation; common practice, no published source)', () => {
    const req = withExcavation(sixRequest(), { groundwaterDepth: 1.5 });
    const m = model(req);
    const expected = K30 * (19 * 1.5 * 0.75 + 28.5 * 1.5 + (20 - GAMMA_WATER) * 1.125);
    expect(m.soilForce).toBeCloseTo(expected, 9);
    expect(m.waterForce).toBeCloseTo((GAMMA_WATER * 1.5 * 1.5) / 2, 9);
    const [fs, fw] = fineForces(req);
    expect(m.soilForce).toBeCloseTo(fs, 6);
    expect(m.waterForce).toBeCloseTo(fw, 6);
  });

  it('cohesion: tension cut-off above z0 = 2c′/(γ√K) (Rankine with cohesion; Craig, Soil Mechanics)', () => {
    const req = withSoil(sixRequest(), [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 5 }]);
    const m = model(req);
    const z0 = (2 * 5) / (19 * Math.sqrt(K30));
    const pH = K30 * 19 * 3 - 2 * 5 * Math.sqrt(K30);
    expect(m.soilForce).toBeCloseTo(0.5 * pH * (3 - z0), 9);
    expect(soilPressure(m, 0, z0 / 2)).toBe(0);
  });

  it('cohesion never reduces a surcharge: a 10 kPa blanket still gives K·q at every depth (engineering.md §1)', () => {
    const req = withLoads(withSoil(sixRequest(), [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 50 }]), [
      { id: 'traffic', kind: 'blanket', pressure: 10 },
    ]);
    const r = runCheck(req);
    expect(r.forces.soil).toBe(0);
    expect(r.forces.surcharge).toBe(10);
    for (const p of r.profile) {
      expect(p.surcharge).toBe(3.333);
      expect(p.total).toBe(3.333);
    }
  });

  it('undrained clay: max(σv − 2cu, 5 kPa/m·z), no separate water, K = 1 for surcharges (CIRIA C760 minimum; from memory)', () => {
    const req = withLoads(
      withExcavation(withSoil(sixRequest(), [{ top: 0, unitWeight: 18, undrainedShearStrength: 20 }]), { groundwaterDepth: 1 }),
      [{ id: 'traffic', kind: 'blanket', pressure: 10 }],
    );
    const r = runCheck(req);
    // σv − 2cu = 18z − 40 (γsat defaults to γ) stays below 5z down to 3 m: soil = 5z, force 22.5.
    expect(r.forces.soil).toBe(22.5);
    expect(r.forces.water).toBe(0);
    expect(r.coefficients[0].K).toBe(1);
    expect(r.forces.surcharge).toBe(30);
    expect(r.forces.allowance).toBe(30);
  });

  it('undrained clay with low cu: the 5 kPa/m line governs above the crossing only (hand calculation; common practice, no published source)', () => {
    const req = withSoil(sixRequest(), [{ top: 0, unitWeight: 18, undrainedShearStrength: 5 }]);
    const m = model(req);
    const zc = 10 / 13; // 18z − 10 = 5z
    const expected = 2.5 * zc * zc + (9 * (9 - zc * zc) - 10 * (3 - zc));
    expect(m.soilForce).toBeCloseTo(expected, 9);
    expect(m.soilForce).toBeCloseTo(fineForces(req)[0], 6);
  });

  it('layers: σv carries through a boundary, K and pressure jump there (hand calculation; common practice, no published source)', () => {
    const req = withSoil(sixRequest(), [
      { top: 1.5, unitWeight: 18, frictionAngle: 20 },
      { top: 0, unitWeight: 19, frictionAngle: 30 },
    ]);
    const m = model(req);
    expect(m.layers.map((l) => l.top)).toEqual([0, 1.5]);
    const Ka20 = 0.4903; // Craig, Soil Mechanics
    expect(soilPressure(m, 0, 1.5)).toBeCloseTo(K30 * 28.5, 9);
    expect(soilPressure(m, 1, 1.5)).toBeCloseTo(Ka20 * 28.5, 3);
    expect(m.soilForce).toBeCloseTo(fineForces(req)[0], 6);
  });
});
