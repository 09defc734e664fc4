import { sql, type Kysely } from 'kysely';

// Permits: the permit itself (number, kind, status, version), every revision of its content
// (window, excavations, placed loads, dig checks, the check result, the decision), the operators
// each revision names with their briefing confirmation, the timeline (append-only) and attachments.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('permits')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id').onDelete('cascade'))
    .addColumn('seq', 'integer', (c) => c.notNull())
    .addColumn('number', 'text', (c) => c.notNull())
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('load','dig')`))
    .addColumn('status', 'text', (c) =>
      c
        .notNull()
        .defaultTo('draft')
        .check(sql`status in ('draft','submitted','returned','approved','declined','live','suspended','handed_back','lapsed','withdrawn')`),
    )
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('revision', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('requested_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('reminder_sent_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('permits_site_seq', ['site_id', 'seq'])
    .addUniqueConstraint('permits_site_number', ['site_id', 'number'])
    .execute();
  await db.schema.createIndex('permits_site_status').on('permits').columns(['site_id', 'status']).execute();

  await db.schema
    .createTable('permit_revisions')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('permit_id', 'integer', (c) => c.notNull().references('permits.id').onDelete('cascade'))
    .addColumn('revision', 'integer', (c) => c.notNull())
    .addColumn('description', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('window_start', 'timestamptz', (c) => c.notNull())
    .addColumn('window_end', 'timestamptz', (c) => c.notNull())
    .addColumn('excavation_ids', sql`integer[]`, (c) => c.notNull().defaultTo(sql`'{}'::integer[]`))
    .addColumn('method', 'text', (c) => c.notNull().check(sql`method in ('dispersion-45','elastic')`))
    .addColumn('loads', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('dig', 'jsonb')
    .addColumn('check_result', 'jsonb')
    .addColumn('checked_at', 'timestamptz')
    .addColumn('decision', 'jsonb')
    .addColumn('created_by', 'integer', (c) => c.references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('permit_revisions_permit_revision', ['permit_id', 'revision'])
    .addCheckConstraint('permit_revisions_window', sql`window_end > window_start`)
    .execute();
  await sql`create index permit_revisions_excavations on permit_revisions using gin (excavation_ids)`.execute(db);

  // The operators a revision names; Live needs every one of them to have confirmed the briefing.
  await db.schema
    .createTable('permit_operators')
    .addColumn('revision_id', 'integer', (c) => c.notNull().references('permit_revisions.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('briefed_at', 'timestamptz')
    .addPrimaryKeyConstraint('permit_operators_pk', ['revision_id', 'user_id'])
    .execute();

  // The timeline: transitions, comments and briefings, never changed once written (only removed
  // with its permit, by the cascade).
  await db.schema
    .createTable('permit_events')
    .addColumn('id', 'bigint', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('permit_id', 'integer', (c) => c.notNull().references('permits.id').onDelete('cascade'))
    .addColumn('revision', 'integer', (c) => c.notNull())
    .addColumn('at', 'timestamptz', (c) => c.notNull())
    .addColumn('actor_id', 'integer', (c) => c.references('users.id'))
    .addColumn('actor_name', 'text', (c) => c.notNull())
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('from_status', 'text')
    .addColumn('to_status', 'text')
    .addColumn('comment', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('detail', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .execute();
  await db.schema.createIndex('permit_events_permit').on('permit_events').columns(['permit_id', 'id']).execute();
  await sql`
    create trigger permit_events_append_only before update or delete on permit_events
    for each row when (pg_trigger_depth() = 0)
    execute function audit_log_refuse_change()`.execute(db);

  await db.schema
    .createTable('permit_attachments')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('permit_id', 'integer', (c) => c.notNull().references('permits.id').onDelete('cascade'))
    .addColumn('revision', 'integer', (c) => c.notNull())
    .addColumn('upload_id', 'integer', (c) => c.notNull().unique().references('uploads.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('method-statement','photo','other')`))
    .addColumn('added_by', 'integer', (c) => c.references('users.id'))
    .addColumn('added_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['permit_attachments', 'permit_events', 'permit_operators', 'permit_revisions', 'permits']) {
    await db.schema.dropTable(t).ifExists().execute();
  }
}
