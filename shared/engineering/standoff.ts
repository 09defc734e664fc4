/**
 * Standoff of one load (engineering.md §5): the least offset d ≥ minimumClearance such that the
 * check of that load alone, with the blanket loads, passes at d and at every larger offset.
 * Scanned from 3H toward the face in 0.05 m steps, then refined by bisection to 0.01 m. Offsets
 * are handled as whole centimetres, so the answer is rounded UP to 0.01 m: it passes, and the
 * centimetre closer fails. No passing offset within 3H gives null: the support must be redesigned
 * or the load reduced. The 0.6 m default clearance is the 2 ft of OSHA 29 CFR 1926.651(j)(2).
 *
 * Units: offsets in m. Each trial rebuilds only this load's effect (closed form or exact band
 * integral); the soil, water and blanket pressures at the sample depths are computed once.
 */
import { sidesOf, soilAndWater, sumPressure, utilisationOf, type CheckContext } from './check';
import { placedEffect, type MethodOptions } from './loads';
import type { SurchargeEffect } from './surcharge';
import type { PlacedLoad } from './types';

const SCAN_STEP_CM = 5;

export const NO_STANDOFF_MESSAGE =
  'no offset within 3H lets the support carry this load: the support must be redesigned or the load reduced';

export interface StandoffSolver {
  /** Does the check of this load alone (with the blankets) pass at offset d (m)? */
  passesAt(load: PlacedLoad, offset: number): boolean;
  /** The standoff (m, rounded up to 0.01 m) or null. */
  solve(load: PlacedLoad): number | null;
}

/** Prepares the fixed part (soil, water, blankets) once for any number of standoff solves. */
export function standoffSolver(ctx: CheckContext, blankets: readonly SurchargeEffect[]): StandoffSolver {
  const { model } = ctx;
  const opts: MethodOptions = { method: ctx.request.method, restraint: ctx.request.excavation.restraint };
  const rated = ctx.request.excavation.ratedPressure;
  let blanketForce = 0;
  let blanketMoment = 0;
  for (const b of blankets) {
    blanketForce += b.force;
    blanketMoment += b.moment;
  }
  // Soil + water + blankets at the profile depths and at the layer tops and water table.
  const sampleZ = [...ctx.grid, ...ctx.extraSamples.map((s) => s.z)];
  const sampleLayer = [...ctx.gridLayers, ...ctx.extraSamples.map((s) => s.layer)];
  const base = sampleZ.map((z, k) => soilAndWater(model, z, sampleLayer[k]) + sumPressure(blankets, z, sampleLayer[k]));

  function passesAt(load: PlacedLoad, offset: number): boolean {
    const e = placedEffect(model, opts, load, offset);
    let maxTotal = 0;
    if (rated !== null) {
      for (let k = 0; k < sampleZ.length; k++) {
        maxTotal = Math.max(maxTotal, base[k] + e.pressureAt(sampleZ[k], sampleLayer[k]));
      }
      for (const z of e.edges) {
        for (const layer of sidesOf(model, z)) {
          maxTotal = Math.max(maxTotal, soilAndWater(model, z, layer) + sumPressure(blankets, z, layer) + e.pressureAt(z, layer));
        }
      }
    }
    return utilisationOf(ctx, blanketForce + e.force, blanketMoment + e.moment, maxTotal).passes;
  }

  function solve(load: PlacedLoad): number | null {
    return scanStandoff((cm) => passesAt(load, cm / 100), model.H, ctx.request.minimumClearance);
  }

  return { passesAt, solve };
}

/**
 * The §5 search over any pass/fail test of a whole-centimetre offset: from 3H toward the face in
 * 0.05 m steps (the last step lands on the minimum clearance itself), then by halves to 0.01 m.
 * Returns metres, or null when 3H does not pass. Used for single loads here and for a machine's
 * elements moved together (shared/permits).
 */
export function scanStandoff(passesCm: (cm: number) => boolean, H: number, minimumClearance: number): number | null {
  const top = Math.floor(3 * H * 100 + 1e-9);
  const least = Math.ceil(minimumClearance * 100 - 1e-9);
  if (top <= least) return passesCm(least) ? least / 100 : null;
  if (!passesCm(top)) return null;
  let pass = top;
  while (pass > least) {
    const next = Math.max(least, pass - SCAN_STEP_CM);
    if (!passesCm(next)) return bisect(passesCm, next, pass) / 100;
    pass = next;
  }
  return least / 100;
}

/** Least passing centimetre between a failing `fail` and a passing `pass` (integers). */
function bisect(passesCm: (cm: number) => boolean, fail: number, pass: number): number {
  while (pass - fail > 1) {
    const mid = (fail + pass) >> 1;
    if (passesCm(mid)) pass = mid;
    else fail = mid;
  }
  return pass;
}
