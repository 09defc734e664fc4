import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type request from 'supertest';
import { addPerson, makeOrganisation, signedIn, startTestApp, type TestApp, demoOrganisationId, unique } from './helpers';
import { checklist } from '@shared/schemas/inspections';
import { act, addTrench, createPermit, excavatorAt, hoursFrom, makeWorld, newTrench, type PermitWorld } from './permits-fixtures';

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
    const list = (r.body.permits ?? r.body.excavations ?? r.body.users ?? r.body.inspections) as { id: number }[];
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

  it('counts every page of the list when asked (total), whatever page is read, and only when asked', async () => {
    const q = `/api/permits?siteId=${w.siteId}&excavationId=${w.trenchId}`;
    const all = (await w.agents.supervisor.get(`${q}&limit=500`).expect(200)).body.permits as unknown[];
    expect(all.length).toBeGreaterThanOrEqual(6);
    const first = await w.agents.supervisor.get(`${q}&limit=2&total=true`).expect(200);
    expect(first.body.permits).toHaveLength(2);
    expect(first.body.total).toBe(all.length);
    const second = await w.agents.supervisor.get(`${q}&limit=2&total=true&cursor=${encodeURIComponent(first.body.next)}`).expect(200);
    expect(second.body.total).toBe(all.length);
    // A filter counts only what it keeps: the status of the first permit, counted in the whole list.
    const status = (all as { status: string }[])[0].status;
    const filtered = await w.agents.supervisor.get(`${q}&status=${status}&limit=1&total=true`).expect(200);
    expect(filtered.body.total).toBe((all as { status: string }[]).filter((p) => p.status === status).length);
    expect((await w.agents.supervisor.get(`${q}&limit=2`).expect(200)).body).not.toHaveProperty('total');
    // A page after a cursor that holds no permit still counts the others: the cursor of every permit
    // but the last (by number: the one in today's window), under a window filter that leaves it out.
    const byNumber = (await w.agents.supervisor.get(`${q}&sort=number&order=asc&limit=${all.length - 1}`).expect(200)).body;
    const from = new Date(Date.now() + 24 * 3600_000).toISOString();
    const later = (all as { windowEnd: string }[]).filter((p) => new Date(p.windowEnd) > new Date(from));
    expect(later.length).toBeGreaterThan(0);
    const empty = await w.agents.supervisor
      .get(`${q}&sort=number&order=asc&from=${encodeURIComponent(from)}&total=true&cursor=${encodeURIComponent(byNumber.next)}`)
      .expect(200);
    expect(empty.body.permits).toEqual([]);
    expect(empty.body.total).toBe(later.length);
    const bad = await w.agents.supervisor.get(`${q}&total=maybe`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.total).toMatch(/true or false/);
  });

  it("shows each permit's verdict as its stored check has it (the column PostgreSQL keeps from the check)", async () => {
    const q = `/api/permits?siteId=${w.siteId}&excavationId=${w.trenchId}&limit=500`;
    const listed = (await w.agents.supervisor.get(q).expect(200)).body.permits as {
      id: number;
      utilisation: number | null;
      passes: boolean | null;
    }[];
    let checked = 0;
    for (const p of listed) {
      const { check } = (await w.agents.supervisor.get(`/api/permits/${p.id}`).expect(200)).body.permit.current as {
        check: { utilisation: number; passes: boolean } | null;
      };
      expect({ utilisation: p.utilisation, passes: p.passes }).toEqual(
        check ? { utilisation: check.utilisation, passes: check.passes } : { utilisation: null, passes: null },
      );
      if (check) checked += 1;
    }
    expect(checked).toBeGreaterThan(0);
  });

  it('refuses a cursor it did not give, naming the field', async () => {
    const r = await w.agents.supervisor.get(`/api/permits?siteId=${w.siteId}&cursor=not-a-cursor`);
    expect(r.status).toBe(400);
    expect(r.body.error.fields.cursor).toMatch(/not a cursor/);
  });

  it("refuses a cursor of another sort, and one whose key is not the sort's (not a database error)", async () => {
    const q = `/api/permits?siteId=${w.siteId}&excavationId=${w.trenchId}&limit=1`;
    const byStatus = (await w.agents.supervisor.get(`${q}&sort=status`).expect(200)).body.next as string;
    expect(byStatus).toBeTruthy();
    const other = await w.agents.supervisor.get(`${q}&sort=number&cursor=${encodeURIComponent(byStatus)}`);
    expect(other.status).toBe(400);
    expect(other.body.error.fields).toEqual({ cursor: 'is not a cursor this list gave' });
    // The right list's scope with a key that is not a number, made by hand.
    const [scope] = JSON.parse(Buffer.from(byStatus, 'base64url').toString()) as [string];
    const forged = Buffer.from(JSON.stringify([scope.replace(':status:', ':number:'), 'x); drop', 1])).toString('base64url');
    const r = await w.agents.supervisor.get(`${q}&sort=number&cursor=${forged}`);
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toEqual({ cursor: 'is not a cursor this list gave' });
  });

  it('finds a load by a label with quotes in it (the search then skips the indexed first step)', async () => {
    const r = await w.agents.supervisor.get(`/api/permits?siteId=${w.siteId}&q=${encodeURIComponent(`"${tag}" loader`)}`).expect(200);
    expect(r.body.permits.map((p: { id: number }) => p.id)).toEqual([quoted.id]);
  });
});

