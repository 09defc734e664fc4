import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type request from 'supertest';
import { startTestApp, type TestApp, demoOrganisationId } from './helpers';
import { addTrench, createPermit, excavatorAt, hoursFrom, makeWorld, newTrench, type PermitWorld } from './permits-fixtures';

// Issue 16 §1: long lists come a page at a time (keyset: ordered by the sort, then the id), each
// answer naming the cursor of the next page; following the cursors gives every row once, in the
// order of one long page, and a cursor the list did not give is refused naming `cursor`.

let t: TestApp;
let w: PermitWorld;
let quoted: { id: number };
const tag = randomUUID().slice(0, 8);
beforeAll(async () => {
  t = await startTestApp();
  w = await makeWorld(t);
  await newTrench(w);
  const base = new Date(Date.now() + 48 * 3600_000);
  // Two share a window start, so the id breaks the tie between pages.
  for (const h of [5, 1, 3, 3, 2]) await createPermit(w, { windowStart: hoursFrom(base, h), windowEnd: hoursFrom(base, h + 4) });
  quoted = await createPermit(w, { loads: [{ ...excavatorAt(w, 4), label: `Bay "${tag}" loader` }] });
});
afterAll(async () => t.stop());

async function follow(agent: request.Agent, path: string): Promise<{ ids: number[]; pages: number }> {
  const ids: number[] = [];
  let pages = 0;
  let cursor: string | null = null;
  do {
    const r: request.Response = await agent.get(`${path}${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ''}`).expect(200);
    const list = (r.body.permits ?? r.body.excavations) as { id: number }[];
    ids.push(...list.map((x) => x.id));
    cursor = r.body.next;
    pages += 1;
  } while (cursor && pages < 50);
  return { ids, pages };
}

describe('permit list pages', () => {
  for (const [sort, order] of [
    ['updated', 'desc'],
    ['windowStart', 'asc'],
    ['number', 'desc'],
    ['status', 'asc'],
  ] as const) {
    it(`follows next to the end in the order of one page (${sort} ${order})`, async () => {
      // Only this file's permits (its own trench): other files add permits to the same site meanwhile.
      const q = `/api/permits?siteId=${w.siteId}&excavationId=${w.trenchId}&sort=${sort}&order=${order}`;
      const whole = await w.agents.supervisor.get(`${q}&limit=500`).expect(200);
      expect(whole.body.next).toBeNull();
      const all = whole.body.permits.map((p: { id: number }) => p.id);
      expect(all.length).toBeGreaterThanOrEqual(6);
      const paged = await follow(w.agents.supervisor, `${q}&limit=2`);
      expect(paged.ids).toEqual(all);
      expect(paged.pages).toBe(Math.ceil(all.length / 2));
    });
  }

  it('refuses a cursor it did not give, naming the field', async () => {
    const r = await w.agents.supervisor.get(`/api/permits?siteId=${w.siteId}&cursor=not-a-cursor`);
    expect(r.status).toBe(400);
    expect(r.body.error.fields.cursor).toMatch(/not a cursor/);
  });

  it('finds a load by a label with quotes in it (the search then skips the indexed first step)', async () => {
    const r = await w.agents.supervisor.get(`/api/permits?siteId=${w.siteId}&q=${encodeURIComponent(`"${tag}" loader`)}`).expect(200);
    expect(r.body.permits.map((p: { id: number }) => p.id)).toEqual([quoted.id]);
  });
});

describe('excavation pages', () => {
  it('follows next to the end, by reference, every excavation once', async () => {
    // A site of its own: other files add excavations to the demo site meanwhile.
    const site = await t.deps.db
      .insertInto('sites')
      .values({
        organisation_id: await demoOrganisationId(t.deps),
        name: 'Pages test site (invented)',
        latitude: w.origin[1],
        longitude: w.origin[0],
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    for (let i = 0; i < 3; i++) await addTrench(t, site.id, w.origin);
    const whole = await w.agents.admin.get(`/api/sites/${site.id}/excavations`).expect(200);
    expect(whole.body.next).toBeNull();
    const all = whole.body.excavations.map((e: { id: number }) => e.id);
    expect(all).toHaveLength(3);
    const paged = await follow(w.agents.admin, `/api/sites/${site.id}/excavations?limit=1`);
    expect(paged.ids).toEqual(all);
    expect(paged.pages).toBe(3);
  });
});
