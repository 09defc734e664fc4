import { localProjection, prepareExcavation, signedDistanceToZoneAt, type LocalProjection, type PreparedOutline } from '@shared/geometry';
import type { FieldExcavation, FieldPermit } from '@shared/schemas/field';
import { formatLength, roundTo, type UnitSystem } from '@shared/units';

/** The exclusion zones of a permit, prepared once in the site's local projection for many readings. */
interface PreparedZones {
  proj: LocalProjection;
  zones: { excavation: FieldExcavation; outline: PreparedOutline; standoff: number }[];
}

export function prepareZones(permit: Pick<FieldPermit, 'origin' | 'excavations'>): PreparedZones {
  const proj = localProjection([permit.origin.longitude, permit.origin.latitude]);
  const zones = permit.excavations.flatMap((excavation) =>
    excavation.standoff === null ? [] : [{ excavation, outline: prepareExcavation(excavation.shape, proj), standoff: excavation.standoff }],
  );
  return { proj, zones };
}

export interface Fix {
  latitude: number;
  longitude: number;
  /** Radius (m) within which the phone reckons it is, at 95 % confidence (W3C Geolocation). */
  accuracy: number;
}

/**
 * Where I stand against the nearest exclusion-zone boundary:
 * - `outside` / `inside`: the signed distance (m; + outside, − inside) is further from the boundary
 *   than the phone's accuracy, so the side is known;
 * - `undecided`: the accuracy circle reaches across the boundary, so the phone cannot tell the side;
 * - `none`: the permit has no exclusion zone to measure against.
 */
export type Reading =
  { kind: 'outside' | 'inside' | 'undecided'; distance: number; accuracy: number; excavation: FieldExcavation } | { kind: 'none' };

export function readFix(prepared: PreparedZones, fix: Fix): Reading {
  let best: { distance: number; excavation: FieldExcavation } | null = null;
  for (const z of prepared.zones) {
    const distance = signedDistanceToZoneAt(z.outline, [fix.longitude, fix.latitude], z.standoff, prepared.proj);
    if (!best || distance < best.distance) best = { distance, excavation: z.excavation };
  }
  if (!best) return { kind: 'none' };
  const accuracy = Math.max(0, fix.accuracy);
  const kind = accuracy >= Math.abs(best.distance) ? 'undecided' : best.distance < 0 ? 'inside' : 'outside';
  return { kind, distance: best.distance, accuracy, excavation: best.excavation };
}

/**
 * A live distance to 0.1 m or 0.1 ft in the reader's units: "2.3 m", "7.5 ft". Finer would claim more
 * than a phone can know. A standoff (`up`) never reads less than it is.
 */
export function metres(value: number, system: UnitSystem = 'metric', rounding: 'nearest' | 'up' = 'nearest'): string {
  if (system === 'us') return formatLength(Math.abs(value), 'us', { rounding });
  return `${roundTo(Math.abs(value), 0.1, rounding).toFixed(1)} m`;
}

/** "2.3 m outside", "0.8 m inside" (or in feet), "on the line". */
export function sideText(distance: number, system: UnitSystem = 'metric'): string {
  const shown = metres(distance, system);
  if (/^0\.0 /.test(shown)) return 'on the line';
  return `${shown} ${distance < 0 ? 'inside' : 'outside'}`;
}
