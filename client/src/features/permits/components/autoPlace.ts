import { prepareExcavation, type LocalProjection, type XY } from '@shared/geometry';
import { checkExcavationOf } from '@shared/permits/check';
import type { Excavation } from '@shared/schemas/excavations';
import type { LngLat, PermitCheck, PlacedLoad } from '@shared/schemas/permits';
import { bearingOf } from './placement';

/** How far beyond its computed standoff a machine is first put (m): it passes where it lands, and a drag nearer shows where it stops passing. */
export const PLACING_MARGIN = 0.05;

/**
 * A machine placed beside the long side of an excavation, facing along it, with its nearest element
 * at the machine's computed standoff (plus PLACING_MARGIN) from the excavation edge. `check` runs the
 * live check of the permit's loads with this one added (the caller's, so the other permits and the
 * site's figures are counted as on the page). Machines already placed push the new one along the side.
 * When the check cannot run or finds no standoff within 3H, the machine stays 3H from the edge
 * (beyond the influence zone); `standoff` says which.
 */
export function placeAtStandoff(
  load: Extract<PlacedLoad, { kind: 'plant' }>,
  excavation: Excavation,
  proj: LocalProjection,
  already: number,
  check: (load: PlacedLoad) => PermitCheck | null,
): { load: PlacedLoad; standoff: number | null } {
  const ring = prepareExcavation(checkExcavationOf(excavation).shape, proj).ring;
  // The longest side; the ring runs anticlockwise, so the outside is on the right of each side.
  let best = 0;
  let length = -1;
  ring.forEach((a, i) => {
    const b = ring[(i + 1) % ring.length];
    const l = Math.hypot(b[0] - a[0], b[1] - a[1]);
    if (l > length) {
      length = l;
      best = i;
    }
  });
  const a = ring[best];
  const b = ring[(best + 1) % ring.length];
  const along: XY = [(b[0] - a[0]) / length, (b[1] - a[1]) / length];
  const out: XY = [along[1], -along[0]];
  const slide = ((already % 5) - 2) * Math.min(8, length / 5);
  const mid: XY = [(a[0] + b[0]) / 2 + along[0] * slide, (a[1] + b[1]) / 2 + along[1] * slide];
  const at = (d: number): PlacedLoad => ({
    ...load,
    rotation: bearingOf(a, b),
    position: proj.toWgs84([mid[0] + out[0] * d, mid[1] + out[1] * d]) as LngLat,
  });

  const depth = excavation.depth;
  let d = Math.max(3 * depth, 3);
  let placed = at(d);
  // The nearest element's clear distance follows the centre's distance one for one along the
  // normal of a straight side: two rounds settle it (the second corrects a corner's influence).
  for (let round = 0; round < 2; round++) {
    const result = check(placed);
    const own = result?.excavations.find((e) => e.excavationId === excavation.id)?.loadStandoffs.find((l) => l.loadId === load.id);
    if (!own || own.standoff === null) return { load: at(Math.max(3 * depth, 3)), standoff: null };
    d += own.standoff + PLACING_MARGIN - own.offset;
    placed = at(d);
    if (Math.abs(own.standoff + PLACING_MARGIN - own.offset) < 0.005) return { load: placed, standoff: own.standoff };
  }
  const own = check(placed)
    ?.excavations.find((e) => e.excavationId === excavation.id)
    ?.loadStandoffs.find((l) => l.loadId === load.id);
  return { load: placed, standoff: own?.standoff ?? null };
}
