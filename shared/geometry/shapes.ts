/**
 * The stored shapes of an excavation: its ground outline and influence zone (GeoJSON, WGS84), drawn
 * once when the excavation is written (never on read) and kept in the row. The zone is drawn to the
 * site tolerance. Relative imports only: this module also runs in the server's geometry workers (server/src/services/geometry/worker.mjs).
 */
import type { LineString, MultiPolygon, Polygon } from 'geojson';
import { excavationOutline, GeometryError, type ExcavationShape } from './outline';
import { localProjection, type LocalProjection } from './projection';
import { SITE_TOLERANCE } from './simplify';
import { influenceZone } from './zones';

export interface ShapeInput {
  kind: 'trench' | 'pit';
  geometry: LineString | Polygon;
  width: number | null;
  depth: number;
}
export interface Shapes {
  outline: Polygon | null;
  influenceZone: Polygon | MultiPolygon | null;
}
export interface SiteOrigin {
  latitude: number;
  longitude: number;
}

export const projectionOf = (site: SiteOrigin): LocalProjection => localProjection([site.longitude, site.latitude]);

function shapeOf(v: Pick<ShapeInput, 'kind' | 'geometry' | 'width'>): ExcavationShape {
  return v.kind === 'trench' && v.geometry.type === 'LineString'
    ? { kind: 'trench', centreLine: v.geometry, width: v.width ?? 0 }
    : { kind: 'pit', outline: v.geometry as Polygon };
}

/** The ground outline alone (fast: no buffer); throws GeometryError when no outline forms. */
export function outlineOf(v: Pick<ShapeInput, 'kind' | 'geometry' | 'width'>, proj: LocalProjection): Polygon {
  const prepared = excavationOutline(shapeOf(v), proj);
  const ring = prepared.ring.map((p) => proj.toWgs84(p));
  return { type: 'Polygon', coordinates: [[...ring, ring[0]]] };
}

/** Outline and influence zone; both null when no outline forms (validated on the way in, so only for old rows). */
export function shapesOf(v: ShapeInput, site: SiteOrigin): Shapes {
  const proj = projectionOf(site);
  try {
    const prepared = excavationOutline(shapeOf(v), proj);
    const ring = prepared.ring.map((p) => proj.toWgs84(p));
    return {
      outline: { type: 'Polygon', coordinates: [[...ring, ring[0]]] },
      influenceZone: influenceZone(prepared, v.depth, proj, SITE_TOLERANCE),
    };
  } catch (e) {
    if (e instanceof GeometryError) return { outline: null, influenceZone: null };
    throw e;
  }
}

/** The stored columns of the shapes (jsonb as text). */
export function shapeColumns(s: Shapes): { outline: string | null; influence_zone: string | null } {
  return {
    outline: s.outline ? JSON.stringify(s.outline) : null,
    influence_zone: s.influenceZone ? JSON.stringify(s.influenceZone) : null,
  };
}