// Issue 16 §3: a dashboard view asks once (GET /api/sites/:siteId/dashboard) for what its panels
// show; each part is what the permit list and the inspection states answer when asked alone.
describe('the dashboard in one request', () => {
  const lists = {
    review: 'view=review&sort=updated&order=asc&limit=20&total=true',
    live: 'view=live&sort=windowStart&order=asc&limit=5&total=true',
    mine: 'view=mine&status=returned,draft,live,suspended,approved&sort=updated&order=desc',
  };
  /** The dashboard and the reads it stands for, until they agree (other files add permits to the same site meanwhile). */
  async function compare(agent: request.Agent, parts: (keyof typeof lists)[]) {
    let dashboard: Record<string, unknown> = {};
    let alone: Record<string, unknown> = {};
    for (let attempt = 0; attempt < 5; attempt++) {
      const [d, states, waiting, ...pages] = await Promise.all([
        agent.get(`/api/sites/${w.siteId}/dashboard`).expect(200),
        agent.get(`/api/sites/${w.siteId}/inspections/states`).expect(200),
        agent.get(`/api/sites/${w.siteId}/inspections/overdue`).expect(200),
        ...parts.map((p) => agent.get(`/api/permits?siteId=${w.siteId}&${lists[p]}`).expect(200)),
      ]);
      dashboard = d.body;
      // The inspections: the open excavations still waiting (as the overdue list has them) and how many are open.
      const inspections = { ...waiting.body, open: states.body.excavations.length };
      alone = Object.fromEntries([...parts.map((p, i) => [p, pages[i].body]), ['inspections', inspections]]);
      if (JSON.stringify(dashboard) === JSON.stringify(alone)) break;
    }
    expect(Object.keys(dashboard).sort()).toEqual([...parts, 'inspections'].sort());
    expect(dashboard).toEqual(alone);
  }

  it("gives a coordinator the permits awaiting their review, live now, and this shift's inspections", async () => {
    const sent = await createPermit(w);
    expect((await act(w.agents.supervisor, sent.id, { action: 'submit', version: sent.version })).status).toBe(200);
    await compare(w.agents.coordinator, ['review', 'live']);
    const d = await w.agents.coordinator.get(`/api/sites/${w.siteId}/dashboard`).expect(200);
    expect(d.body.review.total).toBeGreaterThanOrEqual(1);
    expect(d.body.review.permits.every((p: { status: string }) => p.status === 'submitted')).toBe(true);
  });

  it('gives a supervisor their own permits by what needs them, live now, and the inspections', async () => {
    await compare(w.agents.supervisor, ['mine', 'live']);
  });

  it('gives an operator the inspections only where the site gives them the duty, and an administrator of no role nothing', async () => {
    const inspector = unique('dash-op-inspects');
    const plain = unique('dash-op');
    const admin = unique('dash-admin');
    await addPerson(t.deps, {
      email: inspector,
      name: 'Ines Inspecting (test operator)',
      member: { siteId: w.siteId, role: 'operator', canInspect: true },
    });
    await addPerson(t.deps, { email: plain, name: 'Olu Plain (test operator)', member: { siteId: w.siteId, role: 'operator' } });
    await addPerson(t.deps, { email: admin, name: 'Ada Roleless (test administrator)', isAdmin: true });
    const withDuty = await (await signedIn(t.app, inspector)).get(`/api/sites/${w.siteId}/dashboard`).expect(200);
    expect(Object.keys(withDuty.body)).toEqual(['inspections']);
    expect(withDuty.body.inspections.open).toBeGreaterThan(0);
    expect(withDuty.body.inspections.excavations.every((e: { state: string }) => e.state !== 'ok')).toBe(true);
    const without = await (await signedIn(t.app, plain)).get(`/api/sites/${w.siteId}/dashboard`).expect(200);
    expect(without.body).toEqual({});
    const roleless = await (await signedIn(t.app, admin)).get(`/api/sites/${w.siteId}/dashboard`).expect(200);
    expect(roleless.body).toEqual({});
  });

  it("refuses another site's member (403) and a site id out of range, naming it (400)", async () => {
    await w.agents.outsider.get(`/api/sites/${w.siteId}/dashboard`).expect(403);
    const r = await w.agents.coordinator.get('/api/sites/2147483648/dashboard').expect(400);
    expect(JSON.stringify(r.body)).toContain('siteId');
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

describe('people pages', () => {
  it("follows next through an organisation's people by name, and refuses another organisation's cursor", async () => {
    const o = await makeOrganisation(t.deps, 'Pages');
    for (const name of ['Ada Pages', 'Ben Pages', 'Ben Pages', 'Cy Pages']) {
      await addPerson(t.deps, {
        organisationId: o.id,
        email: `${randomUUID().slice(0, 8)}-pages@example.test`,
        name,
        active: name !== 'Cy Pages',
      });
    }
    const admin = await signedIn(t.app, o.adminEmail);
    const whole = await admin.get('/api/users?limit=500').expect(200);
    expect(whole.body.next).toBeNull();
    const all = whole.body.users.map((u: { id: number }) => u.id);
    expect(whole.body.users.map((u: { name: string }) => u.name)).toEqual([
      'Ada Pages',
      'Ben Pages',
      'Ben Pages',
      'Cy Pages',
      'Pages Admin',
      'Pages Coordinator',
    ]);
    // Every page counts the whole organisation.
    expect(whole.body.counts).toEqual({ active: 5, total: 6 });
    // Two of the same name: the id breaks the tie at the page boundary.
    const paged = await follow(admin, '/api/users?limit=2');
    expect(paged.ids).toEqual(all);
    expect(paged.pages).toBe(3);
    const first = await admin.get('/api/users?limit=2').expect(200);
    expect(first.body.counts).toEqual({ active: 5, total: 6 });

    // The demo organisation's administrator cannot follow it: another organisation's list.
    const theirs = await w.agents.admin.get(`/api/users?limit=2&cursor=${encodeURIComponent(first.body.next)}`);
    expect(theirs.status).toBe(400);
    expect(theirs.body.error.fields).toEqual({ cursor: 'is not a cursor this list gave' });
    const forged = await admin.get('/api/users?cursor=bm90IGEgY3Vyc29y');
    expect(forged.status).toBe(400);
    expect(forged.body.error.fields).toEqual({ cursor: 'is not a cursor this list gave' });
  });
});

describe('inspection pages', () => {
  it("follows next through an excavation's inspections, newest first, and refuses another's cursor", async () => {
    const trench = await addTrench(t, w.siteId, w.origin);
    const other = await addTrench(t, w.siteId, w.origin);
    const form = {
      reason: 'shift-start',
      checklist: Object.fromEntries(checklist.map((c) => [c.key, { answer: c.key === 'atmosphere' ? 'na' : 'pass', note: '' }])),
      outcome: 'safe',
    };
    for (let i = 0; i < 5; i++) await w.agents.supervisor.post(`/api/excavations/${trench.id}/inspections`).send(form).expect(201);
    await w.agents.supervisor.post(`/api/excavations/${other.id}/inspections`).send(form).expect(201);
    const whole = await w.agents.supervisor.get(`/api/excavations/${trench.id}/inspections?limit=500`).expect(200);
    expect(whole.body.next).toBeNull();
    const all = whole.body.inspections.map((i: { id: number }) => i.id);
    expect(all).toHaveLength(5);
    const times = whole.body.inspections.map((i: { inspectedAt: string }) => i.inspectedAt);
    expect([...times].sort().reverse()).toEqual(times);
    const paged = await follow(w.agents.supervisor, `/api/excavations/${trench.id}/inspections?limit=2`);
    expect(paged.ids).toEqual(all);
    expect(paged.pages).toBe(3);

    const next = (await w.agents.supervisor.get(`/api/excavations/${trench.id}/inspections?limit=2`).expect(200)).body.next as string;
    const elsewhere = await w.agents.supervisor.get(`/api/excavations/${other.id}/inspections?cursor=${encodeURIComponent(next)}`);
    expect(elsewhere.status).toBe(400);
    expect(elsewhere.body.error.fields).toEqual({ cursor: 'is not a cursor this list gave' });
    const [scope, , id] = JSON.parse(Buffer.from(next, 'base64url').toString()) as [string, string, number];
    const forged = Buffer.from(JSON.stringify([scope, 'yesterday', id])).toString('base64url');
    const bad = await w.agents.supervisor.get(`/api/excavations/${trench.id}/inspections?cursor=${forged}`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toEqual({ cursor: 'is not a cursor this list gave' });
  });
});

describe('people search', () => {
  // Issue 16 §1: the people list searched by name or e-mail address in SQL, paged like the rest.
  let o: Awaited<ReturnType<typeof makeOrganisation>>;
  let admin: request.Agent;
  const word = `quell${tag}`;
  const add = (organisationId: number, name: string, local = randomUUID().slice(0, 8)) =>
    addPerson(t.deps, { organisationId, email: `${local}-search@example.test`, name });
  beforeAll(async () => {
    o = await makeOrganisation(t.deps, 'Search');
    for (const name of [
      `Marta ${word}`,
      `Ann ${word.toUpperCase()}-Smith`,
      `Bo ${word}`,
      'Quentin Abbot',
      'Ray 100% Sure',
      'Ray 1000 Sure',
    ])
      await add(o.id, name);
    // Found by the address alone.
    await add(o.id, 'Zed Other', `zed.${word}`);
    const other = await makeOrganisation(t.deps, 'Elsewhere');
    await add(other.id, `Elsewhere ${word}`);
    admin = await signedIn(t.app, o.adminEmail);
  });

  const names = (r: request.Response) => (r.body.users as { name: string }[]).map((u) => u.name);

  it('finds people by a part of the name or address, in any case, by name; the counts stay the whole organisation', async () => {
    const r = await admin.get(`/api/users?q=${encodeURIComponent(`  ${word.toUpperCase()} `)}`).expect(200);
    expect(names(r)).toEqual([`Ann ${word.toUpperCase()}-Smith`, `Bo ${word}`, `Marta ${word}`, 'Zed Other']);
    expect(r.body.next).toBeNull();
    expect(r.body.counts).toEqual({ active: 9, total: 9 });
    // % and _ are taken literally.
    expect(names(await admin.get(`/api/users?q=${encodeURIComponent('100%')}`).expect(200))).toEqual(['Ray 100% Sure']);
    expect(names(await admin.get(`/api/users?q=_`).expect(200))).toEqual([]);
    // An empty search is no search.
    expect(names(await admin.get('/api/users?q=%20').expect(200))).toHaveLength(9);
  });

  it('pages through the matches only, every one once', async () => {
    const whole = await admin.get(`/api/users?q=${word}&limit=500`).expect(200);
    const paged = await follow(admin, `/api/users?q=${word}&limit=1`);
    expect(paged.ids).toEqual(whole.body.users.map((u: { id: number }) => u.id));
    expect(paged.ids).toHaveLength(4);
    expect(paged.pages).toBe(4);
  });

  it("shows nobody of another organisation, and another organisation's cursor is refused", async () => {
    const ours = await admin.get(`/api/users?q=${word}&limit=500`).expect(200);
    expect(names(ours)).not.toContain(`Elsewhere ${word}`);
    const demo = await w.agents.admin.get(`/api/users?q=${word}`).expect(200);
    expect(names(demo)).toEqual([]);
    const next = (await admin.get(`/api/users?q=${word}&limit=1`).expect(200)).body.next as string;
    const theirs = await w.agents.admin.get(`/api/users?q=${word}&limit=1&cursor=${encodeURIComponent(next)}`);
    expect(theirs.status).toBe(400);
    expect(theirs.body.error.fields).toEqual({ cursor: 'is not a cursor this list gave' });
  });

  it('refuses a cursor of another search, or of no search, naming `cursor`', async () => {
    const searched = (await admin.get(`/api/users?q=${word}&limit=1`).expect(200)).body.next as string;
    const plain = (await admin.get('/api/users?limit=1').expect(200)).body.next as string;
    for (const [q, cursor] of [
      ['Marta', searched],
      ['', searched],
      [word, plain],
    ]) {
      const r = await admin.get(`/api/users?q=${q}&limit=1&cursor=${encodeURIComponent(cursor)}`);
      expect(r.status, `q=${q}`).toBe(400);
      expect(r.body.error.fields).toEqual({ cursor: 'is not a cursor this list gave' });
    }
  });

  it('refuses a search too long, or with a NUL, naming `q`', async () => {
    const long = await admin.get(`/api/users?q=${'a'.repeat(101)}`);
    expect(long.status).toBe(400);
    expect(long.body.error.fields).toEqual({ q: 'must be at most 100 characters' });
    expect((await admin.get(`/api/users?q=${'a'.repeat(100)}`).expect(200)).body.users).toEqual([]);
    const nul = await admin.get('/api/users?q=a%00b');
    expect(nul.status).toBe(400);
    expect(Object.keys(nul.body.error.fields)).toEqual(['q']);
  });
});
