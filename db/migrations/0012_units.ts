import { sql, type Kysely } from 'kysely';

// US customary units (docs/calculation.md, "Units"): each site has default units for its people, and
// each person may choose their own (null: follow the site's). Figures stay in SI everywhere in the
// database; only how people read and type them changes.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable('sites')
    .addColumn('units', 'text', (c) =>
      c
        .notNull()
        .defaultTo('metric')
        .check(sql`units in ('metric', 'us')`),
    )
    .execute();
  await db.schema
    .alterTable('users')
    .addColumn('units', 'text', (c) => c.check(sql`units in ('metric', 'us')`))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('users').dropColumn('units').execute();
  await db.schema.alterTable('sites').dropColumn('units').execute();
}
