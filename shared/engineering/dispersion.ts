/**
 * `dispersion-45`: the load spreads downward at 45° (1 horizontal : 1 vertical); engineering.md §3.1.
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

/** Effect of a uniform pressure q (kPa) of width B at offset d, times the factor f. */
export function dispersionBand(model: SoilModel, q: number, width: number, offset: number, f: number): SurchargeEffect {
  const H = model.H;
  if (offset >= H) {
    return { force: 0, moment: 0, top: null, bottom: null, pressureAt: () => 0, edges: NO_EDGES };
  }
  const top = offset;
  const bottom = Math.min(offset + width, H);
  const qf = q * f;
  let force = 0;
  let moment = 0;
  for (const L of model.layers) {
    const a = Math.max(top, L.top);
    const b = Math.min(bottom, L.bottom);
    if (b <= a) continue;
    const [F, M] = uniformForceMoment(a, b, L.K * qf, H);
    force += F;
    moment += M;
  }
  const layers = model.layers;
  return {
    force,
    moment,
    top,
    bottom,
    pressureAt: (z, layer) => (z >= top && z <= bottom ? layers[layer].K * qf : 0),
    edges: [top, bottom],
  };
}
