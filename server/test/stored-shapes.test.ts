import { afterAll, beforeAll, expect, it } from 'vitest';
import { sql } from 'kysely';
import { StoredShapeError } from '@shared/schemas/stored';
import { startTestApp, type TestApp } from './helpers';
import { loadRevision } from '../src/services/permits/read';
import { createPermit, makeWorld, type PermitWorld } from './permits-fixtures';

// The permit jsonb columns (loads, dig, decision, plant and excavation snapshots, the check) are
// parsed with their shared schemas when read: the shapes old rows really have are read, and a shape
// that drifted is refused naming the column and the field, never passed on to a screen or a PDF.

let t: TestApp;
let w: PermitWorld;
beforeAll(async () => {
  t = await startTestApp();
  w = await makeWorld(t);
});
afterAll(async () => t.stop());

it('reads every stored revision, the demo seed’s included (decisions without a computed standoff)', async () => {
  const rows = await t.deps.db.selectFrom('permit_revisions').select(['permit_id', 'revision', 'decision']).execute();
  expect(rows.some((r) => r.decision !== null)).toBe(true);
  for (const r of rows) await expect(loadRevision(t.deps.db, r.permit_id, r.revision)).resolves.not.toBeNull();
});

/** Runs `body` with the permit's revision drifted by `drift`, then puts the row back (the test database is shared). */
async function drifted(permitId: number, drift: ReturnType<typeof sql>, body: () => Promise<void>): Promise<void> {
  const before = await t.deps.db
    .selectFrom('permit_revisions')
    .select(['id', 'loads', 'decision'])
    .where('permit_id', '=', permitId)
    .execute();
  await sql`update permit_revisions set ${drift} where permit_id = ${permitId}`.execute(t.deps.db);
  try {
    await body();
  } finally {
    for (const r of before)
      await t.deps.db
        .updateTable('permit_revisions')
        .set({ loads: JSON.stringify(r.loads), decision: r.decision === null ? null : JSON.stringify(r.decision) })
        .where('id', '=', r.id)
        .execute();
  }
}

it('refuses a drifted stored load with an error naming the column and the field, and the API answers 500 without detail', async () => {
  const p = await createPermit(w);
  // A load as no Brink writes it: the machine named by `plantId` instead of `plantItemId`.
  await drifted(p.id, sql`loads = jsonb_set(loads, '{0}', (loads->0) - 'plantItemId' || '{"plantId": 1}')`, async () => {
    const read = loadRevision(t.deps.db, p.id, 1);
    await expect(read).rejects.toBeInstanceOf(StoredShapeError);
    await expect(read).rejects.toThrow(/stored list of placed loads does not have the shape Brink reads: 0\.plantItemId/);
    const r = await w.agents.supervisor.get(`/api/permits/${p.id}`);
    expect(r.status).toBe(500);
    expect(r.body.error.code).toBe('server_error');
  });
  await expect(loadRevision(t.deps.db, p.id, 1)).resolves.not.toBeNull();
});

it('refuses a drifted stored decision, naming the field', async () => {
  const p = await createPermit(w);
  await drifted(p.id, sql`decision = '{"action": "approved", "by": {"id": 1, "name": "A"}}'::jsonb`, async () => {
    await expect(loadRevision(t.deps.db, p.id, 1)).rejects.toThrow(/stored permit decision does not have the shape Brink reads: action /);
  });
});
