import { sql, type Kysely } from 'kysely';

// Concerns reported from the field view: a note, the excavation, photos (uploads), who and when,
// and the idempotency key the phone made, unique so that a repeated send makes no second concern.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('concerns')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id').onDelete('cascade'))
    .addColumn('permit_id', 'integer', (c) => c.notNull().references('permits.id').onDelete('cascade'))
    .addColumn('excavation_id', 'integer', (c) => c.references('excavations.id').onDelete('set null'))
    .addColumn('excavation_reference', 'text', (c) => c.notNull())
    .addColumn('note', 'text', (c) => c.notNull().check(sql`length(note) between 1 and 2000`))
    .addColumn('photo_upload_ids', sql`integer[]`, (c) => c.notNull().defaultTo(sql`'{}'::integer[]`))
    .addColumn('reporter_id', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('idempotency_key', 'text', (c) => c.notNull().unique())
    .execute();
  await db.schema.createIndex('concerns_permit').on('concerns').columns(['permit_id', 'id']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('concerns').ifExists().execute();
}
