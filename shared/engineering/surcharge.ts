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
}

export const NO_EDGES: readonly number[] = [];
