import { afterAll, beforeAll, expect, it } from 'vitest';
import { sql } from 'kysely';
import { StoredShapeError, type Stored } from '@shared/schemas/stored';
import {
  storedAuditDetail,
  storedGeometry,
  storedOutline,
  storedSoil,
  storedZone,
  type StoredGeometry,
  type StoredSoil,
} from '@shared/schemas/excavations';
import { storedChecklist, storedConsequences, type Checklist, type Consequences } from '@shared/schemas/inspections';
import { storedElements, type PlantElement } from '@shared/schemas/plant';
import { storedCheck, storedEventDetail, type PermitCheck, type PermitEventDetail } from '@shared/schemas/permits';
import { startTestApp, type TestApp } from './helpers';
import { loadRevision } from '../src/services/permits/read';
import { createPermit, makeWorld, type PermitWorld } from './permits-fixtures';

// The jsonb columns (a permit revision's loads, dig, decision, plant and excavation snapshots and
// check with the engine's request; an excavation's geometry, soil, outline and influence zone; an
// inspection's checklist and consequences; a permit event's detail) are parsed with their shared
// schemas when read: the shapes old rows really have are read, and a shape
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

it('reads every stored excavation, inspection, consequence, machine, excavation audit entry and permit event', async () => {
  const db = t.deps.db;
  const excavations = await db.selectFrom('excavations').select(['geometry', 'soil', 'outline', 'influence_zone']).execute();
  expect(excavations.length).toBeGreaterThan(0);
  for (const r of excavations) {
    expect(storedGeometry(r.geometry).type).toMatch(/^(LineString|Polygon)$/);
    expect(() => storedSoil(r.soil)).not.toThrow();
    expect(() => [storedOutline(r.outline), storedZone(r.influence_zone)]).not.toThrow();
  }
  const inspections = await db.selectFrom('inspections').select('checklist').execute();
  expect(inspections.length).toBeGreaterThan(0);
  for (const r of inspections) expect(Object.keys(storedChecklist(r.checklist))).toContain('support');
  const consequences = await db.selectFrom('inspection_consequences').select('consequences').execute();
  for (const r of consequences) expect(storedConsequences(r.consequences)).toHaveProperty('suspended');
  const machines = await db.selectFrom('plant_items').select('elements').execute();
  expect(machines.length).toBeGreaterThan(0);
  for (const r of machines) expect(storedElements(r.elements).length).toBeGreaterThan(0);
  const audits = await db.selectFrom('audit_log').select('detail').where('entity', '=', 'excavation').execute();
  for (const r of audits) expect(typeof storedAuditDetail(r.detail)).toBe('object');
  const events = await db.selectFrom('permit_events').select('detail').execute();
  expect(events.length).toBeGreaterThan(0);
  for (const r of events) expect(typeof storedEventDetail(r.detail)).toBe('object');
});

// The drifted values below are made by SQL from stored rows (or written out) without changing a row:
// other test files read the same shared database at the same time.
it('refuses a drifted soil layer, geometry, machine element, checklist, consequence, event detail and check request, naming the field', async () => {
  const db = t.deps.db;
  const { soil, geometry } = await db
    .selectFrom('excavations')
    .select([
      sql<Stored<StoredSoil>>`jsonb_set(soil, '{0,unitWeight}', '"19 kN/m3"')`.as('soil'),
      sql<Stored<StoredGeometry>>`jsonb_set(geometry, '{type}', '"Point"')`.as('geometry'),
    ])
    .where('id', '=', w.trenchId)
    .executeTakeFirstOrThrow();
  expect(() => storedSoil(soil)).toThrow(/stored soil layer list does not have the shape Brink reads: 0\.unitWeight /);
  expect(() => storedGeometry(geometry)).toThrow(/stored excavation geometry does not have the shape Brink reads: type /);
  const { elements } = await db
    .selectFrom('plant_items')
    .select(sql<Stored<PlantElement[]>>`jsonb_set(elements, '{0,share}', 'null')`.as('elements'))
    .limit(1)
    .executeTakeFirstOrThrow();
  expect(() => storedElements(elements)).toThrow(/stored list of plant elements does not have the shape Brink reads: 0\.share /);

  const { checklist } = await db
    .selectFrom('inspections')
    .select(sql<Stored<Checklist>>`checklist - 'water'`.as('checklist'))
    .limit(1)
    .executeTakeFirstOrThrow();
  expect(() => storedChecklist(checklist)).toThrow(/stored inspection checklist does not have the shape Brink reads: water /);

  const { consequences, detail } = await sql<{ consequences: Stored<Consequences>; detail: Stored<PermitEventDetail> }>`
    select '{"suspended": [{"id": "7", "reference": "P-0007"}], "notSuspended": [], "notified": []}'::jsonb as consequences,
           '{"decision": {"action": "approve", "at": "2026-01-12T07:00:00.000Z"}}'::jsonb as detail`
    .execute(db)
    .then((r) => r.rows[0]);
  expect(() => storedConsequences(consequences)).toThrow(
    /stored inspection consequences does not have the shape Brink reads: suspended\.0\.id /,
  );
  expect(() => storedEventDetail(detail)).toThrow(/stored permit event detail does not have the shape Brink reads: decision\.by /);

  const p = await createPermit(w);
  const { check } = await db
    .selectFrom('permit_revisions')
    .select(sql<Stored<PermitCheck>>`jsonb_set(check_result, '{excavations,0,request,soil,0,unitWeight}', '"19"')`.as('check'))
    .where('permit_id', '=', p.id)
    .executeTakeFirstOrThrow();
  expect(() => storedCheck(check)).toThrow(
    /stored permit check does not have the shape Brink reads: excavations\.0\.request\.soil\.0\.unitWeight /,
  );
});
