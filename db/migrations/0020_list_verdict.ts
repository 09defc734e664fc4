import { sql, type Kysely } from 'kysely';

// Issue 16 §3: the permit lists show each permit's verdict (its utilisation and whether it passes),
// two fields of the stored check. Read from the check itself, every listed row unpacked the whole
// check (3.3 KB compressed on average in the large data set, kept out of line) before the rows were
// sorted and cut to a page: the text search "TR-019" over all sites matches 500 permits, and 7.4 of
// its 11.9 ms went there. The verdict is now a column PostgreSQL keeps with the check (a stored
// generated column, computed when the check is written), a few bytes in the row. Written with
// jsonb_set, as a generated column needs an immutable expression (jsonb_build_object is only stable):
// the same object as jsonb_build_object('utilisation', …, 'passes', …), a missing field null.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table permit_revisions add column verdict jsonb generated always as (
    case when check_result is not null
      then jsonb_set(
        jsonb_set('{}'::jsonb, '{utilisation}', coalesce(check_result->'utilisation', 'null'::jsonb)),
        '{passes}', coalesce(check_result->'passes', 'null'::jsonb)) end) stored`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table permit_revisions drop column if exists verdict`.execute(db);
}
