import type { LocalProjection, XY } from '@shared/geometry';
import type { LngLat, PlacedLoad } from '@shared/schemas/permits';

/** The point a load is moved by: a machine's origin, the middle of a drawn shape. */
export function centreOf(load: PlacedLoad, proj: LocalProjection): XY {
  if (load.kind === 'plant') return proj.toLocal(load.position);
  const pts = load.kind === 'line' ? load.path.coordinates : load.outline.coordinates[0].slice(0, -1);
  const local = pts.map((p) => proj.toLocal(p));
  return [local.reduce((s, p) => s + p[0], 0) / local.length, local.reduce((s, p) => s + p[1], 0) / local.length];
}

/** The load moved so that its centre is at `to` (site-local metres). */
export function moveLoad(load: PlacedLoad, to: XY, proj: LocalProjection): PlacedLoad {
  if (load.kind === 'plant') return { ...load, position: proj.toWgs84(to) as LngLat };
  const [cx, cy] = centreOf(load, proj);
  const shift = (p: LngLat): LngLat => {
    const [x, y] = proj.toLocal(p);
    return proj.toWgs84([x + to[0] - cx, y + to[1] - cy]) as LngLat;
  };
  if (load.kind === 'line') return { ...load, path: { type: 'LineString', coordinates: load.path.coordinates.map(shift) } };
  return { ...load, outline: { type: 'Polygon', coordinates: [load.outline.coordinates[0].map(shift)] } };
}

/** A rectangle (WGS84 ring, closed) `length` along the bearing and `width` across it, centred at `c`. */
export function rectangle(c: XY, length: number, width: number, bearing: number, proj: LocalProjection): LngLat[] {
  const th = (bearing * Math.PI) / 180;
  const along: XY = [Math.sin(th), Math.cos(th)];
  const across: XY = [Math.cos(th), -Math.sin(th)];
  const corners: XY[] = [
    [-length / 2, -width / 2],
    [length / 2, -width / 2],
    [length / 2, width / 2],
    [-length / 2, width / 2],
  ].map(([a, b]) => [c[0] + a * along[0] + b * across[0], c[1] + a * along[1] + b * across[1]]);
  const ring = corners.map((p) => proj.toWgs84(p) as LngLat);
  return [...ring, ring[0]];
}

/** A straight path of `length` along the bearing, centred at `c`. */
export function segment(c: XY, length: number, bearing: number, proj: LocalProjection): LngLat[] {
  const th = (bearing * Math.PI) / 180;
  const h: XY = [(Math.sin(th) * length) / 2, (Math.cos(th) * length) / 2];
  return [proj.toWgs84([c[0] - h[0], c[1] - h[1]]) as LngLat, proj.toWgs84([c[0] + h[0], c[1] + h[1]]) as LngLat];
}

/** Bearing (degrees clockwise from north, 0–360) from a to b. */
export function bearingOf(a: XY, b: XY): number {
  const deg = (Math.atan2(b[0] - a[0], b[1] - a[1]) * 180) / Math.PI;
  return Math.round(((deg + 360) % 360) * 10) / 10;
}

/** The rotation handle stands this far ahead of a machine's origin (m). */
const HANDLE_DISTANCE = 8;

export function handleAt(centre: XY, bearing: number): XY {
  const th = (bearing * Math.PI) / 180;
  return [centre[0] + Math.sin(th) * HANDLE_DISTANCE, centre[1] + Math.cos(th) * HANDLE_DISTANCE];
}
