import { sql } from 'kysely';
import { createDb, createPool } from './database';
import { migrateToLatest } from './migrate';
import { seedDemoIfEmpty } from './demo';

// `npm run db:migrate | db:seed | db:reset` against DATABASE_URL.
const command = process.argv[2];
const url = process.env.DATABASE_URL;
if (!url) {
  console.error('DATABASE_URL is not set (npm start writes it to .data/database-url)');
  process.exit(2);
}
const pool = createPool(url, 2);
const db = createDb(pool);
try {
  if (command === 'reset') {
    await sql`drop schema public cascade`.execute(db);
    await sql`drop schema if exists pgboss cascade`.execute(db);
    await sql`create schema public`.execute(db);
  }
  if (command === 'migrate' || command === 'reset' || command === 'seed') {
    const ran = await migrateToLatest(db);
    console.log(ran.length ? `migrated: ${ran.join(', ')}` : 'database is up to date');
  }
  if (command === 'seed' || command === 'reset') {
    console.log(
      (await seedDemoIfEmpty(db))
        ? "seeded the demo site (Brink keeps its permits' checks when it starts)"
        : 'database already has people; not seeded',
    );
  }
  if (!['migrate', 'seed', 'reset'].includes(command ?? '')) {
    console.error('usage: tsx db/cli.ts migrate|seed|reset');
    process.exitCode = 2;
  }
} finally {
  await db.destroy();
}
