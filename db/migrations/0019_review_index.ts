import { sql, type Kysely } from 'kysely';

// Issue 16 §3: a site's permits of one status in the order of their last change, read from the index
// alone. The dashboard's "awaiting my review" (status submitted, oldest change first) walked the site's
// permits by change (permits_site_updated) and dropped the other statuses: on the large data set's
// site of 1,000 permits, 547 index entries read and 526 dropped for 21 shown; with the status in the
// key it reads the 21. Its first two columns are the index it replaces (permits_site_status), which
// every other site-and-status filter keeps using.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create index permits_site_status_updated on permits (site_id, status, updated_at, id)`.execute(db);
  await sql`drop index if exists permits_site_status`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`create index if not exists permits_site_status on permits (site_id, status)`.execute(db);
  await sql`drop index if exists permits_site_status_updated`.execute(db);
}
