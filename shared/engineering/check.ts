/**
 * The check (docs/calculation.md, "The check"): profile of soil, water, surcharge and total pressure at a regular
 * step from 0 to H; forces and moments about formation of the surcharges (Fs, Ms) and of the design
 * allowance K(z)·qd (Fa, Ma); utilisation U = max(Fs/Fa, Ms/Ma), and with a rated pressure also
 * max over z of total(z)/ratedPressure. Loads combine by superposition (their forces and moments
 * add; each was integrated exactly or in closed form, never from the profile grid).
 *
 * Units: depths in m, pressures in kPa, forces in kN/m, moments about formation in kN·m/m.
 * Customary 10 kPa allowance: common practice, no published source.
 */
import { buildSoilModel, layerIndexAt, soilPressure, waterPressure, type SoilModel } from './soil';
import type { SurchargeEffect } from './surcharge';
import type { CheckRequest, Excavation, SoilLayer } from './types';
import { contentKey, frozen, Kept } from '../kept';

/** Relative round-off allowed on U ≤ 1: a utilisation of exactly 1 passes despite floating-point noise. */
export const PASS_TOLERANCE = 1e-9;

export interface CheckContext {
  request: CheckRequest;
  model: SoilModel;
  /** Profile depths: exact multiples of step, then H. */
  grid: number[];
  gridLayers: number[];
  /** Layer tops and water table with the layer on each side: where the largest total may sit off the grid. */
  extraSamples: { z: number; layer: number }[];
  /** At each profile depth: the soil's pressure, the water's and the design surcharge's (none depends on the loads). */
  gridSoil: number[];
  gridWater: number[];
  gridAllowance: number[];
  allowanceForce: number;
  allowanceMoment: number;
}

/** Depths 0, step, 2·step, … (rounded to 1e-9 m so they print as exact multiples) and H. */
function profileDepths(H: number, step: number): number[] {
  const n = Math.ceil(H / step - 1e-9);
  const out: number[] = [];
  for (let k = 0; k < n; k++) out.push(Math.round(k * step * 1e9) / 1e9);
  out.push(H);
  return out;
}

/** The layer(s) on each side of depth z: one index, or two at a layer top. */
export function sidesOf(model: SoilModel, z: number): number[] {
  const below = layerIndexAt(model, z);
  const above = layerIndexAt(model, z, true);
  return above === below ? [below] : [below, above];
}

function bothSides(model: SoilModel, z: number, into: { z: number; layer: number }[]): void {
  for (const layer of sidesOf(model, z)) into.push({ z, layer });
}

/**
 * The check's context. What comes from the excavation, its soil and the step alone (the soil model,
 * the profile grid, the soil's and the water's pressure on it, the allowance) is kept by their
 * content (frozen, 200 at most), so checking the same excavation again with loads elsewhere (each
 * frame of a drag on the placing map) builds none of it again.
 */
export function prepareCheck(request: CheckRequest): CheckContext {
  const { excavation, soil, step } = request;
  // Frozen inputs (a plan's valid fixed part, the same objects every frame) cannot have changed: the
  // context last made from the same objects is found without writing out their content again. The
  // excavation and the layers hold numbers and words only, so frozen objects are frozen throughout.
  const fixed = Object.isFrozen(excavation) && Object.isFrozen(soil) && soil.every((l) => Object.isFrozen(l));
  const last = fixed ? lastSoil.get(excavation) : undefined;
  if (last && last.soil === soil && last.step === step) return { request, ...last.context };
  const context = keptSoil.keep(contentKey([excavation, soil, step]), () => frozen(soilContext(excavation, soil, step)));
  if (fixed) lastSoil.set(excavation, { soil, step, context });
  return { request, ...context };
}
const keptSoil = new Kept<Omit<CheckContext, 'request'>>(200);
const lastSoil = new WeakMap<Excavation, { soil: readonly SoilLayer[]; step: number; context: Omit<CheckContext, 'request'> }>();

