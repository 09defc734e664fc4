import type { LineString, Polygon } from 'geojson';
import type { Db } from '../database';
import { shapeColumns, shapesOf } from '../../shared/geometry/shapes';
import type { DemoContext } from './people';

/**
 * The demo site's excavations (invented): a pipe trench in hydraulic frames, a wet-well pit in
 * sheet piles and a battered service trench, each with made-up but plausible ground. Positions are
 * given in metres east and north of the site origin and turned into WGS84 degrees here with the
 * local spherical approximation (good to a few centimetres over these distances).
 */
const EARTH_RADIUS = 6371008.8;

export function lonLat(origin: { latitude: number; longitude: number }, east: number, north: number): [number, number] {
  const rad = Math.PI / 180;
  const lat = origin.latitude + north / (EARTH_RADIUS * rad);
  const lon = origin.longitude + east / (EARTH_RADIUS * rad * Math.cos(origin.latitude * rad));
  return [Number(lon.toFixed(7)), Number(lat.toFixed(7))];
}

const madeGround = { top: 0, unitWeight: 18, saturatedUnitWeight: 19, frictionAngle: 27, cohesion: 0 };

const demoExcavations = [
  {
    reference: 'TR-01',
    name: 'Rising main trench, pump house to inlet chamber',
    kind: 'trench' as const,
    line: [
      [-35, -22],
      [0, -22],
      [28, 4],
    ],
    width: 1.2,
    depth: 2.4,
    state: 'open' as const,
    support_type: 'hydraulic-frames' as const,
    design_surcharge: 10,
    rated_pressure: 40,
    restraint: 'unyielding' as const,
    soil: [madeGround, { top: 0.5, unitWeight: 19.5, saturatedUnitWeight: 20, undrainedShearStrength: 50 }],
    groundwater_depth: null,
    design_reference: 'TW-112 rev B (frame spacing 2.5 m)',
    notes: 'Frames at 2.5 m centres. Spoil taken off site daily; no stockpile along the trench.',
  },
  {
    reference: 'PIT-01',
    name: 'Wet well excavation',
    kind: 'pit' as const,
    line: [
      [21, 32],
      [29, 32],
      [29, 38],
      [21, 38],
    ],
    width: null,
    depth: 4.5,
    state: 'open' as const,
    support_type: 'sheet-piles' as const,
    design_surcharge: 10,
    rated_pressure: null,
    restraint: 'unyielding' as const,
    soil: [
      { top: 0, unitWeight: 18, saturatedUnitWeight: 19, frictionAngle: 28, cohesion: 0 },
      { top: 0.8, unitWeight: 19, saturatedUnitWeight: 21, frictionAngle: 34, cohesion: 0 },
    ],
    groundwater_depth: 2.2,
    design_reference: 'TW-108 rev C (one frame of walings and struts at 1.5 m)',
    notes: 'Dewatered by wellpoints on the north side. Crane pads for the pump lift to be checked by permit.',
  },
  {
    reference: 'TR-02',
    name: 'Kiosk cable duct trench',
    kind: 'trench' as const,
    line: [
      [-62, 38],
      [-22, 58],
    ],
    width: 0.6,
    depth: 1.2,
    state: 'planned' as const,
    support_type: 'battered' as const,
    design_surcharge: 10,
    rated_pressure: null,
    restraint: 'yielding' as const,
    soil: [madeGround, { top: 0.4, unitWeight: 19.5, saturatedUnitWeight: 20, undrainedShearStrength: 45 }],
    groundwater_depth: null,
    design_reference: 'Sides battered at 1:1 (drawing TW-115)',
    notes: 'Dug and backfilled in one shift.',
  },
];

export async function seedExcavations(db: Db, ctx: DemoContext): Promise<void> {
  const site = await db.selectFrom('sites').select(['latitude', 'longitude']).where('id', '=', ctx.siteId).executeTakeFirstOrThrow();
  for (const e of demoExcavations) {
    const points = e.line.map(([x, y]) => lonLat(site, x, y));
    const geometry =
      e.kind === 'trench' ? { type: 'LineString', coordinates: points } : { type: 'Polygon', coordinates: [[...points, points[0]]] };
    const { line: _line, ...columns } = e;
    await db
      .insertInto('excavations')
      .values({
        ...columns,
        site_id: ctx.siteId,
        geometry: JSON.stringify(geometry),
        ...shapeColumns(
          shapesOf({ kind: e.kind, geometry: geometry as LineString | Polygon, width: e.width ?? null, depth: e.depth }, site),
        ),
        soil: JSON.stringify(e.soil),
        created_by: ctx.people.coordinator,
      })
      .execute();
  }
}
