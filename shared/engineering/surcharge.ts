/**
 * The common shape of one surcharge's effect on the support, shared by both methods.
 *
 * Units: depths in m, pressures in kPa, force in kN/m, moment about formation in kN·m/m.
 */
export interface SurchargeEffect {
  /** ∫ p dz over 0..H, integrated exactly or by closed form. */
  force: number;
  /** ∫ p·(H − z) dz over 0..H. */
  moment: number;
  /** Depths where the pressure starts and ends; null when the load does not reach the support. */
  top: number | null;
  bottom: number | null;
  /** Lateral pressure (kPa) at depth z; `layer` is the index of the soil layer holding z (for K). */
  pressureAt(z: number, layer: number): number;
  /** Depths where the pressure jumps (checked when looking for the largest total pressure). */
  edges: readonly number[];
  /** Adds the pressure at each depth z[k] (in layer layer[k]) to out[k]: the profile's inner loop. */
  accumulate(z: ArrayLike<number>, layer: ArrayLike<number>, out: Float64Array): void;
}

/** `accumulate` by calling `pressureAt` at every depth. */
export function accumulateEach(effect: SurchargeEffect, z: ArrayLike<number>, layer: ArrayLike<number>, out: Float64Array): void {
  for (let k = 0; k < z.length; k++) out[k] += effect.pressureAt(z[k], layer[k]);
}

export const NO_EDGES: readonly number[] = [];
