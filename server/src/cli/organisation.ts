/**
 * `npm run organisation -- "Name" admin@example.com ["Admin's name"]`: the installation operator
 * makes a new organisation (issue 16 §1) in the database at DATABASE_URL and invites its first
 * administrator. Prints the invitation's link (PUBLIC_URL's origin) for the operator to send: it
 * works once, for 72 hours. The administrator then invites the organisation's people and makes its sites.
 */
import { z } from 'zod';
import { createDb, createPool } from '@db/database';
import { migrateToLatest } from '@db/migrate';
import { emailSchema, nameSchema } from '@shared/schemas/common';
import { createOrganisation } from '../services/organisation';

const args = z.tuple([nameSchema, emailSchema]).rest(nameSchema).safeParse(process.argv.slice(2));
const url = process.env.DATABASE_URL;
if (!url) {
  console.error('DATABASE_URL is not set (npm start writes it to .data/database-url)');
  process.exit(2);
}
if (!args.success) {
  for (const i of args.error.issues)
    console.error(`${['Organisation name', 'Administrator e-mail'][Number(i.path[0])] ?? 'Administrator name'} ${i.message}`);
  console.error('usage: npm run organisation -- "Organisation name" admin@example.com ["Administrator name"]');
  process.exit(2);
}
const [name, adminEmail, adminName] = args.data;
const db = createDb(createPool(url, 1));
try {
  await migrateToLatest(db);
  const made = await createOrganisation(db, {
    name,
    adminEmail,
    adminName: adminName ?? adminEmail.split('@')[0],
    publicUrl: (process.env.PUBLIC_URL || 'http://localhost:3000').replace(/\/$/, ''),
    now: new Date(),
  });
  console.log(`Organisation "${name}" made (id ${made.organisationId}). Send ${adminEmail} this link to become its administrator:`);
  console.log(made.link);
} catch (e) {
  console.error(e instanceof Error ? e.message : e);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
