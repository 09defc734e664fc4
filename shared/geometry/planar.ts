/**
 * Plane geometry in site-local metres on rings (simple polygons given as open lists of vertices).
 * Elementary computational geometry; no published source beyond the usual textbook constructions.
 */
import type { XY } from './projection';

export type Ring = XY[];

/** Drop a closing vertex equal to the first. */
export function openRing(coords: readonly (readonly number[])[]): Ring {
  const out: Ring = coords.map((c) => [c[0], c[1]]);
  const first = out[0];
  const last = out[out.length - 1];
  if (out.length > 1 && first[0] === last[0] && first[1] === last[1]) out.pop();
  return out;
}

export function signedArea(ring: Ring): number {
  let s = 0;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) s += ring[j][0] * ring[i][1] - ring[i][0] * ring[j][1];
  return s / 2;
}

/** The ring anticlockwise (positive area), so each edge's outward normal is its direction turned clockwise. */
export function anticlockwise(ring: Ring): Ring {
  return signedArea(ring) < 0 ? [...ring].reverse() : ring;
}

/** Where along segment ab (0 at a, 1 at b) its point closest to p is. */
function closestAlong(p: XY, a: XY, b: XY): number {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const len2 = dx * dx + dy * dy;
  const t = len2 === 0 ? 0 : ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2;
  return t < 0 ? 0 : t > 1 ? 1 : t;
}

/** Closest point of segment ab to p: [distance, x, y]. */
export function pointSegment(p: XY, a: XY, b: XY): [number, number, number] {
  const t = closestAlong(p, a, b);
  const x = a[0] + t * (b[0] - a[0]);
  const y = a[1] + t * (b[1] - a[1]);
  return [Math.hypot(p[0] - x, p[1] - y), x, y];
}

/** pointSegment(p, a, b)[0] === 0, without building its answer (a hypotenuse is 0 exactly when both sides are). */
function onSegment(p: XY, a: XY, b: XY): boolean {
  const t = closestAlong(p, a, b);
  return p[0] - (a[0] + t * (b[0] - a[0])) === 0 && p[1] - (a[1] + t * (b[1] - a[1])) === 0;
}

function orient(a: XY, b: XY, c: XY): number {
  return (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
}

/** Do closed segments ab and cd meet (crossing or touching)? */
export function segmentsMeet(a: XY, b: XY, c: XY, d: XY): boolean {
  const o1 = orient(a, b, c);
  const o2 = orient(a, b, d);
  const o3 = orient(c, d, a);
  const o4 = orient(c, d, b);
  if (((o1 > 0 && o2 < 0) || (o1 < 0 && o2 > 0)) && ((o3 > 0 && o4 < 0) || (o3 < 0 && o4 > 0))) return true;
  return onSegment(c, a, b) || onSegment(d, a, b) || onSegment(a, c, d) || onSegment(b, c, d);
}

/** Even-odd point in ring (points on the boundary may go either way; callers test distance first). */
export function pointInRing(p: XY, ring: Ring): boolean {
  let inside = false;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const [xi, yi] = ring[i];
    const [xj, yj] = ring[j];
    if (yi > p[1] !== yj > p[1] && p[0] < ((xj - xi) * (p[1] - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}

/** Least distance from p to the ring's boundary. */
export function distanceToRing(p: XY, ring: Ring): number {
  let best = Infinity;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) best = Math.min(best, pointSegment(p, ring[j], ring[i])[0]);
  return best;
}

/** Signed distance to a polygon: positive outside, negative inside. */
function signedDistanceToRing(p: XY, ring: Ring): number {
  const d = distanceToRing(p, ring);
  return pointInRing(p, ring) ? -d : d;
}

/** Do two rings overlap or touch (boundaries meet, or one lies inside the other)? */
export function ringsMeet(a: Ring, b: Ring): boolean {
  for (let i = 0, j = a.length - 1; i < a.length; j = i++) {
    for (let k = 0, l = b.length - 1; k < b.length; l = k++) if (segmentsMeet(a[j], a[i], b[l], b[k])) return true;
  }
  return pointInRing(a[0], b) || pointInRing(b[0], a);
}

export interface Bounds {
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
}

export function boundsOf(ring: Ring): Bounds {
  const b = { minX: Infinity, minY: Infinity, maxX: -Infinity, maxY: -Infinity };
  for (const [x, y] of ring) {
    b.minX = Math.min(b.minX, x);
    b.minY = Math.min(b.minY, y);
    b.maxX = Math.max(b.maxX, x);
    b.maxY = Math.max(b.maxY, y);
  }
  return b;
}

/** Least distance between two bounding boxes (0 when they overlap): a cheap lower bound. */
export function boundsGap(a: Bounds, b: Bounds): number {
  const dx = Math.max(0, a.minX - b.maxX, b.minX - a.maxX);
  const dy = Math.max(0, a.minY - b.maxY, b.minY - a.maxY);
  return Math.hypot(dx, dy);
}

/**
 * Signed distance (m) from a site-local point to the boundary of the zone within `distance` of an
 * outline (its ring): + outside, − inside. Exact, unlike the zone's drawn polygon (zones.ts).
 */
export function signedDistanceToZone(excavation: { ring: Ring }, point: XY, distance: number): number {
  return signedDistanceToRing(point, excavation.ring) - distance;
}
