/**
 * A load's position relative to an excavation (docs/calculation.md, "Loads"): `offset`, the least distance from
 * the footprint to the excavation outline; `width` B, the footprint's extent perpendicular to the
 * nearest edge; `length` L, its extent along that edge. Site-local metres. A footprint touching or
 * overlapping the excavation is rejected, never measured.
 */
import { GeometryError, type PreparedOutline } from './outline';
import { boundsOf, distanceToRing, pointInRing, pointSegment, ringsMeet, type Ring } from './planar';
import type { XY } from './projection';

export interface Placement {
  /** Clear distance from the excavation face to the nearest edge of the load (m). */
  offset: number;
  /** Extent perpendicular to the nearest edge (m). */
  width: number;
  /** Extent along the nearest edge (m). */
  length: number;
  /** Index of the excavation edge (ring[edge] → ring[edge + 1]) the load is measured from. */
  edge: number;
}

const TOUCH = 1e-6;
const OVERLAP_MESSAGE = 'load footprint touches or overlaps the excavation: loads are only checked clear of the edge';

function edgeFrame(ring: Ring, i: number): { t: XY; n: XY } {
  const a = ring[i];
  const b = ring[(i + 1) % ring.length];
  const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
  const t: XY = [(b[0] - a[0]) / len, (b[1] - a[1]) / len];
  return { t, n: [t[1], -t[0]] }; // outward normal of an anticlockwise ring
}

/**
 * The nearest edge to a footprint: least distance first; where several edges are equally near (a
 * corner), the one whose outward normal points most nearly at the footprint.
 */
function nearestEdge(ring: Ring, foot: Ring): { edge: number; distance: number } {
  const n = ring.length;
  const m = foot.length;
  const dist = new Array<number>(n).fill(Infinity);
  const toward: XY[] = new Array(n);
  // Each edge is measured alone, so they may be taken nearest box first: an edge whose box lies
  // farther from the footprint's box than an edge already measured (by more than the tie below)
  // can be neither the nearest nor tied with it, and is left at Infinity unmeasured (the answer is
  // the same; a trench's far leg is not measured against a machine beside its near one).
  const box = boundsOf(foot);
  const gaps = new Array<number>(n);
  let first = 0;
  for (let i = 0; i < n; i++) {
    const a = ring[i];
    const b = ring[(i + 1) % n];
    const dx = Math.max(0, Math.min(a[0], b[0]) - box.maxX, box.minX - Math.max(a[0], b[0]));
    const dy = Math.max(0, Math.min(a[1], b[1]) - box.maxY, box.minY - Math.max(a[1], b[1]));
    gaps[i] = Math.hypot(dx, dy);
    if (gaps[i] < gaps[first]) first = i;
  }
  let nearest = Infinity;
  for (let j = 0; j < n; j++) {
    const i = (first + j) % n;
    if (gaps[i] > nearest + 2 * TOUCH) continue;
    const a = ring[i];
    const b = ring[(i + 1) % n];
    for (let k = 0; k < m; k++) {
      const [d, x, y] = pointSegment(foot[k], a, b);
      if (d < dist[i]) {
        dist[i] = d;
        toward[i] = [foot[k][0] - x, foot[k][1] - y];
      }
      const c = foot[k];
      const e = foot[(k + 1) % m];
      for (const p of [a, b]) {
        const [dp, xp, yp] = pointSegment(p, c, e);
        if (dp < dist[i]) {
          dist[i] = dp;
          toward[i] = [xp - p[0], yp - p[1]];
        }
      }
    }
    nearest = Math.min(nearest, dist[i]);
  }
  const least = Math.min(...dist);
  let best = -1;
  let bestAlign = -Infinity;
  for (let i = 0; i < n; i++) {
    if (dist[i] > least + TOUCH) continue;
    const { n: nn } = edgeFrame(ring, i);
    const v = toward[i];
    const align = (nn[0] * v[0] + nn[1] * v[1]) / (Math.hypot(v[0], v[1]) || 1);
    if (align > bestAlign) {
      bestAlign = align;
      best = i;
    }
  }
  return { edge: best, distance: least };
}

/** Offset, width and length of a polygon footprint (site-local ring); throws GeometryError when it touches or overlaps. */
export function placeFootprint(excavation: PreparedOutline, foot: Ring): Placement {
  const placed = footprintPlacement(excavation, foot);
  if (!placed) throw new GeometryError(OVERLAP_MESSAGE);
  return placed;
}

/**
 * placeFootprint, with null for a footprint that touches or overlaps the excavation: no Error is made
 * (a drag frame over an excavation would make one each frame, and the first one's stack costs the
 * browser a re-parse of every function on it).
 */
export function footprintPlacement(excavation: PreparedOutline, foot: Ring): Placement | null {
  const ring = excavation.ring;
  if (ringsMeet(ring, foot)) return null;
  const { edge, distance } = nearestEdge(ring, foot);
  if (distance <= TOUCH) return null;
  const { t, n } = edgeFrame(ring, edge);
  let minT = Infinity;
  let maxT = -Infinity;
  let minN = Infinity;
  let maxN = -Infinity;
  for (const [x, y] of foot) {
    const pt = x * t[0] + y * t[1];
    const pn = x * n[0] + y * n[1];
    minT = Math.min(minT, pt);
    maxT = Math.max(maxT, pt);
    minN = Math.min(minN, pn);
    maxN = Math.max(maxN, pn);
  }
  return { offset: distance, width: maxN - minN, length: maxT - minT, edge };
}

/**
 * A point load on a pad, the pad taken square to the nearest edge: offset = distance from the point
 * to the outline less half the pad width.
 */
export function placePad(excavation: PreparedOutline, centre: XY, padWidth: number, padLength: number): Placement {
  const ring = excavation.ring;
  const d = distanceToRing(centre, ring);
  if (pointInRing(centre, ring) || d - padWidth / 2 <= TOUCH) throw new GeometryError(OVERLAP_MESSAGE);
  const { edge } = nearestEdge(ring, [centre]);
  return { offset: d - padWidth / 2, width: padWidth, length: padLength, edge };
}
