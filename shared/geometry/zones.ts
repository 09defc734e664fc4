/**
 * Zones around an excavation (docs/calculation.md, "Standoff"): the influence zone is the ground within H of the
 * outline, the exclusion zone the ground within a load's standoff. Site-local metres in, GeoJSON
 * (WGS84) out for the map.
 *
 * A convex outline (a straight trench, a rectangular pit) is buffered directly (see convexBuffer).
 * Any other is drawn by turf's buffer (JSTS, a port of the Java Topology Suite) with its arcs
 * approximated by chords. To make the drawn zone contain every point within the distance, never
 * less, the buffer distance is raised so that each chord lies outside the true circle:
 * r / cos(π/(4·steps)), 0.0075 % more at 64 steps a quarter circle; and because turf measures
 * metres on a sphere of radius 6 371 008.8 m, the distance is also raised by R/M wherever the
 * ellipsoid's meridional radius M is smaller (near the equator, up to 0.56 %). The signed distance is exact:
 * the distance to the outline less the zone distance (negative inside the zone).
 */
import { buffer } from '@turf/buffer';
import { polygon as turfPolygon } from '@turf/helpers';
import type { MultiPolygon, Polygon } from 'geojson';
import type { PreparedOutline } from './outline';
import type { Ring } from './planar';
import type { LocalProjection } from './projection';

/** The sphere turf converts metres on (its earthRadius). */
const TURF_EARTH_RADIUS = 6371008.8;

/** Chords per quarter circle of a zone's rounded corners. */
const ARC_STEPS = 64;

function isConvex(ring: Ring): boolean {
  const n = ring.length;
  for (let i = 0; i < n; i++) {
    const a = ring[i];
    const b = ring[(i + 1) % n];
    const c = ring[(i + 2) % n];
    if ((b[0] - a[0]) * (c[1] - b[1]) - (b[1] - a[1]) * (c[0] - b[0]) < 0) return false;
  }
  return true;
}

/**
 * Buffer of a convex anticlockwise ring, built directly: each edge moved out by r, each corner an arc
 * drawn with chords that touch the circle at their middles (vertices at r / cos(δ/2)), so the
 * polygon contains the true buffer and exceeds it by at most r·(1/cos(δ/2) − 1).
 */
function convexBuffer(ring: Ring, r: number, steps = ARC_STEPS): Ring {
  const n = ring.length;
  const out: Ring = [];
  const normal = (i: number): number => {
    const a = ring[i];
    const b = ring[(i + 1) % n];
    return Math.atan2(-(b[0] - a[0]), b[1] - a[1]); // angle of the outward normal (t turned clockwise)
  };
  for (let i = 0; i < n; i++) {
    const v = ring[i];
    const from = normal((i + n - 1) % n);
    let sweep = normal(i) - from;
    while (sweep < 0) sweep += 2 * Math.PI;
    while (sweep >= 2 * Math.PI) sweep -= 2 * Math.PI;
    out.push([v[0] + r * Math.cos(from), v[1] + r * Math.sin(from)]);
    const pieces = Math.ceil(sweep / (Math.PI / 2 / steps));
    if (pieces > 0) {
      const d = sweep / pieces;
      const R = r / Math.cos(d / 2);
      for (let j = 0; j < pieces; j++) {
        const th = from + (j + 0.5) * d;
        out.push([v[0] + R * Math.cos(th), v[1] + R * Math.sin(th)]);
      }
      out.push([v[0] + r * Math.cos(from + sweep), v[1] + r * Math.sin(from + sweep)]);
    }
  }
  return out;
}

/**
 * Chords per quarter circle so that a zone drawn with them exceeds the true zone by at most
 * `tolerance` metres: r·(1/cos(π/(4·steps)) − 1) ≤ tolerance (from ARC_STEPS down to 2). A zone that
 * is stored (issue 12) is drawn to the site tolerance: about 4 chords a quarter at 2.5 m instead of
 * 64, a tenth of the points, still containing every point within the distance.
 */
export function stepsFor(distance: number, tolerance: number): number {
  if (!(tolerance > 0) || !(distance > 0)) return ARC_STEPS;
  const steps = Math.ceil(Math.PI / (4 * Math.acos(distance / (distance + tolerance))));
  return Math.max(2, Math.min(ARC_STEPS, steps));
}

/**
 * The zone within `distance` (m) of the excavation outline, as GeoJSON in WGS84; with `tolerance`,
 * drawn with fewer chords that still never fall inside the zone (see stepsFor).
 */
function zonePolygon(excavation: PreparedOutline, distance: number, proj: LocalProjection, tolerance = 0): Polygon | MultiPolygon {
  const steps = stepsFor(distance, tolerance);
  const toGeo = (r: Ring) => {
    const ll = r.map((p) => proj.toWgs84(p));
    return [...ll, ll[0]];
  };
  if (distance <= 0) return { type: 'Polygon', coordinates: [toGeo(excavation.ring)] };
  if (isConvex(excavation.ring)) return { type: 'Polygon', coordinates: [toGeo(convexBuffer(excavation.ring, distance, steps))] };
  const outline = turfPolygon([toGeo(excavation.ring)]);
  const sphere = Math.max(1, TURF_EARTH_RADIUS / proj.radii.meridional);
  const drawn = (sphere * distance) / Math.cos(Math.PI / (4 * steps));
  const zone = buffer(outline, drawn, { units: 'meters', steps });
  if (!zone) throw new Error('zone outline could not be drawn');
  return zone.geometry;
}

/** Influence zone: the ground within the depth H of the outline. */
export function influenceZone(excavation: PreparedOutline, depth: number, proj: LocalProjection, tolerance = 0): Polygon | MultiPolygon {
  return zonePolygon(excavation, depth, proj, tolerance);
}

/**
 * Exclusion zone: the ground within a load's standoff of the outline; with `tolerance`, drawn with
 * fewer chords that never fall inside it (the phone draws it to SITE_TOLERANCE: see stepsFor).
 */
export function exclusionZone(excavation: PreparedOutline, standoff: number, proj: LocalProjection, tolerance = 0): Polygon | MultiPolygon {
  return zonePolygon(excavation, standoff, proj, tolerance);
}
