/**
 * Standoff of one load, or of a machine's elements moved together (docs/calculation.md, "Standoff"):
 * the least offset d ≥ minimumClearance such that the check of that load alone, with the blanket
 * loads, passes at d and at every larger offset up to 3H.
 *
 * The pressure model has jumps (a 45° band meeting a layer top, the water table or formation; the
 * NAVFAC DM-7.02 line and point formulas at m = 0.4), so a failing band can be narrower than any
 * fixed step. The search therefore tries every whole centimetre from 3H down to the minimum
 * clearance AND just either side of every break point of the model (d = each layer top, the water
 * table and H, and those less the load's width B; d = 0.4H for elastic line and point loads), and
 * reports the standoff rounded up to 0.01 m beyond the farthest failing offset. Because every
 * offset is tried, it also finds every failing band: when one lies beyond a passing offset the
 * utilisation is not monotonic in the offset and moving the load farther away is not always safer.
 * No passing offset at 3H gives null: the support must be redesigned or the load reduced. The
 * 0.6 m default clearance is the 2 ft of OSHA 29 CFR 1926.651(j)(2).
 *
 * Units: offsets in m. Each trial rebuilds only this load's effect (closed form or exact band
 * integral); the soil, water and blanket pressures at the sample depths are computed once.
 */
import { sidesOf, soilAndWater, sumPressure, utilisationOf, PASS_TOLERANCE, type CheckContext } from './check';
import { DEFAULT_PAD, LINE_LOAD_WIDTH } from './dispersion';
import { placedEffect, type MethodOptions } from './loads';
import type { SoilModel } from './soil';
import type { SurchargeEffect } from './surcharge';
import type { Method, OffsetBand, PlacedLoad } from './types';

export const NO_STANDOFF_MESSAGE =
  'no offset within 3H lets the support carry this load: the support must be redesigned or the load reduced';

/** How far either side of a break point the search looks (m): far below any physical significance. */
export const BREAK_EPSILON = 1e-6;

/** What the search found for one load or one machine. */
export interface StandoffAnswer {
  /** Least offset (m, whole centimetres) from which the check passes at every larger offset to 3H; null when 3H fails. */
  standoff: number | null;
  /** Every run of failing offsets tried within [minimum clearance, 3H], nearest first: its first and last failing offset (m). */
  failingBands: OffsetBand[];
  /** False when a failing band lies beyond an offset that passes. */
  monotonic: boolean;
}

/** One element of a load moved as a whole: a load and its offset beyond the group's nearest element (m). */
interface GroupMember {
  load: PlacedLoad;
  /** Offset of this element minus that of the group's nearest element (m, ≥ 0). */
  relative: number;
}

interface StandoffSolver {
  /** Does the check of this load alone (with the blankets) pass at offset d (m)? */
  passesAt(load: PlacedLoad, offset: number): boolean;
  /** The standoff (m, rounded up to 0.01 m) or null. */
  solve(load: PlacedLoad): number | null;
  /** The standoff with the failing bands of one load. */
  search(load: PlacedLoad): StandoffAnswer;
  /** The same for several elements moved together, d being the nearest element's offset. */
  searchGroup(group: readonly GroupMember[]): StandoffAnswer;
}

/** The width B of a load as the method sees it (m): where its far edge sits beyond its near edge. */
function loadWidth(load: PlacedLoad, method: Method): number {
  switch (load.kind) {
    case 'strip':
    case 'area':
      return load.width;
    case 'line':
      return method === 'dispersion-45' ? LINE_LOAD_WIDTH : 0;
    case 'point':
      return method === 'dispersion-45' ? (load.padWidth ?? DEFAULT_PAD) : 0;
  }
}

/**
 * Offsets of a load's near edge at which the model jumps or changes form: the layer tops, the
 * water table and H (where the 45° band's near edge crosses them), those less B (its far edge),
 * and 0.4H for the elastic line and point formulas (m = 0.4).
 */
export function loadBreakpoints(model: SoilModel, load: PlacedLoad, method: Method): number[] {
  const H = model.H;
  const depths = model.breakpoints.filter((z) => z > 0);
  const B = loadWidth(load, method);
  const out = [...depths];
  if (B > 0) for (const z of depths) out.push(z - B);
  if (method === 'elastic' && (load.kind === 'line' || load.kind === 'point')) out.push(0.4 * H);
  return out;
}

