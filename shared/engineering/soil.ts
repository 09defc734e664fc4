/**
 * Soil and groundwater: vertical stress, pore pressure and the lateral soil and water pressures on
 * the support (engineering.md §1).
 *
 * Units: depths in m, unit weights in kN/m³, stresses and pressures in kPa, γw = 9.81 kN/m³.
 * - σv(z): γ·thickness above the water table, γsat·thickness below it.
 * - u(z) = γw·(z − zw) below the water table, else 0.
 * - Drained layer: soil = max(0, K·(σv − u) − 2c′√K) (Rankine/Coulomb with the tension cut-off),
 *   water = u.
 * - Undrained layer (total stress): soil = max(σv − 2cu, 5 kPa/m × z), water = 0; the 5 kPa/m
 *   minimum equivalent fluid pressure is CIRIA C760's recommendation for cohesive soils. K for
 *   surcharges in an undrained layer is 1.
 * Forces and moments of soil and water are integrated exactly piece by piece between the layer
 * tops, the water table and formation, where every pressure is linear or the larger of two linear
 * functions.
 */
import { drainedK } from './coefficients';
import { linearForceMoment, maxOfLinearForceMoment } from './integrate';
import type { Excavation, SoilLayer } from './types';

export const GAMMA_WATER = 9.81;
/** Minimum equivalent fluid pressure for cohesive soils, kPa per metre depth (CIRIA C760). */
export const MIN_EQUIVALENT_FLUID = 5;

export interface PreparedLayer {
  top: number;
  /** Next layer's top, or Infinity. */
  bottom: number;
  drained: boolean;
  /** K for soil (drained) and for surcharges (1 when undrained). */
  K: number;
  /** 2c′√K for a drained layer, 2cu for an undrained one (kPa). */
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

export function sigmaV(model: SoilModel, layer: number, z: number): number {
  const L = model.layers[layer];
  const above = Math.max(0, Math.min(z, model.zw) - L.top);
  const below = Math.max(0, z - Math.max(L.top, model.zw));
  return L.sigmaTop + L.gamma * above + L.gammaSat * below;
}

export function porePressure(model: SoilModel, z: number): number {
  return z > model.zw ? GAMMA_WATER * (z - model.zw) : 0;
}

/** The two linear parts whose larger is the soil pressure: [g, h] at depth z in the given layer. */
function soilParts(model: SoilModel, layer: number, z: number): [number, number] {
  const L = model.layers[layer];
  const sv = sigmaV(model, layer, z);
  if (L.drained) return [L.K * (sv - porePressure(model, z)) - L.strengthTerm, 0];
  return [sv - L.strengthTerm, MIN_EQUIVALENT_FLUID * z];
}

export function soilPressure(model: SoilModel, layer: number, z: number): number {
  const L = model.layers[layer];
  const sv = sigmaV(model, layer, z);
  if (L.drained) return Math.max(L.K * (sv - porePressure(model, z)) - L.strengthTerm, 0);
  return Math.max(sv - L.strengthTerm, MIN_EQUIVALENT_FLUID * z);
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
    const strengthTerm = drained ? 2 * (s.cohesion ?? 0) * Math.sqrt(K) : 2 * (s.undrainedShearStrength as number);
    const bottom = i + 1 < sorted.length ? sorted[i + 1].top : Infinity;
    const layer: PreparedLayer = {
      top: s.top,
      bottom,
      drained,
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
    const [ga, ha] = soilParts(model, li, a);
    const [gb, hb] = soilParts(model, li, b);
    const soilFM = maxOfLinearForceMoment(a, b, ga, gb, ha, hb, H);
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
