/**
 * Excavation and footprint outlines in site-local metres from GeoJSON (RFC 7946, WGS84).
 * A trench is its centre LineString plus a width (square ends, mitred bends); a pit is a Polygon.
 * A load footprint is a Polygon, or a Point with a pad.
 */
import type { LineString, Point, Polygon } from 'geojson';
import { anticlockwise, boundsOf, openRing, segmentsMeet, signedArea, type Bounds, type Ring } from './planar';
import type { LocalProjection, XY } from './projection';

export class GeometryError extends Error {
  override name = 'GeometryError';
}

export type ExcavationShape = { kind: 'trench'; centreLine: LineString; width: number } | { kind: 'pit'; outline: Polygon };

export type FootprintShape =
  { kind: 'polygon'; footprint: Polygon } | { kind: 'point'; position: Point; padWidth?: number; padLength?: number };

export interface PreparedOutline {
  /** Anticlockwise ring in site-local metres. */
  ring: Ring;
  bounds: Bounds;
}

/** Steepest bend of a trench centre line that is mitred (degrees of turn). */
const MAX_TRENCH_TURN = 135;

function checkSimple(ring: Ring, what: string): void {
  if (ring.length < 3 || Math.abs(signedArea(ring)) < 1e-6)
    throw new GeometryError(`${what} must enclose an area (at least three distinct corners)`);
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

/** Outline of a trench: both sides offset by half the width, mitred at each bend, square at the ends. */
export function trenchRing(centre: XY[], width: number): Ring {
  const pts = centre.filter((p, i) => i === 0 || p[0] !== centre[i - 1][0] || p[1] !== centre[i - 1][1]);
  if (pts.length < 2) throw new GeometryError('trench centre line needs two distinct points');
  if (!(width > 0)) throw new GeometryError('trench width must be greater than 0 m');
  const h = width / 2;
  // Unit left normal of each segment.
  const normals = pts.slice(1).map((p, i): XY => {
    const dx = p[0] - pts[i][0];
    const dy = p[1] - pts[i][1];
    const len = Math.hypot(dx, dy);
    return [-dy / len, dx / len];
  });
  const left: Ring = [];
  const right: Ring = [];
  for (let i = 0; i < pts.length; i++) {
    const n1 = normals[Math.max(0, i - 1)];
    const n2 = normals[Math.min(normals.length - 1, i)];
    const dot = n1[0] * n2[0] + n1[1] * n2[1];
    const turn = (Math.acos(Math.max(-1, Math.min(1, dot))) * 180) / Math.PI;
    if (turn > MAX_TRENCH_TURN) {
      throw new GeometryError(
        `trench centre line turns by ${turn.toFixed(0)}° at point ${i}: at most ${MAX_TRENCH_TURN}°; split it into separate trenches`,
      );
    }
    // The mitre point of both offset lines lies along n1 + n2 at h/cos(turn/2) = h·2/|n1 + n2|²·|n1 + n2|.
    const k = h / (1 + dot);
    const m: XY = [k * (n1[0] + n2[0]), k * (n1[1] + n2[1])];
    left.push([pts[i][0] + m[0], pts[i][1] + m[1]]);
    right.push([pts[i][0] - m[0], pts[i][1] - m[1]]);
  }
  return [...right, ...left.reverse()];
}

export function excavationOutline(shape: ExcavationShape, proj: LocalProjection): PreparedOutline {
  if (shape.kind === 'trench') {
    return prepareRing(
      trenchRing(
        shape.centreLine.coordinates.map((c) => proj.toLocal(c)),
        shape.width,
      ),
      'trench outline',
    );
  }
  if (shape.outline.coordinates.length !== 1) throw new GeometryError('pit outline must be one ring without holes');
  return prepareRing(openRing(shape.outline.coordinates[0].map((c) => proj.toLocal(c))), 'pit outline');
}
