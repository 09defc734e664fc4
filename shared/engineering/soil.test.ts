import { describe, expect, it } from 'vitest';
import { buildSoilModel, GAMMA_WATER, soilPressure } from './soil';
import { MINIMUM_PRESSURE_WARNING, runCheck } from './index';
import { sixRequest, withExcavation, withLoads, withSoil } from './test-fixtures';
import type { CheckRequest } from './types';

const K30 = 1 / 3; // Rankine Ka at 30° (Craig, Soil Mechanics)

function model(req: CheckRequest) {
  return buildSoilModel(req.excavation, req.soil);
}

describe('soil and water (docs/calculation.md, "Soil and water"; effective stress and pore pressure as in Craig, Soil Mechanics)', () => {
  it('dry sand, H = 3 m: soil force K·γ·H²/2 = 28.5 kN/m (Rankine; Craig, Soil Mechanics)', () => {
    const m = model(sixRequest());
    expect(m.soilForce).toBeCloseTo(28.5, 9);
    expect(m.waterForce).toBe(0);
  });

  it('water at the surface: soil K·(γsat − γw)·H²/2, water γw·H²/2 (effective stress and hydrostatic pore pressure; Craig, Soil Mechanics)', () => {
    const req = withExcavation(sixRequest(), { groundwaterDepth: 0 });
    const m = model(req);
    expect(m.soilForce).toBeCloseTo((K30 * (20 - GAMMA_WATER) * 9) / 2, 9);
    expect(m.waterForce).toBeCloseTo((GAMMA_WATER * 9) / 2, 9);
  });

  it('water at formation and below formation: no water pressure above formation (hydrostatic pore pressure below the water table only; Craig, Soil Mechanics)', () => {
    for (const zw of [3, 5]) {
      const r = runCheck(withExcavation(sixRequest(), { groundwaterDepth: zw }), { standoffs: false });
      expect(r.forces.soil).toBe(28.5);
      expect(r.forces.water).toBe(0);
    }
  });

  it('water at mid-depth: σv and u change slope at the water table (effective stress; Craig, Soil Mechanics; closed form by hand)', () => {
    const req = withExcavation(sixRequest(), { groundwaterDepth: 1.5 });
    const m = model(req);
    const expected = K30 * (19 * 1.5 * 0.75 + 28.5 * 1.5 + (20 - GAMMA_WATER) * 1.125);
    expect(m.soilForce).toBeCloseTo(expected, 9);
    expect(m.waterForce).toBeCloseTo((GAMMA_WATER * 1.5 * 1.5) / 2, 9);
  });

  it('c′ = 5 kPa, active: the 5 kPa/m minimum governs over the whole 3 m, 22.5 kN/m (CIRIA C760 and BS 8002 minimum; from memory)', () => {
    // Rankine with cohesion (Craig): 19z/3 − 2·5/√3 = 6.333z − 5.774 stays below 5z down to 4.33 m.
    const req = withLoads(withSoil(sixRequest(), [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 5 }]), []);
    const r = runCheck(req);
    expect(r.forces.soil).toBe(22.5);
    expect(r.warnings.some((w) => w.includes(MINIMUM_PRESSURE_WARNING))).toBe(true);
  });

  it('c′ = 2 kPa, active: the minimum governs above 1.732 m, Rankine with cohesion below (Craig; CIRIA C760 minimum; closed form by hand)', () => {
    const req = withLoads(withSoil(sixRequest(), [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 2 }]), []);
    const m = model(req);
    const s = 2 * 2 * Math.sqrt(K30); // 2c′√K = 2.3094 kPa
    const zc = s / (19 * K30 - 5); // 6.333z − 2.3094 = 5z at 1.7321 m
    expect(zc).toBeCloseTo(1.7321, 4);
    const expected = 2.5 * zc * zc + ((19 * K30) / 2) * (9 - zc * zc) - s * (3 - zc);
    expect(m.soilForce).toBeCloseTo(expected, 9);
    expect(m.minimumGoverns).toBe(true);
  });

  it('c′ with water at the surface: soil + water ≥ 5z, so the soil is raised only to 5z − u (CIRIA C760 minimum; from memory; pore pressure as in Craig)', () => {
    // γsat 20: σ′v = 10.19z, K·σ′v − 2c′√K = 3.397z − 5.774 < 0 to 1.70 m; 5z − 9.81z < 0: the tension
    // cut-off governs above 1.70 m, Rankine with cohesion below. The minimum does not govern.
    const req = withLoads(
      withExcavation(withSoil(sixRequest(), [{ top: 0, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 30, cohesion: 5 }]), {
        groundwaterDepth: 0,
      }),
      [],
    );
    const m = model(req);
    const slope = K30 * (20 - GAMMA_WATER);
    const c = 2 * 5 * Math.sqrt(K30);
    const z0 = c / slope;
    expect(m.soilForce).toBeCloseTo(0.5 * (slope * 3 - c) * (3 - z0), 9);
    expect(m.minimumGoverns).toBe(false);
  });

  it('at rest with c′: K0·σ′v and no cohesion term (Jaky; Craig; Bond & Harris, Decoding Eurocode 7, §12.4.3)', () => {
    const req = withExcavation(withSoil(sixRequest(), [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 10 }]), {
      pressureState: 'at-rest',
    });
    const m = model(req);
    expect(soilPressure(m, 0, 2)).toBeCloseTo(0.5 * 19 * 2, 9);
    expect(m.soilForce).toBeCloseTo(42.75, 9);
  });

  it('cohesion never reduces a surcharge: a 10 kPa blanket still gives K·q at every depth (docs/calculation.md, "Soil and water")', () => {
    const req = withLoads(withSoil(sixRequest(), [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 50 }]), [
      { id: 'traffic', kind: 'blanket', pressure: 10 },
    ]);
    const r = runCheck(req);
    expect(r.forces.surcharge).toBe(10);
    for (const p of r.profile) {
      expect(p.surcharge).toBe(3.333);
      // The soil is the 5 kPa/m minimum (example 3 of docs/calculation.md).
      expect(p.total).toBeCloseTo(5 * p.z + 3.333, 3);
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

  it('undrained clay with low cu: the 5 kPa/m line governs above the crossing only (total stress, Craig; CIRIA C760 minimum; closed form by hand)', () => {
    const req = withSoil(sixRequest(), [{ top: 0, unitWeight: 18, undrainedShearStrength: 5 }]);
    const m = model(req);
    const zc = 10 / 13; // 18z − 10 = 5z
    const expected = 2.5 * zc * zc + (9 * (9 - zc * zc) - 10 * (3 - zc));
    expect(m.soilForce).toBeCloseTo(expected, 9);
  });

  it('layers: σv carries through a boundary, K and pressure jump there (Rankine K from Craig; closed form by hand)', () => {
    const req = withSoil(sixRequest(), [
      { top: 1.5, unitWeight: 18, frictionAngle: 20 },
      { top: 0, unitWeight: 19, frictionAngle: 30 },
    ]);
    const m = model(req);
    expect(m.layers.map((l) => l.top)).toEqual([0, 1.5]);
    const Ka20 = 0.4903; // Craig, Soil Mechanics
    expect(soilPressure(m, 0, 1.5)).toBeCloseTo(K30 * 28.5, 9);
    expect(soilPressure(m, 1, 1.5)).toBeCloseTo(Ka20 * 28.5, 3);
    // 0..1.5 m: K30·19z; 1.5..3 m: Ka20·(28.5 + 18(z − 1.5)).
    const expected = (K30 * 19 * 1.5 * 1.5) / 2 + Ka20 * (28.5 * 1.5 + (18 * 1.5 * 1.5) / 2);
    expect(m.soilForce).toBeCloseTo(expected, 2);
  });
});
