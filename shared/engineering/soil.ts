/**
 * Soil and groundwater: vertical stress, pore pressure and the lateral soil and water pressures on
 * the support (docs/calculation.md, "Soil and water").
 *
 * Units: depths in m, unit weights in kN/m³, stresses and pressures in kPa, γw = 9.81 kN/m³.
 * - σv(z): γ·thickness above the water table, γsat·thickness below it.
 * - u(z) = γw·(z − zw) below the water table, else 0.
 *   Effective stress σ′v = σv − u and the pore pressure below a water table: Craig's Soil Mechanics
 *   (Terzaghi's principle of effective stress).
 * - Drained layer, active: soil = max(0, K·(σv − u) − 2c′√K) (Rankine/Coulomb with the tension
 *   cut-off), water = u.
 * - Drained layer, at rest: soil = K0·(σv − u), no cohesion term (Craig; Bond & Harris, Decoding
 *   Eurocode 7, §12.4.3), water = u.
 * - Undrained layer (total stress, active only): soil = max(σv − 2cu, 5 kPa/m × z), water = 0. K for
 *   surcharges in an undrained layer is 1. At rest is refused for it by the request schema.
 * - Minimum equivalent fluid pressure: in every cohesive layer (cu, or c′ > 0) soil + water ≥
 *   5 kPa/m × z (CIRIA C760 and BS 8002; from memory), so soil ≥ 5z − u there.
 * Forces and moments of soil and water are integrated exactly piece by piece between the layer
 * tops, the water table and formation, where every pressure is the largest of a few linear
 * functions. See docs/calculation.md, "Soil and water".
 */
import { drainedK } from './coefficients';
import { linearForceMoment, maxOfLinesForceMoment } from './integrate';
import type { Excavation, SoilLayer } from './types';

export const GAMMA_WATER = 9.81;
/** Minimum equivalent fluid pressure for cohesive soils, kPa per metre depth (CIRIA C760, BS 8002; from memory). */
const MIN_EQUIVALENT_FLUID = 5;

export interface PreparedLayer {
  top: number;
  /** Next layer's top, or Infinity. */
  bottom: number;
  drained: boolean;
  /** Undrained (cu) or drained with c′ > 0: soil + water ≥ 5 kPa/m × z applies. */
  cohesive: boolean;
  /** K for soil (drained) and for surcharges (1 when undrained). */
  K: number;
  /** 2c′√K for a drained active layer, 0 at rest, 2cu for an undrained one (kPa). */
  strengthTerm: number;
  gamma: number;
  gammaSat: number;
  /** σv at the layer top (kPa). */
  sigmaTop: number;
}

export interface SoilModel {
  H: number;
  /** Water table depth, Infinity when there is none. */
  zw: number;
  layers: PreparedLayer[];
  /** Sorted depths in [0, H] where some soil or water pressure changes slope or jumps: 0, layer tops, zw, H. */
  breakpoints: number[];
  /** ∫K dz and ∫K·(H − z) dz over 0..H: a blanket q gives q times these. */
  kForce: number;
  kMoment: number;
  /** Whether the 5 kPa/m minimum equivalent fluid pressure governs somewhere in 0..H. */
  minimumGoverns: boolean;
  soilForce: number;
  soilMoment: number;
  waterForce: number;
  waterMoment: number;
}

/** Index of the layer holding depth z; at a layer top, the lower layer unless `fromAbove`. */
export function layerIndexAt(model: SoilModel, z: number, fromAbove = false): number {
  const layers = model.layers;
  let i = layers.length - 1;
  while (i > 0 && (fromAbove ? layers[i].top >= z : layers[i].top > z)) i--;
  return i;
}

function sigmaV(model: SoilModel, layer: number, z: number): number {
  const L = model.layers[layer];
  const above = Math.max(0, Math.min(z, model.zw) - L.top);
  const below = Math.max(0, z - Math.max(L.top, model.zw));
  return L.sigmaTop + L.gamma * above + L.gammaSat * below;
}

function porePressure(model: SoilModel, z: number): number {
  return z > model.zw ? GAMMA_WATER * (z - model.zw) : 0;
}

/**
 * The linear functions whose largest is the soil pressure at depth z in the given layer, evaluated
 * there: the strength expression, then (drained active) the tension cut-off 0, then (cohesive) the
 * minimum 5z − u. The last entry is the minimum when `layer.cohesive`.
 */
