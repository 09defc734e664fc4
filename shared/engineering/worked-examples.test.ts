/**
 * The five worked examples of docs/calculation.md ("Worked examples"), each reproduced here with
 * its check values and where they come from. Change one and change the document with it.
 */
import { describe, expect, it } from 'vitest';
import { runCheck, MINIMUM_PRESSURE_WARNING, NOT_MONOTONIC_WARNING } from './index';
import { sixRequest, SIX_RESULT, SIX_PROFILE_TOP, withExcavation, withLoads, withSoil } from './test-fixtures';

const DEG = 180 / Math.PI;

describe('worked examples (docs/calculation.md)', () => {
  it('1. a strip beside a trench under the 45° spread: U 2.0, standoff 2.5 m (hand calculation; common practice, no published source)', () => {
    // K = tan²30° = 1/3 (Rankine; Craig's Soil Mechanics). Band 1..2 m at K·q = 20 kPa: 20 kN/m against
    // the allowance K·qd·H = 10 kN/m. Its moment 20·(3 − 1.5) = 30 against 10·1.5 = 15 kN·m/m.
    const r = runCheck(sixRequest());
    expect(r).toMatchObject(SIX_RESULT);
    expect(r.profile[0]).toEqual(SIX_PROFILE_TOP);
  });

  it('2. at rest with c′ = 10 kPa: K0·σ′v with no cohesion term, 42.75 kN/m, peak 28.5 kPa, U 1.425 (Jaky K0 = 1 − sin φ′; Craig; Bond & Harris, Decoding Eurocode 7, §12.4.3)', () => {
    const req = withLoads(
      withSoil(withExcavation(sixRequest(), { pressureState: 'at-rest', ratedPressure: 20 }), [
        { top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 10 },
      ]),
      [],
    );
    const r = runCheck(req);
    // K0 = 1 − sin 30° = 0.5; soil = 0.5·19·z; force 0.5·19·3²/2 = 42.75 kN/m; peak at 3 m 28.5 kPa.
    expect(r.coefficients[0].K).toBe(0.5);
    expect(r.forces.soil).toBe(42.75);
    expect(r.maxTotalPressure).toBe(28.5);
    expect(r.utilisation).toBe(1.425); // 28.5 / 20
    expect(r.governing).toBe('rated-pressure');
    expect(r.passes).toBe(false);
    // 9.5 kPa/m is above the 5 kPa/m minimum: the minimum does not govern.
    expect(r.warnings.some((w) => w.includes(MINIMUM_PRESSURE_WARNING))).toBe(false);
  });

  it('3. a drained layer with c′ = 50 kPa: the 5 kPa/m minimum gives 22.5 kN/m instead of zero, with a warning (CIRIA C760 and BS 8002 minimum equivalent fluid pressure; from memory)', () => {
    const req = withLoads(withSoil(sixRequest(), [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 50 }]), []);
    const r = runCheck(req);
    // Rankine: 19z/3 − 2·50/√3 < 0 down to 9.1 m; the minimum 5z governs over 0..3 m: 5·3²/2 = 22.5 kN/m.
    expect(r.forces.soil).toBe(22.5);
    expect(r.profile.find((p) => p.z === 2)?.soil).toBe(10);
    expect(r.warnings.some((w) => w.includes(MINIMUM_PRESSURE_WARNING))).toBe(true);
  });

  it('4. an elastic line load with a narrow failing band: standoff 1.24 m, fails at 1.21–1.23 m (NAVFAC DM-7.02 line load, Terzaghi 1954; hand closed form of its moment)', () => {
    const req = withLoads(sixRequest({ method: 'elastic' }), [{ id: 'wall', kind: 'line', force: 15.2, offset: 1.24 }]);
    const at = (d: number) => runCheck(withLoads(req, [{ id: 'wall', kind: 'line', force: 15.2, offset: d }]), { standoffs: false });
    // By hand, m = d/H > 0.4: Ms = Q·H·1.28·m²·(I1 − I2), I1 = ∫0..1 n/(m²+n²)² dn = ½(1/m² − 1/(m²+1)),
    // I2 = ∫0..1 n²/(m²+n²)² dn = atan(1/m)/(2m) − 1/(2(m²+1)) (elementary integrals). Ma = K·qd·H²/2 = 15.
    const handU = (d: number) => {
      const m = d / 3;
      const a = m * m;
      const I1 = 0.5 * (1 / a - 1 / (a + 1));
      const I2 = Math.atan(1 / m) / (2 * m) - 1 / (2 * (a + 1));
      return (15.2 * 3 * 1.28 * a * (I1 - I2)) / 15;
    };
    expect(handU(1.21)).toBeGreaterThan(1.013);
    for (const d of [1.21, 1.22, 1.23]) {
      expect(at(d).passes).toBe(false);
      expect(at(d).utilisation as number).toBeCloseTo(Math.ceil(handU(d) * 1000) / 1000, 3);
    }
    // Published resultant for m > 0.4: 0.64·Q/(m² + 1) (NAVFAC DM-7.02).
    expect(at(1.21).forces.surcharge).toBeCloseTo((0.64 * 15.2) / ((1.21 / 3) ** 2 + 1), 3);
    expect(at(1.24).passes).toBe(true);
    // At m = 0.4 exactly the near formula applies (0.55·Q published, 0.539·Q its integral): it passes.
    expect(at(1.2).passes).toBe(true);
    const r = runCheck(req);
    expect(r.loads[0].standoff).toBe(1.24);
    const band = r.loads[0].failingBands.find((b) => b.to >= 1.23);
    expect(band).toBeDefined();
    expect(band!.from).toBeGreaterThanOrEqual(1.2);
    expect(band!.from).toBeLessThanOrEqual(1.21);
    expect(band!.to).toBe(1.23);
    expect(r.warnings.some((w) => w.includes(NOT_MONOTONIC_WARNING))).toBe(true);
  });

  it('5. an elastic strip: resultant 109.19 kN/m for q = 100 kPa, d = 1 m, B = 2 m, H = 5 m (Jarquio 1981, as given in Das, Principles of Foundation Engineering)', () => {
    const req = withLoads(withExcavation(sixRequest({ method: 'elastic' }), { depth: 5 }), [
      { id: 'road', kind: 'strip', pressure: 100, width: 2, offset: 1 },
    ]);
    const r = runCheck(req, { standoffs: false });
    expect(r.loads[0].force).toBeCloseTo(109.19, 2);
    // P = (q/90)·H·(θ2′ − θ1′) with the angles at z = H in degrees.
    expect(r.loads[0].force).toBeCloseTo((100 / 90) * 5 * (Math.atan(3 / 5) * DEG - Math.atan(1 / 5) * DEG), 3);
  });
});
