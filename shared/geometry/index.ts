/**
 * Plan geometry: GeoJSON (RFC 7946, WGS84) excavations and load footprints to site-local metres,
 * each load's offset, width and length relative to the nearest edge (docs/calculation.md, "Loads"), and the
 * influence and exclusion zones for the map (docs/calculation.md, "Standoff"). Pure: no I/O.
 */
import { excavationOutline, GeometryError, prepareRing, type ExcavationShape, type FootprintShape, type PreparedOutline } from './outline';
import { openRing, signedDistanceToZone } from './planar';
import { placeFootprint, placePad, type Placement } from './placement';
import type { LocalProjection, LonLat } from './projection';
import { contentKey, Kept } from '../kept';

export { localProjection, type LocalProjection, type LonLat, type XY } from './projection';
export {
  GeometryError,
  excavationOutline,
  trenchRing,
  prepareRing,
  type ExcavationShape,
  type FootprintShape,
  type PreparedOutline,
} from './outline';
export { footprintPlacement, placeFootprint, placePad } from './placement';
export { influenceZone, exclusionZone } from './zones';
export { boundsGap, boundsOf, signedDistanceToZone, signedArea } from './planar';

/** Pad side of a point load when none is given (m), as in the engine. */
const DEFAULT_PAD_SIDE = 0.3;

/** Offset, width and length of a load footprint (GeoJSON) beside a prepared excavation. Throws GeometryError on overlap. */
export function measureLoad(excavation: PreparedOutline, footprint: FootprintShape, proj: LocalProjection): Placement {
  if (footprint.kind === 'point') {
    return placePad(
      excavation,
      proj.toLocal(footprint.position.coordinates),
      footprint.padWidth ?? DEFAULT_PAD_SIDE,
      footprint.padLength ?? DEFAULT_PAD_SIDE,
    );
  }
  if (footprint.footprint.coordinates.length < 1) throw new GeometryError('load footprint has no outline');
  const ring = prepareRing(openRing(footprint.footprint.coordinates[0].map((c) => proj.toLocal(c))), 'load footprint').ring;
  return placeFootprint(excavation, ring);
}

/**
 * Prepare an excavation's outline once (site-local metres) for many measurements. Outlines are kept
 * between calls by the shape's content and the projection's origin (the same excavation is measured
 * for every load, every frame of a drag on the placing map and every check request), so a shape is
 * prepared once while it stays the same; keyed by content, never by object, so a shape changed in
 * place is prepared again. A kept outline is frozen; at most 500 are kept (least recently used goes
 * first). A shape that cannot be prepared throws GeometryError each time.
 */
export function prepareExcavation(shape: ExcavationShape, proj: LocalProjection): PreparedOutline {
  return keptOutlines.keep(contentKey([proj.origin, shape]), () => Object.freeze(excavationOutline(shape, proj)));
}
const keptOutlines = new Kept<PreparedOutline>(500);

/** Signed distance (m) from a WGS84 position to the zone within `distance` of the outline: + outside, − inside. */
export function signedDistanceToZoneAt(excavation: PreparedOutline, position: LonLat, distance: number, proj: LocalProjection): number {
  return signedDistanceToZone(excavation, proj.toLocal(position), distance);
}
export { SITE_TOLERANCE } from './simplify';
