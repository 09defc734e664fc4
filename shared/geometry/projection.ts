/**
 * Site-local plane coordinates: GeoJSON positions (RFC 7946: [longitude, latitude], WGS84 degrees)
 * to metres east (x) and north (y) of the site origin, and back.
 *
 * A local equirectangular projection on the WGS84 ellipsoid about the origin: x = N·cos φ0·Δλ,
 * y = M·Δφ, with M and N the meridional and prime-vertical radii of curvature at the origin's
 * latitude φ0 (any geodesy text). Over a construction site (≲ 1 km from the origin) distances are
 * true to about 1 part in 10⁴, i.e. about a millimetre between a load and an excavation 10 m apart.
 */
export type LonLat = [number, number];
export type XY = [number, number];

const A = 6378137;
const F = 1 / 298.257223563;
const E2 = F * (2 - F);
const RAD = Math.PI / 180;

export interface LocalProjection {
  origin: LonLat;
  toLocal(p: readonly number[]): XY;
  toWgs84(p: readonly number[]): LonLat;
  /** Radii of curvature at the origin (m): meridional M ≤ prime vertical N. */
  radii: { meridional: number; primeVertical: number };
}

export function localProjection(origin: LonLat): LocalProjection {
  const phi0 = origin[1] * RAD;
  const s = Math.sin(phi0);
  const w = 1 - E2 * s * s;
  const N = A / Math.sqrt(w);
  const M = (A * (1 - E2)) / (w * Math.sqrt(w));
  const kx = N * Math.cos(phi0) * RAD; // metres per degree of longitude
  const ky = M * RAD; // metres per degree of latitude
  return {
    origin,
    toLocal: (p) => [(p[0] - origin[0]) * kx, (p[1] - origin[1]) * ky],
    toWgs84: (p) => [origin[0] + p[0] / kx, origin[1] + p[1] / ky],
    radii: { meridional: M, primeVertical: N },
  };
}