/** Prepares the fixed part (soil, water, blankets) once for any number of standoff solves. */
export function standoffSolver(ctx: CheckContext, blankets: readonly SurchargeEffect[]): StandoffSolver {
  const { model } = ctx;
  const method = ctx.request.method;
  const opts: MethodOptions = { method, restraint: ctx.request.excavation.restraint };
  const rated = ctx.request.excavation.ratedPressure;
  const limit = rated === null ? Infinity : rated * (1 + PASS_TOLERANCE);
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

  /** Does the largest total pressure stay within the rated pressure (the same samples as the check)? */
  function withinRated(effects: readonly SurchargeEffect[]): boolean {
    for (let k = 0; k < sampleZ.length; k++) {
      let p = base[k];
      for (const e of effects) p += e.pressureAt(sampleZ[k], sampleLayer[k]);
      if (p > limit) return false;
    }
    for (const e of effects) {
      for (const z of e.edges) {
        for (const layer of sidesOf(model, z)) {
          let p = soilAndWater(model, z, layer) + sumPressure(blankets, z, layer);
          for (const f of effects) p += f.pressureAt(z, layer);
          if (p > limit) return false;
        }
      }
    }
    return true;
  }

  function passesWith(effects: readonly SurchargeEffect[]): boolean {
    let F = blanketForce;
    let M = blanketMoment;
    for (const e of effects) {
      F += e.force;
      M += e.moment;
    }
    // Force and moment first; the rated pressure only when they pass. maxTotal 0 leaves them alone.
    if (!utilisationOf(ctx, F, M, 0).passes) return false;
    return rated === null || withinRated(effects);
  }

  function passesAt(load: PlacedLoad, offset: number): boolean {
    return passesWith([placedEffect(model, opts, load, offset)]);
  }

  function search(load: PlacedLoad): StandoffAnswer {
    return searchOffsets((d) => passesAt(load, d), model.H, ctx.request.minimumClearance, loadBreakpoints(model, load, method));
  }

  function searchGroup(group: readonly GroupMember[]): StandoffAnswer {
    const bps = group.flatMap((m) => loadBreakpoints(model, m.load, method).map((b) => b - m.relative));
    const at = (d: number) => passesWith(group.map((m) => placedEffect(model, opts, m.load, d + m.relative)));
    return searchOffsets(at, model.H, ctx.request.minimumClearance, bps);
  }

  return { passesAt, solve: (load) => search(load).standoff, search, searchGroup };
}

/** An offset as reported: to 1e-7 m, so whole centimetres print exactly and break-point samples stay distinct. */
const exact = (x: number) => Math.round(x * 1e7) / 1e7;

/**
 * The search of docs/calculation.md, "Standoff", over any pass/fail test of an offset d (m): every
 * whole centimetre from 3H down to the minimum clearance, the minimum clearance itself (when it falls
 * between centimetres, e.g. 2 ft = 0.6096 m) and d ± 1e-6 m at every break point in that range. The standoff is the centimetre just beyond the farthest
 * failing offset (the minimum clearance when none fails), or null when 3H itself fails.
 */
function searchOffsets(
  passes: (d: number) => boolean,
  H: number,
  minimumClearance: number,
  breakpoints: readonly number[],
): StandoffAnswer {
  const top = Math.floor(3 * H * 100 + 1e-9);
  const least = Math.ceil(minimumClearance * 100 - 1e-9);
  // A clearance between centimetres (OSHA's 2 ft = 0.6096 m) is tried itself, then every centimetre beyond it.
  const start = Math.min(exact(minimumClearance), least / 100);
  const samples: number[] = start < least / 100 ? [start] : [];
  for (let cm = least; cm <= Math.max(top, least); cm++) samples.push(cm / 100);
  const lo = start;
  const hi = Math.max(top, least) / 100;
  for (const b of breakpoints) {
    for (const d of [b - BREAK_EPSILON, b + BREAK_EPSILON]) if (d > lo && d < hi) samples.push(d);
  }
  samples.sort((a, b) => a - b);
  const fails = samples.map((d) => !passes(d));
  const bands: OffsetBand[] = [];
  for (let i = 0; i < samples.length; i++) {
    if (!fails[i]) continue;
    let j = i;
    while (j + 1 < samples.length && fails[j + 1]) j++;
    bands.push({ from: exact(samples[i]), to: exact(samples[j]) });
    i = j;
  }
  const monotonic = bands.length === 0 || (bands.length === 1 && fails[0]);
  if (fails[fails.length - 1]) return { standoff: null, failingBands: bands, monotonic };
  let farthest = -Infinity;
  for (let i = samples.length - 1; i >= 0; i--) {
    if (fails[i]) {
      farthest = samples[i];
      break;
    }
  }
  if (farthest === -Infinity) return { standoff: start, failingBands: bands, monotonic };
  const cm = Math.max(least, Math.floor(farthest * 100 + 1e-7) + 1);
  return { standoff: cm / 100, failingBands: bands, monotonic };
}
