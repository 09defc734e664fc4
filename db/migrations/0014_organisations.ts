import { sql, type Kysely } from 'kysely';

// Issue 16 §1: an installation holds organisations; each owns its people, sites, invitations and
// plant library. The rows of an installation made before this migration move into one organisation
// it creates (an empty database gets none: the demo seed or `db/cli.ts organisation` makes them).
// A machine's name is unique within its organisation's library, no longer across the installation.
const OWNED = ['users', 'sites', 'invitations', 'plant_items'] as const;

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('organisations')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('name', 'text', (c) => c.notNull().unique())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  const { rows } = await sql<{ any: boolean }>`
    select exists (select 1 from users) or exists (select 1 from sites)
      or exists (select 1 from invitations) or exists (select 1 from plant_items) as any`.execute(db);
  const existing = rows[0]?.any
    ? (await sql<{ id: number }>`insert into organisations (name) values ('First organisation') returning id`.execute(db)).rows[0].id
    : null;
  for (const table of OWNED) {
    await sql`alter table ${sql.table(table)} add column organisation_id integer references organisations (id)`.execute(db);
    if (existing !== null) await sql`update ${sql.table(table)} set organisation_id = ${existing}`.execute(db);
    await sql`alter table ${sql.table(table)} alter column organisation_id set not null`.execute(db);
    await sql`create index ${sql.id(`${table}_organisation`)} on ${sql.table(table)} (organisation_id)`.execute(db);
  }
  await sql`alter table plant_items drop constraint plant_items_name_key`.execute(db);
  await sql`alter table plant_items add constraint plant_items_organisation_name_key unique (organisation_id, name)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table plant_items drop constraint plant_items_organisation_name_key`.execute(db);
  await sql`alter table plant_items add constraint plant_items_name_key unique (name)`.execute(db);
  for (const table of OWNED) await sql`alter table ${sql.table(table)} drop column organisation_id`.execute(db);
  await db.schema.dropTable('organisations').execute();
}
