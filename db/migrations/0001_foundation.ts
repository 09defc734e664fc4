import { sql, type Kysely } from 'kysely';

// People, sites, per-site roles, sessions, single-use tokens, the caught-mail store
// and the append-only audit log.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('users')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('email', 'text', (c) => c.notNull().unique())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('password_hash', 'text')
    .addColumn('is_admin', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('active', 'boolean', (c) => c.notNull().defaultTo(true))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .createTable('sites')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('latitude', 'double precision', (c) => c.notNull())
    .addColumn('longitude', 'double precision', (c) => c.notNull())
    .addColumn('timezone', 'text', (c) => c.notNull().defaultTo('Europe/London'))
    .addColumn('minimum_clearance', 'double precision', (c) => c.notNull().defaultTo(0.6))
    .addColumn('default_method', 'text', (c) => c.notNull().defaultTo('dispersion-45'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .createTable('site_members')
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('role', 'text', (c) => c.notNull().check(sql`role in ('supervisor','coordinator','operator')`))
    .addColumn('can_inspect', 'boolean', (c) => c.notNull().defaultTo(false))
    .addPrimaryKeyConstraint('site_members_pk', ['site_id', 'user_id'])
    .execute();

  await db.schema
    .createTable('invitations')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('is_admin', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('site_id', 'integer', (c) => c.references('sites.id').onDelete('cascade'))
    .addColumn('role', 'text')
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('invited_by', 'integer', (c) => c.references('users.id'))
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('used_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .createTable('password_resets')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('used_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .createTable('audit_log')
    .addColumn('id', 'bigint', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('actor_id', 'integer', (c) => c.references('users.id'))
    .addColumn('site_id', 'integer')
    .addColumn('entity', 'text', (c) => c.notNull())
    .addColumn('entity_id', 'text')
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('detail', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .execute();
  await db.schema.createIndex('audit_log_entity').on('audit_log').columns(['entity', 'entity_id']).execute();

  // The audit log is append-only: the database itself refuses to change or remove a row.
  await sql`
    create function audit_log_refuse_change() returns trigger language plpgsql as $$
    begin
      raise exception 'the audit log is append-only: % is not allowed', tg_op;
    end $$`.execute(db);
  await sql`
    create trigger audit_log_append_only before update or delete on audit_log
    for each row execute function audit_log_refuse_change()`.execute(db);
  await sql`
    create trigger audit_log_no_truncate before truncate on audit_log
    for each statement execute function audit_log_refuse_change()`.execute(db);

  await db.schema
    .createTable('caught_mail')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('received_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('mail_from', 'text', (c) => c.notNull())
    .addColumn('mail_to', 'text', (c) => c.notNull())
    .addColumn('subject', 'text', (c) => c.notNull())
    .addColumn('text', 'text', (c) => c.notNull())
    .addColumn('html', 'text')
    .execute();

  // connect-pg-simple's table.
  await sql`
    create table "session" (
      "sid" varchar not null primary key,
      "sess" json not null,
      "expire" timestamp(6) not null
    )`.execute(db);
  await sql`create index "IDX_session_expire" on "session" ("expire")`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['session', 'caught_mail', 'audit_log', 'password_resets', 'invitations', 'site_members', 'sites', 'users']) {
    await db.schema.dropTable(t).ifExists().execute();
  }
  await sql`drop function if exists audit_log_refuse_change`.execute(db);
}
