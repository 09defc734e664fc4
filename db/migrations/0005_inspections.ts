import { sql, type Kysely } from 'kysely';

// Shift start times per site, excavation inspections (checklist, photos, outcome), the permits a
// failed inspection suspended, and the record of overdue-inspection e-mails sent (once per site
// per shift).
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('site_shifts')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('start_time', 'text', (c) => c.notNull().check(sql`start_time ~ '^([01][0-9]|2[0-3]):[0-5][0-9]$'`))
    .addUniqueConstraint('site_shifts_site_start', ['site_id', 'start_time'])
    .execute();

  await db.schema
    .createTable('inspections')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('excavation_id', 'integer', (c) => c.notNull().references('excavations.id'))
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id'))
    .addColumn('inspector_id', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('inspected_at', 'timestamptz', (c) => c.notNull())
    .addColumn('recorded_at', 'timestamptz', (c) => c.notNull())
    .addColumn('shift_name', 'text', (c) => c.notNull())
    .addColumn('shift_start', 'timestamptz', (c) => c.notNull())
    .addColumn('reason', 'text', (c) => c.notNull().check(sql`reason in ('shift-start','after-event','after-fall')`))
    .addColumn('reason_detail', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('checklist', 'jsonb', (c) => c.notNull())
    .addColumn('outcome', 'text', (c) => c.notNull().check(sql`outcome in ('safe','not-safe')`))
    .addColumn('remarks', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('client_ref', 'uuid', (c) => c.unique())
    .execute();
  await db.schema.createIndex('inspections_excavation_time').on('inspections').columns(['excavation_id', 'inspected_at']).execute();
  await db.schema.createIndex('inspections_site_time').on('inspections').columns(['site_id', 'inspected_at']).execute();

  // An inspection is a record: once written it is never changed or removed.
  await sql`
    create function inspection_refuse_change() returns trigger language plpgsql as $$
    begin
      raise exception 'inspection records are never changed: % is not allowed', tg_op;
    end $$`.execute(db);
  await sql`
    create trigger inspections_append_only before update or delete on inspections
    for each row execute function inspection_refuse_change()`.execute(db);

  await db.schema
    .createTable('inspection_photos')
    .addColumn('inspection_id', 'integer', (c) => c.notNull().references('inspections.id'))
    .addColumn('upload_id', 'integer', (c) => c.notNull().references('uploads.id'))
    .addColumn('position', 'integer', (c) => c.notNull())
    .addPrimaryKeyConstraint('inspection_photos_pk', ['inspection_id', 'position'])
    .execute();

  await db.schema
    .createTable('inspection_suspensions')
    .addColumn('inspection_id', 'integer', (c) => c.notNull().references('inspections.id'))
    .addColumn('permit_id', 'integer', (c) => c.notNull().references('permits.id'))
    .addPrimaryKeyConstraint('inspection_suspensions_pk', ['inspection_id', 'permit_id'])
    .execute();

  await db.schema
    .createTable('inspection_reminders')
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id').onDelete('cascade'))
    .addColumn('shift_start', 'timestamptz', (c) => c.notNull())
    .addColumn('sent_at', 'timestamptz', (c) => c.notNull())
    .addColumn('excavation_ids', 'jsonb', (c) => c.notNull())
    .addPrimaryKeyConstraint('inspection_reminders_pk', ['site_id', 'shift_start'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['inspection_reminders', 'inspection_suspensions', 'inspection_photos', 'inspections', 'site_shifts']) {
    await db.schema.dropTable(t).ifExists().execute();
  }
  await sql`drop function if exists inspection_refuse_change`.execute(db);
}
