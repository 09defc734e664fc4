import type { Kysely } from 'kysely';

// What a permit revision's check was computed from (issue 10 §3, "an approval stays true to its
// inputs"): `plant_snapshot` holds the machines its loads name (element loads and footprints) as they
// were in the plant library when the revision was sent for review, and is never changed after;
// `excavation_snapshot` holds the check inputs of the excavations its last stored check used
// (depth, support, surcharge, rated pressure, soil, groundwater, geometry, state), written with
// every stored check. Both null on revisions stored before this migration (their check uses the
// library until they are next checked).
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('permit_revisions').addColumn('plant_snapshot', 'jsonb').addColumn('excavation_snapshot', 'jsonb').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('permit_revisions').dropColumn('excavation_snapshot').dropColumn('plant_snapshot').execute();
}
