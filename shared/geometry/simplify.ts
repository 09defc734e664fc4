/**
 * Simplification of drawn lines to the tolerance a site needs (Douglas–Peucker: Douglas & Peucker,
 * "Algorithms for the reduction of the number of points required to represent a digitized line or
 * its caricature", The Canadian Cartographer 10(2), 1973).
 *
 * Decision (issue 12): a site's plan is drawn to SITE_TOLERANCE = 0.05 m. A point of a trench centre
 * line or pit outline that lies within 0.05 m of the line through its neighbours kept is dropped;
 * every dropped point is within 0.05 m of the simplified line and every point of the simplified
 * line within 0.05 m of the original (the Hausdorff distance is at most the tolerance). 0.05 m is
 * half the 0.1 m to which clearances are shown and far below the accuracy of a position set out on
 * site, so no decision changes; it removes the hundreds of nearly collinear points a surveyed or
 * traced line can carry, which would otherwise cost time on every write.
 */
import { localProjection, type XY } from './projection';
import { pointSegment } from './planar';

/** The plan tolerance of a site (m). */
export const SITE_TOLERANCE = 0.05;

/** Indices of the points Douglas–Peucker keeps from an open polyline (first and last always). */
function keep(points: readonly XY[], tolerance: number): number[] {
  const n = points.length;
  if (n <= 2) return points.map((_, i) => i);
  const kept = new Uint8Array(n);
  kept[0] = kept[n - 1] = 1;
  const stack: [number, number][] = [[0, n - 1]];
  while (stack.length) {
    const [a, b] = stack.pop()!;
    let worst = -1;
    let at = -1;
    for (let i = a + 1; i < b; i++) {
      const d = pointSegment(points[i], points[a], points[b])[0];
      if (d > worst) {
        worst = d;
        at = i;
      }
    }
    if (at >= 0 && worst > tolerance) {
      kept[at] = 1;
      stack.push([a, at], [at, b]);
    }
  }
  const out: number[] = [];
  kept.forEach((k, i) => k && out.push(i));
  return out;
}

type Position = [number, number];

/** An open line of WGS84 positions simplified to `tolerance` metres (measured in a plane about its first point). */
export function simplifyLine(coords: readonly Position[], tolerance = SITE_TOLERANCE): Position[] {
  if (coords.length <= 2) return coords.map((c) => [c[0], c[1]]);
  const proj = localProjection([coords[0][0], coords[0][1]]);
  return keep(
    coords.map((c) => proj.toLocal(c)),
    tolerance,
  ).map((i) => [coords[i][0], coords[i][1]]);
}

/**
 * A closed ring of WGS84 positions (first repeated at the end) simplified to `tolerance` metres. The
 * ring is split at its first point and the point farthest from it, and each half simplified.
 */
export function simplifyRing(coords: readonly Position[], tolerance = SITE_TOLERANCE): Position[] {
  const open = coords.slice(0, -1);
  if (open.length <= 3) return coords.map((c) => [c[0], c[1]]);
  const proj = localProjection([open[0][0], open[0][1]]);
  const pts = open.map((c) => proj.toLocal(c));
  let far = 1;
  for (let i = 1; i < pts.length; i++)
    if (Math.hypot(pts[i][0] - pts[0][0], pts[i][1] - pts[0][1]) > Math.hypot(pts[far][0] - pts[0][0], pts[far][1] - pts[0][1])) far = i;
  const first = keep(pts.slice(0, far + 1), tolerance);
  const second = keep([...pts.slice(far), pts[0]], tolerance).map((i) => i + far);
  const idx = [...first, ...second.slice(1, -1)];
  // A ring needs three corners: keep the original when simplification would collapse it.
  if (idx.length < 3) return coords.map((c) => [c[0], c[1]]);
  const ring = idx.map((i): Position => [open[i][0], open[i][1]]);
  return [...ring, [ring[0][0], ring[0][1]]];
}
