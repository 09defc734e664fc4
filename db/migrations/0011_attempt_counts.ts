import { type Kysely } from 'kysely';

// Attempt limits (sign-in, forgot-password, the password under a permit decision) counted in the
// database, so that every Brink server behind a load balancer sees the same counts: one row per
// limit and key (an account, an address), its count and when its window ends.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('attempt_counts')
    .addColumn('scope', 'text', (c) => c.notNull())
    .addColumn('key', 'text', (c) => c.notNull())
    .addColumn('count', 'integer', (c) => c.notNull())
    .addColumn('reset_at', 'timestamptz', (c) => c.notNull())
    .addPrimaryKeyConstraint('attempt_counts_pkey', ['scope', 'key'])
    .execute();
  await db.schema.createIndex('attempt_counts_reset_at').on('attempt_counts').column('reset_at').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('attempt_counts').ifExists().execute();
}