function soilContext(excavation: Excavation, soil: readonly SoilLayer[], step: number): Omit<CheckContext, 'request'> {
  const model = buildSoilModel(excavation, soil);
  const grid = profileDepths(model.H, step);
  const extraSamples: { z: number; layer: number }[] = [];
  for (const z of model.breakpoints) bothSides(model, z, extraSamples);
  const qd = excavation.designSurcharge;
  const gridLayers = grid.map((z) => layerIndexAt(model, z));
  return {
    model,
    grid,
    gridLayers,
    extraSamples,
    gridSoil: grid.map((z, k) => soilPressure(model, gridLayers[k], z)),
    gridWater: grid.map((z, k) => waterPressure(model, gridLayers[k], z)),
    gridAllowance: gridLayers.map((li) => model.layers[li].K * qd),
    allowanceForce: qd * model.kForce,
    allowanceMoment: qd * model.kMoment,
  };
}

export function sumPressure(effects: readonly SurchargeEffect[], z: number, layer: number): number {
  let s = 0;
  for (const e of effects) s += e.pressureAt(z, layer);
  return s;
}

export function soilAndWater(model: SoilModel, z: number, layer: number): number {
  return soilPressure(model, layer, z) + waterPressure(model, layer, z);
}

/** Largest total pressure at the extra samples and at every effect's jumps (the grid is done by the caller). */
function maxTotalOffGrid(ctx: CheckContext, effects: readonly SurchargeEffect[]): number {
  const model = ctx.model;
  // Sample depths (with the layer on each side at a layer top), kept sorted by depth for `accumulate`.
  const zs: number[] = [];
  const ls: number[] = [];
  const add = (z: number, layer: number) => {
    let i = zs.length;
    while (i > 0 && zs[i - 1] > z) i--;
    zs.splice(i, 0, z);
    ls.splice(i, 0, layer);
  };
  for (const s of ctx.extraSamples) add(s.z, s.layer);
  for (const e of effects) {
    for (const z of e.edges) {
      const below = layerIndexAt(model, z);
      const above = layerIndexAt(model, z, true);
      add(z, below);
      if (above !== below) add(z, above);
    }
  }
  const total = new Float64Array(zs.length);
  for (const e of effects) e.accumulate(zs, ls, total);
  let best = -Infinity;
  for (let k = 0; k < zs.length; k++) best = Math.max(best, total[k] + soilAndWater(model, zs[k], ls[k]));
  return best;
}

interface Utilisation {
  utilisation: number | null;
  governing: 'force' | 'moment' | 'rated-pressure' | 'no-allowance' | null;
  passes: boolean;
}

/** U from the surcharge force and moment and, with a rated pressure, the largest total pressure. */
export function utilisationOf(ctx: CheckContext, Fs: number, Ms: number, maxTotal: number): Utilisation {
  const rated = ctx.request.excavation.ratedPressure;
  const Fa = ctx.allowanceForce;
  const Ma = ctx.allowanceMoment;
  let utilisation: number | null;
  let governing: Utilisation['governing'] = null;
  if (Fa > 0 && Ma > 0) {
    const uf = Fs / Fa;
    const um = Ms / Ma;
    utilisation = Math.max(uf, um);
    governing = um > uf ? 'moment' : 'force';
  } else if (Fs > 0 || Ms > 0) {
    return { utilisation: null, governing: 'no-allowance', passes: false };
  } else {
    utilisation = 0;
  }
  if (rated !== null) {
    const ur = maxTotal / rated;
    if (ur > utilisation) {
      utilisation = ur;
      governing = 'rated-pressure';
    }
  }
  return { utilisation, governing, passes: utilisation <= 1 + PASS_TOLERANCE };
}

interface RawProfile {
  /** The loads' added pressure at each profile depth (the soil's, the water's and the allowance are the context's). */
  surcharge: Float64Array;
  /** The largest total pressure, on the grid and off it. */
  maxTotal: number;
}

export function buildProfile(ctx: CheckContext, effects: readonly SurchargeEffect[]): RawProfile {
  const { grid, gridLayers, gridSoil, gridWater } = ctx;
  const surcharge = new Float64Array(grid.length);
  for (const e of effects) e.accumulate(grid, gridLayers, surcharge);
  let maxTotal = -Infinity;
  for (let k = 0; k < grid.length; k++) maxTotal = Math.max(maxTotal, gridSoil[k] + gridWater[k] + surcharge[k]);
  return { surcharge, maxTotal: Math.max(maxTotal, maxTotalOffGrid(ctx, effects)) };
}
