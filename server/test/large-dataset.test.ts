import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'kysely';
import type { Db } from '@db/database';
import { ownDatabase } from './helpers';
import { permitStatuses, transitionRules, type PermitAction } from '@shared/schemas/permits';
import { seedLarge, type LargeSeedReport } from '../src/cli/largeDataset';
import { loadDetail } from '../src/services/permits/read';
import { checkOfStored } from '../src/services/permits/check';
import { loadExcavations } from '../src/services/excavations';
import { inspectionStates } from '../src/services/inspections';

// Issue 16 §3: the generator of `npm run seed:large`, at a small size (2 sites), through the same
// code, on a database of its own: every row it makes reads through the app's own readers (the
// stored jsonb through their shared schemas), the database's CHECK constraints held as it wrote,
// every timeline ends where its permit stands by steps the status machine allows, and a copied check
// is what the server's check finds for that permit.

let db: Db;
let drop: () => Promise<void>;
let report: LargeSeedReport;
// Noon on the site's clock (London, winter or summer), so that today's day shift (07:00) has begun
// whatever the hour the test runs.
const now = new Date(`${new Date().toISOString().slice(0, 10)}T11:00:00Z`);
const size = { sites: 2, excavationsPerSite: 20, permitsPerSite: 100, inspectionsPerSite: 40 };

beforeAll(async () => {
  ({ db, drop } = await ownDatabase('brink_large_seed'));
  report = await seedLarge(db, size, now);
}, 120_000);

afterAll(async () => {
  await drop?.();
});

describe('the large seed, made small', () => {
  it('makes the rows asked for', () => {
    expect(report).toMatchObject({
      sites: 2,
      excavations: 40,
      permits: 200,
      revisions: 200,
      inspections: 80,
    });
    expect(report.events).toBeGreaterThan(report.permits);
  });

  it('has permits in every status, load and dig', async () => {
    const rows = await db.selectFrom('permits').select(['status', 'kind']).distinct().execute();
    expect(new Set(rows.map((r) => r.status))).toEqual(new Set(permitStatuses));
    expect(new Set(rows.map((r) => r.kind))).toEqual(new Set(['load', 'dig']));
  });

  it('reads every permit through the app (loads, dig, decision, check and snapshots parsed)', async () => {
    const ids = await db.selectFrom('permits').select('id').orderBy('id').execute();
    for (const { id } of ids) {
      const p = await loadDetail(db, id, { id: 0, role: 'coordinator' });
      expect(p, `permit ${id}`).not.toBeNull();
      if (p!.kind === 'load') {
        expect(p!.current.loads).toHaveLength(1);
        expect(p!.current.check, `${p!.number}'s check`).not.toBeNull();
        expect(p!.current.check!.excavations[0].excavationId).toBe(p!.excavationIds[0]);
        expect(p!.current.plantSnapshot === null).toBe(p!.status === 'draft');
      } else expect(p!.current.dig).not.toBeNull();
      if (['approved', 'live', 'suspended', 'handed_back', 'lapsed', 'returned', 'declined'].includes(p!.status))
        expect(p!.current.decision, `${p!.number}'s decision`).not.toBeNull();
    }
  });

  it('keeps each timeline to the status machine and ending where the permit stands', async () => {
    const events = await db
      .selectFrom('permit_events as e')
      .innerJoin('permits as p', 'p.id', 'e.permit_id')
      .select(['p.id', 'p.status', 'e.action', 'e.from_status', 'e.to_status'])
      .orderBy('p.id')
      .orderBy('e.id')
      .execute();
    const byPermit = new Map<number, typeof events>();
    for (const e of events) byPermit.set(e.id, [...(byPermit.get(e.id) ?? []), e]);
    expect(byPermit.size).toBe(report.permits);
    for (const [id, list] of byPermit) {
      const moves = list.filter((e) => e.to_status);
      expect(moves[0], `permit ${id}`).toMatchObject({ action: 'create', to_status: 'draft' });
      for (const [i, m] of moves.entries()) {
        if (i === 0) continue;
        expect(m.from_status, `permit ${id} step ${i}`).toBe(moves[i - 1].to_status);
        const rule = transitionRules[m.action as PermitAction];
        expect(rule.from, `permit ${id}: ${m.action}`).toContain(m.from_status);
        expect(rule.to).toBe(m.to_status);
      }
      expect(moves.at(-1)!.to_status, `permit ${id}`).toBe(list[0].status);
    }
  });

  it('has every operator of a live or suspended permit briefed, and no live permit beside an excavation found not safe', async () => {
    const unbriefed = await db
      .selectFrom('permits as p')
      .innerJoin('permit_revisions as r', 'r.permit_id', 'p.id')
      .innerJoin('permit_operators as o', 'o.revision_id', 'r.id')
      .select('p.id')
      .where('p.status', 'in', ['live', 'suspended'])
      .where('o.briefed_at', 'is', null)
      .execute();
    expect(unbriefed).toEqual([]);
    const unsafe = await sql<{ id: number }>`
      select p.id from permits p join permit_revisions r on r.permit_id = p.id and r.revision = p.revision
      where p.status = 'live' and exists (
        select 1 from excavations e where e.id = any(r.excavation_ids) and (
          select i.outcome from inspections i where i.excavation_id = e.id order by i.inspected_at desc limit 1) = 'not-safe')`.execute(db);
    expect(unsafe.rows).toEqual([]);
  });

  it('copies each check as the server would find it for that permit', async () => {
    const copies = await db
      .selectFrom('permits')
      .select('id')
      .where('kind', '=', 'load')
      .where('status', 'in', ['approved', 'live', 'draft'])
      .orderBy('id', 'desc')
      .limit(6)
      .execute();
    expect(copies.length).toBeGreaterThan(0);
    for (const { id } of copies) {
      const stored = (await loadDetail(db, id, { id: 0, role: null }))!.current.check!;
      const fresh = (await checkOfStored(db, id, now)).check;
      const { checkedAt: _a, ...s } = stored;
      const { checkedAt: _b, ...f } = fresh;
      expect(JSON.parse(JSON.stringify(s)), `permit ${id}`).toEqual(JSON.parse(JSON.stringify(f)));
    }
  });

  it('reads every site’s excavations and this shift’s inspections through the app', async () => {
    const sites = await db.selectFrom('sites').select('id').execute();
    for (const s of sites) {
      const list = await loadExcavations(db, s.id);
      expect(list).toHaveLength(size.excavationsPerSite);
      expect(list.every((e) => e.outline && e.influenceZone)).toBe(true);
      const states = await inspectionStates(db, s.id, now);
      const open = list.filter((e) => e.state === 'open').length;
      expect(states.excavations).toHaveLength(open);
      // 40 inspections over 17 open excavations: two full shifts back, and 6 in this one.
      expect(states.excavations.filter((e) => e.state === 'ok')).toHaveLength(size.inspectionsPerSite % open);
    }
  });
});
