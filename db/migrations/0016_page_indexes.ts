import { sql, type Kysely } from 'kysely';

// Issue 16 §1: the indexes of the lists paged since organisations: an organisation's people by name
// (GET /api/users) and an excavation's inspections newest first (GET /api/excavations/:id/inspections),
// each with the id after the sort key, as their keyset cursors read them (server/src/services/cursor.ts).
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create index users_organisation_name on users (organisation_id, name, id)`.execute(db);
  await sql`create index inspections_excavation_time_id on inspections (excavation_id, inspected_at, id)`.execute(db);
  await sql`drop index if exists inspections_excavation_time`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`create index inspections_excavation_time on inspections (excavation_id, inspected_at)`.execute(db);
  await sql`drop index if exists inspections_excavation_time_id`.execute(db);
  await sql`drop index if exists users_organisation_name`.execute(db);
}
