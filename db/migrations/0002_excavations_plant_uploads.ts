import { sql, type Kysely } from 'kysely';

// Uploaded files, the site plan image, the excavation register and the plant library.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('uploads')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('site_id', 'integer', (c) => c.references('sites.id').onDelete('cascade'))
    .addColumn('purpose', 'text', (c) => c.notNull())
    .addColumn('original_name', 'text', (c) => c.notNull())
    .addColumn('mime', 'text', (c) => c.notNull())
    .addColumn('size', 'integer', (c) => c.notNull())
    .addColumn('storage_key', 'text', (c) => c.notNull().unique())
    .addColumn('uploaded_by', 'integer', (c) => c.references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .alterTable('sites')
    .addColumn('plan_upload_id', 'integer', (c) => c.references('uploads.id').onDelete('set null'))
    .addColumn('plan_bounds', 'jsonb')
    .addColumn('plan_opacity', 'double precision', (c) => c.notNull().defaultTo(0.7))
    .execute();

  await db.schema
    .createTable('excavations')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id').onDelete('cascade'))
    .addColumn('reference', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('trench','pit')`))
    .addColumn('geometry', 'jsonb', (c) => c.notNull())
    .addColumn('width', 'double precision')
    .addColumn('depth', 'double precision', (c) => c.notNull().check(sql`depth > 0`))
    .addColumn('state', 'text', (c) =>
      c
        .notNull()
        .defaultTo('planned')
        .check(sql`state in ('planned','open','backfilled')`),
    )
    .addColumn('support_type', 'text', (c) => c.notNull())
    .addColumn('design_surcharge', 'double precision', (c) => c.notNull().defaultTo(10))
    .addColumn('rated_pressure', 'double precision')
    .addColumn('restraint', 'text', (c) => c.notNull().defaultTo('unyielding'))
    .addColumn('pressure_state', 'text', (c) => c.notNull().defaultTo('active'))
    .addColumn('wall_friction', 'double precision', (c) => c.notNull().defaultTo(0))
    .addColumn('soil', 'jsonb', (c) => c.notNull())
    .addColumn('groundwater_depth', 'double precision')
    .addColumn('design_reference', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('drawing_upload_id', 'integer', (c) => c.references('uploads.id').onDelete('set null'))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_by', 'integer', (c) => c.references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('excavations_site_reference', ['site_id', 'reference'])
    .execute();

  await db.schema
    .createTable('plant_items')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('name', 'text', (c) => c.notNull().unique())
    .addColumn('category', 'text', (c) => c.notNull())
    .addColumn('operating_mass', 'double precision', (c) => c.notNull().check(sql`operating_mass > 0`))
    .addColumn('elements', 'jsonb', (c) => c.notNull())
    .addColumn('design_factor', 'double precision', (c) => c.notNull().defaultTo(1))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('plant_items').ifExists().execute();
  await db.schema.dropTable('excavations').ifExists().execute();
  await db.schema.alterTable('sites').dropColumn('plan_opacity').dropColumn('plan_bounds').dropColumn('plan_upload_id').execute();
  await db.schema.dropTable('uploads').ifExists().execute();
}
