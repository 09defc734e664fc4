import { sql, type Kysely } from 'kysely';

// Web Push: one row per device (browser) that asked to be told, owned by a person; removed when the
// person turns notifications off on that device or the push service says the subscription is gone.
// `push_deliveries` records each queued notification's key once the push service has taken it, so
// a job delivered again (after a crash or a retry) sends nothing.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('push_subscriptions')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('endpoint', 'text', (c) => c.notNull().unique())
    .addColumn('p256dh', 'text', (c) => c.notNull())
    .addColumn('auth', 'text', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema.createIndex('push_subscriptions_user').on('push_subscriptions').column('user_id').execute();
  await db.schema
    .createTable('push_deliveries')
    .addColumn('key', 'text', (c) => c.primaryKey())
    .addColumn('delivered_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('subscription_id', 'integer', (c) => c.notNull())
    .addColumn('outcome', 'text', (c) => c.notNull())
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('push_deliveries').ifExists().execute();
  await db.schema.dropTable('push_subscriptions').ifExists().execute();
}
