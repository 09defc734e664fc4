import PgBoss from 'pg-boss';
import { sql } from 'kysely';
import { createDb, createPool } from '@db/database';
import { migrateToLatest } from '@db/migrate';
import { seedDemoIfEmpty } from '@db/demo';
import { checkUnchecked } from '@server/services/permits/check';

// Once before the API tests: bring the test database up to date, seed the demo site (the tests
// use its people), keep its permits' checks and let the job queue create its schema before many app instances start.
export default async function setup(): Promise<void> {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is not set: run the API tests through `npm test`');
  const db = createDb(createPool(url, 2));
  await migrateToLatest(db);
  await seedDemoIfEmpty(db);
  // As Brink does when it starts: the demo permits get their checks.
  await checkUnchecked(db, new Date());
  // Places for test trenches (server/test/permits-fixtures.ts), one each.
  await sql`create sequence if not exists test_trench_slot`.execute(db);
  await db.destroy();
  const boss = new PgBoss({ connectionString: url, max: 2, supervise: false, schedule: false });
  await boss.start();
  await boss.stop({ graceful: false });
}
