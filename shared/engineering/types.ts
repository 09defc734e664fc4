/**
 * Types of the calculation request and result (docs/calculation.md: "Soil and water", "Loads",
 * "The check", "Command line").
 *
 * Units: lengths and depths in metres (m), pressures in kPa (kN/m²), forces per metre run of
 * support in kN/m (a point load's `force` is in kN), moments about formation in kN·m/m, unit
 * weights in kN/m³, angles in degrees. Depth z is measured downward from ground level.
 */

export type PressureState = 'active' | 'at-rest';
export type Restraint = 'unyielding' | 'yielding';
export type Method = 'dispersion-45' | 'elastic';

export interface Excavation {
  /** H, depth to formation (m), > 0. */
  depth: number;
  /** zw, depth of the water table (m) or null for none. */
  groundwaterDepth: number | null;
  /** qd, the blanket surcharge the support was designed for (kPa). */
  designSurcharge: number;
  /** Allowable uniform pressure of a proprietary support (kPa), or null. */
  ratedPressure: number | null;
  pressureState: PressureState;
  /** δ, wall friction (degrees). */
  wallFriction: number;
  restraint: Restraint;
}

/** A soil layer from `top` down to the next layer's top. Drained (frictionAngle) or undrained (undrainedShearStrength). */
export interface SoilLayer {
  top: number;
  unitWeight: number;
  saturatedUnitWeight?: number;
  frictionAngle?: number;
  cohesion?: number;
  undrainedShearStrength?: number;
}

export interface BlanketLoad {
  id: string;
  kind: 'blanket';
  pressure: number;
}
export interface StripLoad {
  id: string;
  kind: 'strip';
  pressure: number;
  width: number;
  offset: number;
}
export interface LineLoad {
  id: string;
  kind: 'line';
  force: number;
  offset: number;
}
export interface AreaLoad {
  id: string;
  kind: 'area';
  pressure: number;
  width: number;
  length: number;
  offset: number;
}
export interface PointLoad {
  id: string;
  kind: 'point';
  force: number;
  offset: number;
  padWidth?: number;
  padLength?: number;
}
export type Load = BlanketLoad | StripLoad | LineLoad | AreaLoad | PointLoad;
export type PlacedLoad = Exclude<Load, BlanketLoad>;
export type LoadKind = Load['kind'];

export interface CheckRequest {
  excavation: Excavation;
  soil: SoilLayer[];
  method: Method;
  /** Least standoff the solver may return (m); 0.6 m by default. */
  minimumClearance: number;
  /** Profile step (m); 0.05 m by default. */
  step: number;
  loads: Load[];
}

export interface ProfilePoint {
  z: number;
  soil: number;
  water: number;
  surcharge: number;
  total: number;
  allowance: number;
}

/** A run of offsets from the face (m) at which a load fails the check. */
export interface OffsetBand {
  from: number;
  to: number;
}

export interface LoadResult {
  id: string;
  kind: LoadKind;
  /** The load's own force on the support (kN/m). */
  force: number;
  /** The load's own moment about formation (kN·m/m). */
  moment: number;
  /** Depths where its pressure starts and ends (m); null when it does not reach the support. */
  top: number | null;
  bottom: number | null;
  /** Least offset at which this load alone with the blankets passes (m); null for blankets or when none exists. */
  standoff: number | null;
  /**
   * Every run of offsets within [minimum clearance, 3H] at which this load alone (with the blankets)
   * fails, nearest first; empty for blankets, or when standoffs were not solved. More than one run, or
   * one beyond an offset that passes, means moving the load farther away is not always safer.
   */
  failingBands: OffsetBand[];
}

export interface CheckResult {
  method: Method;
  coefficients: { top: number; K: number }[];
  profile: ProfilePoint[];
  forces: { soil: number; water: number; surcharge: number; allowance: number };
  moments: { surcharge: number; allowance: number };
  loads: LoadResult[];
  /** max(Fs/Fa, Ms/Ma[, max total/ratedPressure]); null when there is surcharge and no allowance. */
  utilisation: number | null;
  /** Which ratio governs the utilisation. */
  governing: 'force' | 'moment' | 'rated-pressure' | 'no-allowance' | null;
  /** Largest total pressure on the support over 0..H (kPa). */
  maxTotalPressure: number;
  passes: boolean;
  warnings: string[];
  caution: string;
}
