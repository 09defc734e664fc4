/**
 * Zones around an excavation (engineering.md §5): the influence zone is the ground within H of the
 * outline, the exclusion zone the ground within a load's standoff. Site-local metres in, GeoJSON
 * (WGS84) out for the map.
 *
 * The buffer is the union of the outline, a rectangle along each edge and a polygon about each
 * corner that circumscribes the circle of the buffer distance, so the drawn zone always contains
 * every point within the distance (it is at most 0.12 % of the distance larger at the corners,
 * never smaller). The signed distance is exact: the distance to the outline less the zone
 * distance (negative inside the zone).
 */
import type { MultiPolygon, Polygon } from 'geojson';
import { unionOf, type PreparedOutline } from './outline';
import { signedDistanceToRing, type Ring } from './planar';
import type { LocalProjection, XY } from './projection';

/** Sides of the polygon drawn about each corner. */
export const CORNER_SIDES = 64;

/** Rings (outer then holes) of each polygon of the buffer, in site-local metres. */
export function bufferRing(ring: Ring, distance: number, sides = CORNER_SIDES): XY[][][] {
  if (distance <= 0) return [[ring]];
  const pieces: Ring[] = [ring];
  const R = distance / Math.cos(Math.PI / sides);
  const n = ring.length;
  for (let i = 0; i < n; i++) {
    const a = ring[i];
    const b = ring[(i + 1) % n];
    const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
    const nx = ((b[1] - a[1]) / len) * distance;
    const ny = (-(b[0] - a[0]) / len) * distance;
    pieces.push([[a[0] - nx, a[1] - ny], [b[0] - nx, b[1] - ny], [b[0] + nx, b[1] + ny], [a[0] + nx, a[1] + ny]]);
    const corner: Ring = [];
    for (let k = 0; k < sides; k++) {
      const th = ((k + 0.5) * 2 * Math.PI) / sides;
      corner.push([a[0] + R * Math.cos(th), a[1] + R * Math.sin(th)]);
    }
    pieces.push(corner);
  }
  return unionOf(pieces);
}

function toGeoJson(polys: XY[][][], proj: LocalProjection): Polygon | MultiPolygon {
  const rings = polys.map((poly) =>
    poly.map((r) => {
      const open = r.length > 1 && r[0][0] === r[r.length - 1][0] && r[0][1] === r[r.length - 1][1] ? r.slice(0, -1) : r;
      const out = open.map((p) => proj.toWgs84(p));
      return [...out, out[0]];
    }),
  );
  return rings.length === 1 ? { type: 'Polygon', coordinates: rings[0] } : { type: 'MultiPolygon', coordinates: rings };
}

/** The zone within `distance` (m) of the excavation outline, as GeoJSON in WGS84. */
export function zonePolygon(excavation: PreparedOutline, distance: number, proj: LocalProjection): Polygon | MultiPolygon {
  return toGeoJson(bufferRing(excavation.ring, distance), proj);
}

/** Influence zone: the ground within the depth H of the outline. */
export function influenceZone(excavation: PreparedOutline, depth: number, proj: LocalProjection): Polygon | MultiPolygon {
  return zonePolygon(excavation, depth, proj);
}

/** Exclusion zone: the ground within a load's standoff of the outline. */
export function exclusionZone(excavation: PreparedOutline, standoff: number, proj: LocalProjection): Polygon | MultiPolygon {
  return zonePolygon(excavation, standoff, proj);
}

/** Signed distance (m) from a site-local point to the boundary of the zone within `distance` of the outline: + outside, − inside. */
export function signedDistanceToZone(excavation: PreparedOutline, point: XY, distance: number): number {
  return signedDistanceToRing(point, excavation.ring) - distance;
}
