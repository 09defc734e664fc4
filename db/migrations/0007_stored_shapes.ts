import type { Kysely } from 'kysely';
import type { LineString, Polygon } from 'geojson';
import { shapeColumns, shapesOf } from '../../shared/geometry/shapes';

// Issue 12: excavation outlines and influence zones are stored when written, never drawn on read.
// Adds the columns and draws them for the rows already there (a register holds tens of rows, each
// drawn in milliseconds to a second; run once).
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('excavations').addColumn('outline', 'jsonb').addColumn('influence_zone', 'jsonb').execute();
  const rows = await db
    .selectFrom('excavations')
    .innerJoin('sites', 'sites.id', 'excavations.site_id')
    .select(['excavations.id', 'kind', 'geometry', 'width', 'depth', 'sites.latitude', 'sites.longitude'])
    .execute();
  for (const r of rows) {
    const shapes = shapesOf(
      {
        kind: r.kind as 'trench' | 'pit',
        geometry: r.geometry as LineString | Polygon,
        width: r.width as number | null,
        depth: Number(r.depth),
      },
      { latitude: Number(r.latitude), longitude: Number(r.longitude) },
    );
    await db.updateTable('excavations').set(shapeColumns(shapes)).where('id', '=', r.id).execute();
  }
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('excavations').dropColumn('outline').dropColumn('influence_zone').execute();
}