function soilParts(model: SoilModel, layer: number, z: number): number[] {
  const L = model.layers[layer];
  const sv = sigmaV(model, layer, z);
  if (!L.drained) return [sv - L.strengthTerm, MIN_EQUIVALENT_FLUID * z];
  const u = porePressure(model, z);
  const parts = [L.K * (sv - u) - L.strengthTerm, 0];
  if (L.cohesive) parts.push(MIN_EQUIVALENT_FLUID * z - u);
  return parts;
}

export function soilPressure(model: SoilModel, layer: number, z: number): number {
  const L = model.layers[layer];
  const sv = sigmaV(model, layer, z);
  if (!L.drained) return Math.max(sv - L.strengthTerm, MIN_EQUIVALENT_FLUID * z);
  const u = porePressure(model, z);
  const p = Math.max(L.K * (sv - u) - L.strengthTerm, 0);
  return L.cohesive ? Math.max(p, MIN_EQUIVALENT_FLUID * z - u) : p;
}

export function waterPressure(model: SoilModel, layer: number, z: number): number {
  return model.layers[layer].drained ? porePressure(model, z) : 0;
}

/** Layers sorted by top; K from the excavation's pressure state and wall friction. */
export function buildSoilModel(excavation: Excavation, soil: readonly SoilLayer[]): SoilModel {
  const H = excavation.depth;
  const zw = excavation.groundwaterDepth ?? Infinity;
  const sorted = [...soil].sort((a, b) => a.top - b.top);
  const layers: PreparedLayer[] = [];
  let sigma = 0;
  for (let i = 0; i < sorted.length; i++) {
    const s = sorted[i];
    const drained = s.undrainedShearStrength === undefined;
    const K = drained ? drainedK(s.frictionAngle as number, excavation.pressureState, excavation.wallFriction) : 1;
    const atRest = excavation.pressureState === 'at-rest';
    const strengthTerm = drained ? (atRest ? 0 : 2 * (s.cohesion ?? 0) * Math.sqrt(K)) : 2 * (s.undrainedShearStrength as number);
    const bottom = i + 1 < sorted.length ? sorted[i + 1].top : Infinity;
    const layer: PreparedLayer = {
      top: s.top,
      bottom,
      drained,
      cohesive: !drained || (s.cohesion ?? 0) > 0,
      K,
      strengthTerm,
      gamma: s.unitWeight,
      gammaSat: s.saturatedUnitWeight ?? s.unitWeight,
      sigmaTop: sigma,
    };
    layers.push(layer);
    if (bottom !== Infinity) {
      const above = Math.max(0, Math.min(bottom, zw) - s.top);
      const below = Math.max(0, bottom - Math.max(s.top, zw));
      sigma += layer.gamma * above + layer.gammaSat * below;
    }
  }
  const cuts = new Set<number>([0, H]);
  for (const L of layers) if (L.top > 0 && L.top < H) cuts.add(L.top);
  if (zw > 0 && zw < H) cuts.add(zw);
  const breakpoints = [...cuts].sort((a, b) => a - b);
  const model: SoilModel = {
    H,
    zw,
    layers,
    breakpoints,
    kForce: 0,
    kMoment: 0,
    minimumGoverns: false,
    soilForce: 0,
    soilMoment: 0,
    waterForce: 0,
    waterMoment: 0,
  };
  for (let j = 0; j + 1 < breakpoints.length; j++) {
    const a = breakpoints[j];
    const b = breakpoints[j + 1];
    const li = layerIndexAt(model, (a + b) / 2);
    const K = layers[li].K;
    const pa = soilParts(model, li, a);
    const pb = soilParts(model, li, b);
    const soilFM = maxOfLinesForceMoment(a, b, pa, pb, H);
    if (layers[li].cohesive && soilFM[2]) model.minimumGoverns = true;
    const waterFM = linearForceMoment(a, b, waterPressure(model, li, a), waterPressure(model, li, b), H);
    const kFM = linearForceMoment(a, b, K, K, H);
    model.soilForce += soilFM[0];
    model.soilMoment += soilFM[1];
    model.waterForce += waterFM[0];
    model.waterMoment += waterFM[1];
    model.kForce += kFM[0];
    model.kMoment += kFM[1];
  }
  return model;
}
