import { sql, type Kysely } from 'kysely';

// Delivered e-mail, by the idempotency key each queued message carries: the mail worker records
// the key once the SMTP server has accepted the message, and a job delivered again (after a crash
// or a retried batch) finds its key here and sends nothing.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('mail_deliveries')
    .addColumn('key', 'text', (c) => c.primaryKey())
    .addColumn('delivered_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('recipients', 'text', (c) => c.notNull())
    .addColumn('subject', 'text', (c) => c.notNull())
    .execute();
  // What a not-safe inspection set in motion (suspended permits, who was told), kept beside it (the
  // inspection itself is never changed) so that the same form sent again answers with the
  // consequences it caused.
  await db.schema
    .createTable('inspection_consequences')
    .addColumn('inspection_id', 'integer', (c) => c.primaryKey().references('inspections.id').onDelete('cascade'))
    .addColumn('consequences', 'jsonb', (c) => c.notNull())
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('inspection_consequences').ifExists().execute();
  await db.schema.dropTable('mail_deliveries').ifExists().execute();
}
