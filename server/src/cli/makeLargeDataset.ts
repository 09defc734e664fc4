/**
 * `npm run seed:large [-- --force]`: the invented organisation-sized data set of issue 16 §3 (100
 * sites, 20,000 excavations, 100,000 permits with their timelines, 200,000 inspections) in the
 * database at DATABASE_URL, migrated first. Refuses a database that already has people in it, or
 * one not on this machine, unless given --force. Prints what it made and how long it took.
 */
import { createDb, createPool } from '@db/database';
import { migrateToLatest } from '@db/migrate';
import { fullSize, seedLarge } from './largeDataset';

const url = process.env.DATABASE_URL;
if (!url) {
  console.error('DATABASE_URL is not set: name the (empty, local) database to fill');
  process.exit(2);
}
const force = process.argv.includes('--force');
const host = new URL(url).hostname;
if (!['127.0.0.1', 'localhost', '::1', '[::1]'].includes(host) && !force) {
  console.error(`DATABASE_URL points at ${host}, not this machine: refusing (give --force to fill it all the same)`);
  process.exit(2);
}
const db = createDb(createPool(url, 4));
try {
  await migrateToLatest(db);
  const someone = await db.selectFrom('users').select('id').limit(1).executeTakeFirst();
  const permit = await db.selectFrom('permits').select('id').limit(1).executeTakeFirst();
  if ((someone || permit) && !force) {
    console.error('That database is not empty (it has people or permits): refusing. Use an empty one, or give --force.');
    process.exitCode = 2;
  } else {
    const r = await seedLarge(db, fullSize, new Date(), (line) => console.log(`  ${line}`));
    console.log(
      `seeded ${r.sites} sites, ${r.excavations} excavations, ${r.permits} permits (${r.revisions} revisions, ${r.events} timeline lines), ` +
        `${r.inspections} inspections; ${r.layoutsChecked} layouts checked by the server's check; in ${r.seconds.toFixed(0)} s`,
    );
  }
} finally {
  await db.destroy();
}
