/**
 * Requests shared by the engine's tests. The base request is worked example 1 of docs/calculation.md: H = 3 m,
 * one sand layer γ = 19 kN/m³, φ′ = 30°, a 60 kPa strip 1 m wide at 1 m, 10 kPa allowance.
 */
import type { CheckRequest, Load, SoilLayer } from './types';

/** Worked example 1's excavation: 3 m deep, dry, a 10 kPa allowance, active pressure on an unyielding support. */
export function sixExcavation(): CheckRequest['excavation'] {
  return {
    depth: 3,
    groundwaterDepth: null,
    designSurcharge: 10,
    ratedPressure: null,
    pressureState: 'active',
    wallFriction: 0,
    restraint: 'unyielding',
  };
}

export function sixRequest(overrides: Partial<CheckRequest> = {}): CheckRequest {
  return {
    excavation: sixExcavation(),
    soil: [{ top: 0, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 30, cohesion: 0 }],
    method: 'dispersion-45',
    minimumClearance: 0.6,
    step: 0.05,
    loads: [{ id: 'footing', kind: 'strip', pressure: 60, width: 1, offset: 1 }],
    ...overrides,
  };
}

export function withExcavation(req: CheckRequest, ex: Partial<CheckRequest['excavation']>): CheckRequest {
  return { ...req, excavation: { ...req.excavation, ...ex } };
}

export function withLoads(req: CheckRequest, loads: Load[]): CheckRequest {
  return { ...req, loads };
}

export function withSoil(req: CheckRequest, soil: SoilLayer[]): CheckRequest {
  return { ...req, soil };
}

/** Composite Simpson's rule with n (even) intervals: the "fine numerical integral" of the tests. */
export function simpson(f: (z: number) => number, a: number, b: number, n = 20000): number {
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += (i % 2 === 1 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}

/** Midpoint rule with n panels: for integrands with jumps, where Simpson's order is lost anyway. */
export function midpoint(f: (z: number) => number, a: number, b: number, n = 200000): number {
  const h = (b - a) / n;
  let s = 0;
  for (let i = 0; i < n; i++) s += f(a + (i + 0.5) * h);
  return s * h;
}

/** The result of worked example 1 of docs/calculation.md for `sixRequest()` (a hand check). */
export const SIX_RESULT = {
  method: 'dispersion-45',
  coefficients: [{ top: 0, K: 0.3333 }],
  forces: { soil: 28.5, water: 0, surcharge: 20, allowance: 10 },
  moments: { surcharge: 30, allowance: 15 },
  loads: [{ id: 'footing', force: 20, top: 1, bottom: 2, standoff: 2.5 }],
  utilisation: 2.0,
  passes: false,
  warnings: [],
} as const;

/** The first profile point of worked example 1's result. */
export const SIX_PROFILE_TOP = { z: 0, soil: 0, water: 0, surcharge: 0, total: 0, allowance: 3.333 } as const;
