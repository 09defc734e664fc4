import { sql, type Kysely } from 'kysely';
// Issue 16 §3: the indexes the permit lists need at an organisation's size (100,000 permits): each
// list's sort with the id after it (keyset pages, server/src/services/permits/read.ts), trigram
// indexes for the text search (pg_trgm: `ilike '%…%'` on the reference, the work, an excavation's
// reference or name, a load's label), the loads' machines, and the lookups of a permit's page and of
// a person's sites.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create extension if not exists pg_trgm`.execute(db);
  await sql`create index permits_updated on permits (updated_at, id)`.execute(db);
  await sql`create index permits_site_updated on permits (site_id, updated_at, id)`.execute(db);
  await sql`create index permits_status_updated on permits (status, updated_at, id)`.execute(db);
  await sql`create index permits_number_trgm on permits using gin (number gin_trgm_ops)`.execute(db);
  await sql`create index permit_revisions_description_trgm on permit_revisions using gin (description gin_trgm_ops)`.execute(db);
  await sql`create index permit_revisions_labels_trgm on permit_revisions
    using gin ((jsonb_path_query_array(loads, '$[*].label')::text) gin_trgm_ops)`.execute(db);
  await sql`create index permit_revisions_loads on permit_revisions using gin (loads jsonb_path_ops)`.execute(db);
  await sql`create index excavations_reference_trgm on excavations using gin (reference gin_trgm_ops)`.execute(db);
  await sql`create index excavations_name_trgm on excavations using gin (name gin_trgm_ops)`.execute(db);
  await sql`create index permit_attachments_permit on permit_attachments (permit_id)`.execute(db);
  await sql`create index site_members_user on site_members (user_id)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const i of [
    'site_members_user',
    'permit_attachments_permit',
    'excavations_name_trgm',
    'excavations_reference_trgm',
    'permit_revisions_loads',
    'permit_revisions_labels_trgm',
    'permit_revisions_description_trgm',
    'permits_number_trgm',
    'permits_status_updated',
    'permits_site_updated',
    'permits_updated',
  ])
    await sql`drop index if exists ${sql.id(i)}`.execute(db);
}
