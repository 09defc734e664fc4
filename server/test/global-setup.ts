import PgBoss from 'pg-boss';
import { sql } from 'kysely';
import { createDb, createPool } from '@db/database';
import { migrateToLatest } from '@db/migrate';
import { seedDemoIfEmpty } from '@db/demo';
import { FAKE_S3_KEY, startFakeS3 } from '../src/files/fake-s3';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { checkUnchecked } from '@server/services/permits/check';

// Once before the API tests: bring the test database up to date, seed the demo site (the tests
// use its people), keep its permits' checks and let the job queue create its schema before many app instances start.
export default async function setup(): Promise<() => Promise<void>> {
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
  // Uploads under STORAGE=s3 with no store named (a lone `npx vitest run`; npm test starts its own):
  // a fake S3 store for this run, in a throw-away folder, named to every test file.
  if (process.env.STORAGE === 's3' && !process.env.S3_ENDPOINT) {
    const dir = mkdtempSync(join(tmpdir(), 'brink-test-s3-'));
    const fake = await startFakeS3(dir);
    Object.assign(process.env, {
      S3_ENDPOINT: fake.url,
      S3_ACCESS_KEY_ID: FAKE_S3_KEY.accessKeyId,
      S3_SECRET_ACCESS_KEY: FAKE_S3_KEY.secretAccessKey,
    });
    return async () => {
      await fake.close();
      rmSync(dir, { recursive: true, force: true });
    };
  }
  return async () => {};
}
