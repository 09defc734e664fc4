/**
 * `dispersion-45`: the load spreads downward at 45° (1 horizontal : 1 vertical); docs/calculation.md, "Load spread at 45°".
 * Common practice, no published source.
 *
 * Units: offsets, widths and depths in m; pressures in kPa; forces in kN/m.
 * A load of width B at clear offset d from the face presses on the support only in the band
 * d ≤ z ≤ d + B (clipped to 0..H) with Δσh(z) = K(z)·q·f, f = 1 for a strip and L/(L + 2d) for an
 * area load (it also spreads sideways along the face). A line load is a 0.3 m strip; a point load
 * an area load on its pad (0.3 m × 0.3 m unless given). The band is integrated exactly, layer by
 * layer, because its edges fall between the profile's grid points.
 */
import { uniformForceMoment } from './integrate';
import type { SoilModel } from './soil';
import { NO_EDGES, type SurchargeEffect } from './surcharge';

/** Least width of a line load analysed as a strip (m). */
export const LINE_LOAD_WIDTH = 0.3;
/** Pad side of a point load when none is given (m). */
export const DEFAULT_PAD = 0.3;

/** Area spread factor along the face: L/(L + 2d); 1 for an unlimited length. */
export function areaFactor(length: number, offset: number): number {
  return length === Infinity ? 1 : length / (length + 2 * offset);
}

/** A band of uniform q·f times the layer's K between depths top and bottom (both inclusive). */
class BandEffect implements SurchargeEffect {
  force = 0;
  moment = 0;
  readonly edges: readonly number[];
  constructor(
    private readonly model: SoilModel,
    readonly top: number,
    readonly bottom: number,
    private readonly qf: number,
  ) {
    this.edges = [top, bottom];
    const H = model.H;
    for (const L of model.layers) {
      const a = Math.max(top, L.top);
      const b = Math.min(bottom, L.bottom);
      if (b <= a) continue;
      const [F, M] = uniformForceMoment(a, b, L.K * qf, H);
      this.force += F;
      this.moment += M;
    }
  }
  pressureAt(z: number, layer: number): number {
    return z >= this.top && z <= this.bottom ? this.model.layers[layer].K * this.qf : 0;
  }
  accumulate(z: ArrayLike<number>, layer: ArrayLike<number>, out: Float64Array): void {
    const layers = this.model.layers;
    for (let k = 0; k < z.length; k++) {
      const zk = z[k];
      if (zk > this.bottom) break;
      if (zk >= this.top) out[k] += layers[layer[k]].K * this.qf;
    }
  }
}

const OUT_OF_REACH: SurchargeEffect = {
  force: 0,
  moment: 0,
  top: null,
  bottom: null,
  pressureAt: () => 0,
  edges: NO_EDGES,
  accumulate: () => undefined,
};

/** Effect of a uniform pressure q (kPa) of width B at offset d, times the factor f. */
export function dispersionBand(model: SoilModel, q: number, width: number, offset: number, f: number): SurchargeEffect {
  if (offset >= model.H) return OUT_OF_REACH;
  return new BandEffect(model, offset, Math.min(offset + width, model.H), q * f);
}
