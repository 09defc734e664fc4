/**
 * Excavation and footprint outlines in site-local metres from GeoJSON (RFC 7946, WGS84).
 * A trench is its centre LineString plus a width (square ends, mitred bends); a pit is a Polygon.
 * A load footprint is a Polygon, or a Point with a pad.
 */
import { featureCollection, polygon as turfPolygon, union } from '@turf/turf';
import type { LineString, Point, Polygon } from 'geojson';
import { anticlockwise, boundsOf, openRing, segmentsMeet, signedArea, type Bounds, type Ring } from './planar';
import type { LocalProjection, XY } from './projection';

export class GeometryError extends Error {
  override name = 'GeometryError';
}

export type ExcavationShape =
  | { kind: 'trench'; centreLine: LineString; width: number }
  | { kind: 'pit'; outline: Polygon };

export type FootprintShape =
  | { kind: 'polygon'; footprint: Polygon }
  | { kind: 'point'; position: Point; padWidth?: number; padLength?: number };

export interface PreparedOutline {
  /** Anticlockwise ring in site-local metres. */
  ring: Ring;
  bounds: Bounds;
}

/** Steepest bend of a trench centre line that is mitred (degrees of turn). */
export const MAX_TRENCH_TURN = 135;

function checkSimple(ring: Ring, what: string): void {
  if (ring.length < 3 || Math.abs(signedArea(ring)) < 1e-6) throw new GeometryError(`${what} must enclose an area (at least three distinct corners)`);
  const n = ring.length;
  for (let i = 0; i < n; i++) {
    for (let k = i + 2; k < n; k++) {
      if (i === 0 && k === n - 1) continue;
      if (segmentsMeet(ring[i], ring[(i + 1) % n], ring[k], ring[(k + 1) % n])) throw new GeometryError(`${what} crosses itself`);
    }
  }
}

export function prepareRing(ring: Ring, what: string): PreparedOutline {
  checkSimple(ring, what);
  const ccw = anticlockwise(ring);
  return { ring: ccw, bounds: boundsOf(ccw) };
}

function unionRings(pieces: Ring[], what: string): Ring {
  const merged = union(featureCollection(pieces.map((r) => turfPolygon([[...r, r[0]]]))));
  if (!merged || merged.geometry.type !== 'Polygon') throw new GeometryError(`${what} does not form one outline`);
  return openRing(merged.geometry.coordinates[0]);
}

/** Outline of a trench: a rectangle per centre-line segment, the outer side of each bend mitred. */
export function trenchRing(centre: XY[], width: number): Ring {
  const pts = centre.filter((p, i) => i === 0 || p[0] !== centre[i - 1][0] || p[1] !== centre[i - 1][1]);
  if (pts.length < 2) throw new GeometryError('trench centre line needs two distinct points');
  if (!(width > 0)) throw new GeometryError('trench width must be greater than 0 m');
  const h = width / 2;
  const dirs = pts.slice(1).map((p, i) => {
    const dx = p[0] - pts[i][0];
    const dy = p[1] - pts[i][1];
    const len = Math.hypot(dx, dy);
    return [dx / len, dy / len] as XY;
  });
  const left = (u: XY): XY => [-u[1] * h, u[0] * h];
  const pieces: Ring[] = dirs.map((u, i) => {
    const [nx, ny] = left(u);
    const a = pts[i];
    const b = pts[i + 1];
    return [[a[0] - nx, a[1] - ny], [b[0] - nx, b[1] - ny], [b[0] + nx, b[1] + ny], [a[0] + nx, a[1] + ny]];
  });
  for (let i = 1; i < pts.length - 1; i++) {
    const u1 = dirs[i - 1];
    const u2 = dirs[i];
    const cross = u1[0] * u2[1] - u1[1] * u2[0];
    const dot = u1[0] * u2[0] + u1[1] * u2[1];
    const turn = (Math.atan2(Math.abs(cross), dot) * 180) / Math.PI;
    if (turn > MAX_TRENCH_TURN) {
      throw new GeometryError(`trench centre line turns by ${turn.toFixed(0)}° at point ${i}: at most ${MAX_TRENCH_TURN}°; split it into separate trenches`);
    }
    if (Math.abs(cross) < 1e-12) continue;
    const s = cross > 0 ? -1 : 1; // the outer side of the bend
    const n1 = left(u1);
    const n2 = left(u2);
    const k = s / (1 + dot);
    const p = pts[i];
    pieces.push([
      p,
      [p[0] + s * n1[0], p[1] + s * n1[1]],
      [p[0] + k * (n1[0] + n2[0]), p[1] + k * (n1[1] + n2[1])],
      [p[0] + s * n2[0], p[1] + s * n2[1]],
    ]);
  }
  return pieces.length === 1 ? pieces[0] : unionRings(pieces, 'trench');
}

export function excavationOutline(shape: ExcavationShape, proj: LocalProjection): PreparedOutline {
  if (shape.kind === 'trench') {
    return prepareRing(trenchRing(shape.centreLine.coordinates.map((c) => proj.toLocal(c)), shape.width), 'trench outline');
  }
  if (shape.outline.coordinates.length !== 1) throw new GeometryError('pit outline must be one ring without holes');
  return prepareRing(openRing(shape.outline.coordinates[0].map((c) => proj.toLocal(c))), 'pit outline');
}

/** Union of rings (used for buffers); a Polygon's rings or a MultiPolygon's polygons. */
export function unionOf(pieces: Ring[]): XY[][][] {
  const merged = union(featureCollection(pieces.map((r) => turfPolygon([[...r, r[0]]]))));
  if (!merged) return [];
  const g = merged.geometry;
  return (g.type === 'Polygon' ? [g.coordinates] : g.coordinates) as XY[][][];
}
