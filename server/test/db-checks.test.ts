import { sql } from 'kysely';
import { afterAll, expect, it } from 'vitest';
import { createDb, createPool } from '@db/database';
import { siteRoles } from '@shared/schemas/common';
import { excavationKinds, excavationStates } from '@shared/schemas/excavations';
import { inspectionReasons, outcomes } from '@shared/schemas/inspections';
import { attachmentKinds, permitKinds, permitStatuses } from '@shared/schemas/permits';
import { surchargeMethods } from '@shared/schemas/sites';
import { unitSystems } from '@shared/units';

// Roles, statuses and states are declared once, in shared/. The migrations write their CHECK lists
// out literally (an applied migration never changes), so this test reads the lists the database
// really enforces and compares them with the shared arrays: a name added on one side only fails here.
const shared: Record<string, readonly string[]> = {
  'site_members.role': siteRoles,
  'excavations.kind': excavationKinds,
  'excavations.state': excavationStates,
  'inspections.reason': inspectionReasons,
  'inspections.outcome': outcomes,
  'permits.status': permitStatuses,
  'permits.kind': permitKinds,
  'permit_revisions.method': surchargeMethods,
  'permit_attachments.kind': attachmentKinds,
  'sites.units': unitSystems,
  'users.units': unitSystems,
};

const db = createDb(createPool(process.env.DATABASE_URL!, 1));
afterAll(() => db.destroy());

/** Every CHECK of the form `column = ANY (ARRAY['a'::text, …])` (how PostgreSQL keeps `column in ('a', …)`), by table.column. */
async function checkLists(): Promise<Record<string, string[]>> {
  const rows = await sql<{ table: string; def: string }>`
    select conrelid::regclass::text as table, pg_get_constraintdef(oid) as def
    from pg_constraint where contype = 'c' and connamespace = 'public'::regnamespace`.execute(db);
  const out: Record<string, string[]> = {};
  for (const { table, def } of rows.rows) {
    const m = /^CHECK \(\((\w+) = ANY \(ARRAY\[(.*)\]\)\)\)$/.exec(def);
    if (m) out[`${table}.${m[1]}`] = [...m[2].matchAll(/'((?:[^']|'')*)'::text/g)].map((v) => v[1]);
  }
  return out;
}

it("the database's CHECK lists equal the shared arrays, and every such list has one", async () => {
  const lists = await checkLists();
  expect(Object.keys(lists).sort()).toEqual(Object.keys(shared).sort());
  for (const [column, names] of Object.entries(shared)) expect(lists[column], column).toEqual([...names]);
});
