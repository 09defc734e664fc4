import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { permitActions, permitStatuses } from '@shared/schemas/permits';
import { allowedTransitions, needsReason, roleFor, signedActions } from './expected-transitions';
import { DEMO_PASSWORD, demo, demoSiteId, startTestApp, type TestApp } from './helpers';
import { transition } from '../src/services/permits/machine';
import { preparedTextCount } from '@db/database';
import { checkUnchecked } from '../src/services/permits/check';
import { withCurrentRevision } from '../src/services/permits/read';
import {
  act,
  createPermit,
  excavatorAt,
  forceStatus,
  makeWorld,
  newTrench,
  permitBody,
  submitAndApprove,
  trenchBeside,
  version,
  type PermitWorld,
} from './permits-fixtures';

let t: TestApp;
let w: PermitWorld;
beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_IP: '1000' });
  w = await makeWorld(t);
});
afterAll(async () => t.stop());

type Who = 'coordinator' | 'supervisor' | 'operator' | 'outsider' | 'admin';
const people: Who[] = ['outsider', 'admin', 'operator', 'supervisor', 'coordinator'];

/** What a body needs for each action to be accepted when it is allowed. */
function bodyFor(action: string, v: number): Record<string, unknown> {
  return {
    action,
    version: v,
    ...(needsReason.includes(action) ? { reason: 'Table test reason' } : {}),
    ...(signedActions.includes(action) ? { password: DEMO_PASSWORD } : {}),
  };
}

describe('the status machine, for every status, action and role', () => {
  // Expectations from the hand-written list (./expected-transitions.ts), never from the table under test.
  for (const status of permitStatuses) {
    for (const action of permitActions) {
      const allowed = allowedTransitions.find((x) => x.action === action && x.from === status);
      it(`${action} from ${status}`, async () => {
        const p = await createPermit(w);
        const v = await forceStatus(w, p.id, status);
        let now = v;
        for (const who of people) {
          const r = await act(w.agents[who], p.id, bodyFor(action, v));
          const roleOk = roleFor(action) === who;
          const expected = !roleOk ? 403 : !allowed ? 409 : 200;
          expect(r.status, `${who} ${action} from ${status}: ${JSON.stringify(r.body)}`).toBe(expected);
          if (expected === 200) {
            expect(r.body.permit.status).toBe(allowed?.to);
            expect(r.body.permit.version).toBe(v + 1);
            const events = r.body.permit.events.filter((e: { action: string }) => e.action === action);
            expect(events).toHaveLength(1);
            expect(events[0]).toMatchObject({ fromStatus: status, toStatus: allowed?.to });
            if (needsReason.includes(action)) expect(events[0].comment).toBe('Table test reason');
            now = v + 1;
          } else {
            // a refused change leaves the permit as it was
            expect(await version(w, p.id)).toBe(now);
          }
        }
      });
    }
  }

  it('offers each person exactly the actions the table allows them', async () => {
    const p = await createPermit(w);
    const asSupervisor = await w.agents.supervisor.get(`/api/permits/${p.id}`);
    expect(asSupervisor.body.permit.actions.sort()).toEqual(['submit', 'withdraw']);
    const asCoordinator = await w.agents.coordinator.get(`/api/permits/${p.id}`);
    expect(asCoordinator.body.permit.actions).toEqual([]);
  });

  it('records the audit log for a transition', async () => {
    const p = await createPermit(w);
    await act(w.agents.supervisor, p.id, { action: 'withdraw', version: p.version }).expect(200);
    const rows = await t.deps.db
      .selectFrom('audit_log')
      .selectAll()
      .where('entity', '=', 'permit')
      .where('entity_id', '=', String(p.id))
      .orderBy('id')
      .execute();
    expect(rows.map((r) => r.action)).toEqual(['created', 'withdraw']);
  });
});

describe('two coordinators deciding at once', () => {
  it('lets one win; the other gets 409 and the permit as it now is', async () => {
    const p = await createPermit(w);
    const s = await act(w.agents.supervisor, p.id, { action: 'submit', version: p.version });
    expect(s.status).toBe(200);
    const v = s.body.permit.version;
    const [a, b] = await Promise.all([
      act(w.agents.coordinator, p.id, { action: 'approve', version: v, password: DEMO_PASSWORD }),
      act(w.agents.coordinator2, p.id, { action: 'decline', version: v, password: DEMO_PASSWORD, reason: 'Not this week' }),
    ]);
    const statuses = [a.status, b.status].sort();
    expect(statuses).toEqual([200, 409]);
    const loser = a.status === 409 ? a : b;
    const winner = a.status === 200 ? a : b;
    expect(loser.body.permit.status).toBe(winner.body.permit.status);
    expect(loser.body.permit.version).toBe(v + 1);
    expect(loser.body.error.message).toMatch(/changed since you opened it/);
  });

  it('refuses a change quoting an old version', async () => {
    const p = await createPermit(w);
    await w.agents.supervisor.patch(`/api/permits/${p.id}`).send({ version: p.version, description: 'First change' }).expect(200);
    const stale = await w.agents.supervisor
      .patch(`/api/permits/${p.id}`)
      .send({ version: p.version, description: 'Second change from an old screen' });
    expect(stale.status).toBe(409);
    expect(stale.body.permit.description).toBe('First change');
  });
});

describe('editing', () => {
  it('names each bad field and keeps what was saved', async () => {
    const p = await createPermit(w);
    const bad = await w.agents.supervisor
      .patch(`/api/permits/${p.id}`)
      .send({ version: p.version, windowEnd: 'tomorrow', excavationIds: [999999], loads: [{ id: 'x', kind: 'stockpile' }] });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['windowEnd', 'loads[0].outline']));
    const after = await w.agents.supervisor.get(`/api/permits/${p.id}`);
    expect(after.body.permit.version).toBe(p.version);
    expect(after.body.permit.current.loads).toHaveLength(1);
  });

  it('refuses a load that touches the excavation, naming it, and saves nothing', async () => {
    const p = await createPermit(w);
    const onTheEdge = excavatorAt(w, -0.2);
    const r = await w.agents.supervisor.patch(`/api/permits/${p.id}`).send({ version: p.version, loads: [onTheEdge] });
    expect(r.status).toBe(400);
    expect(r.body.error.fields['loads[0]']).toMatch(new RegExp(`touches or overlaps excavation ${w.trenchRef}`));
    const after = await w.agents.supervisor.get(`/api/permits/${p.id}`);
    expect(after.body.permit.version).toBe(p.version);
  });

  it('freezes an approved permit: a change is a new revision that goes back to review, and the old one is kept', async () => {
    const p = await createPermit(w);
    const approved = await submitAndApprove(w, p.id, { conditions: ['Banksman present'] });
    expect(approved.status).toBe('approved');
    const frozen = await w.agents.supervisor
      .patch(`/api/permits/${p.id}`)
      .send({ version: approved.version, description: 'Sneaky change' });
    expect(frozen.status).toBe(409);
    const revised = await act(w.agents.supervisor, p.id, { action: 'revise', version: approved.version, reason: 'Longer window needed' });
    expect(revised.status).toBe(200);
    expect(revised.body.permit).toMatchObject({ status: 'draft', revision: 2 });
    expect(revised.body.permit.current.decision).toBeNull();
    await w.agents.supervisor
      .patch(`/api/permits/${p.id}`)
      .send({ version: revised.body.permit.version, description: 'Longer window' })
      .expect(200);
    const first = await w.agents.coordinator.get(`/api/permits/${p.id}/revisions/1`);
    expect(first.status).toBe(200);
    expect(first.body.revision.description).toBe('Excavator loading out spoil beside the trench');
    expect(first.body.revision.decision).toMatchObject({ action: 'approve', conditions: ['Banksman present'] });
    const list = await w.agents.coordinator.get(`/api/permits/${p.id}`);
    expect(list.body.permit.revisions.map((r: { revision: number }) => r.revision)).toEqual([2, 1]);
  });
});

describe('the cumulative check', () => {
  it('checks an open excavation the permit does not name when a load stands within its influence zone, and says so', async () => {
    await newTrench(w);
    // A second trench 6 m north: the excavator 0.5 m north of the named one has its far track
    // 1.7 m from the second trench's edge, inside its influence zone (2.4 m deep).
    const beside = await trenchBeside(w, 6);
    const p = await createPermit(w, { loads: [excavatorAt(w, 0.5)] });
    const r = await w.agents.supervisor.post(`/api/permits/${p.id}/check`).send({});
    expect(r.status).toBe(200);
    const checks = r.body.check.excavations as { excavationId: number; named: boolean }[];
    expect(checks.map((c) => [c.excavationId, c.named])).toEqual([
      [w.trenchId, true],
      [beside.id, false],
    ]);
    expect(r.body.check.warnings).toEqual(
      expect.arrayContaining([expect.stringContaining(`${beside.reference} is not named on this permit`)]),
    );
    // The answer leaves out the pressure profiles (the stored check keeps them for the permit page).
    expect(r.body.check.excavations[0].result).toMatchObject({ passes: expect.any(Boolean) });
    expect(r.body.check.excavations[0].result).not.toHaveProperty('profile');
    const stored = await w.agents.supervisor.get(`/api/permits/${p.id}`);
    expect(stored.body.permit.current.check.excavations[0].result.profile.length).toBeGreaterThan(10);
    // It cannot go for review until the reached excavation is named too.
    const submit = await act(w.agents.supervisor, p.id, { action: 'submit', version: p.version });
    expect(submit.status).toBe(400);
    expect(submit.body.error.fields.excavationIds).toContain(beside.reference);
    // Later tests get a trench with no neighbour.
    await newTrench(w);
  });

  beforeAll(async () => newTrench(w));
  it('counts an approved-and-live permit whose window overlaps, and ignores one whose window does not', async () => {
    const now = t.deps.now();
    const h = (n: number) => new Date(now.getTime() + n * 3600_000).toISOString();
    // A live permit beside the same trench during the next hours.
    const live = await createPermit(w, { loads: [excavatorAt(w, 1.4, 'live-exc')], windowStart: h(-1), windowEnd: h(6), operatorIds: [] });
    // 1.4 m from the edge the excavator alone fails: approved with a recorded reason (tested below).
    await submitAndApprove(w, live.id, { reason: 'Frames checked for this machine by the designer' });
    const liveNow = await w.agents.coordinator.get(`/api/permits/${live.id}`);
    expect(liveNow.body.permit.status).toBe('live'); // window open, no operators to brief
    // An approved permit next week.
    const later = await createPermit(w, { loads: [excavatorAt(w, 1.4, 'later-exc')], windowStart: h(24 * 7), windowEnd: h(24 * 7 + 8) });
    await submitAndApprove(w, later.id, { reason: 'Frames checked for this machine by the designer' });

    const mine = await createPermit(w, { loads: [excavatorAt(w, 1.6)], windowStart: h(1), windowEnd: h(4) });
    const r = await w.agents.supervisor.post(`/api/permits/${mine.id}/check`).send({});
    expect(r.status).toBe(200);
    const ex = r.body.check.excavations.find((e: { excavationId: number }) => e.excavationId === w.trenchId);
    const counted = ex.counted.map((c: { number: string }) => c.number);
    expect(counted).toContain(live.number);
    expect(counted).not.toContain(later.number);
    // The live permit's tracks are in the engine's request, and make the utilisation larger than this permit's alone.
    const others = ex.loads.filter((l: { own: boolean }) => !l.own);
    expect(others.map((l: { permitNumber: string }) => l.permitNumber)).toEqual([live.number, live.number]);
    expect(ex.request.loads).toHaveLength(4);
    const alone = await w.agents.supervisor
      .post(`/api/permits/${mine.id}/check`)
      .send({ windowStart: h(24 * 30), windowEnd: h(24 * 30 + 1) });
    const aloneEx = alone.body.check.excavations[0];
    expect(aloneEx.counted).toEqual([]);
    expect(ex.result.utilisation).toBeGreaterThan(aloneEx.result.utilisation);
    expect(ex.result.forces.surcharge).toBeGreaterThan(aloneEx.result.forces.surcharge);
  });

  it('reads what it checks with statements whose text does not change with the permit (each prepared once per connection)', async () => {
    await newTrench(w);
    const beside = await trenchBeside(w, 6);
    const p = await createPermit(w, { loads: [excavatorAt(w, 0.5)] });
    const first = await w.agents.supervisor.post(`/api/permits/${p.id}/check`).send({});
    expect(first.status).toBe(200);
    const texts = preparedTextCount();
    expect(texts).toBeGreaterThan(0);
    // Two excavations named, two loads, another window: the same statements, so nothing more to prepare.
    const now = t.deps.now();
    const second = excavatorAt(w, 0.5, 'exc-2'); // moved about 7 m east of the first, below
    if (second.kind !== 'plant') throw new Error('the excavator is a machine');
    const more = await w.agents.supervisor.post(`/api/permits/${p.id}/check`).send({
      excavationIds: [w.trenchId, beside.id],
      loads: [excavatorAt(w, 0.5), { ...second, position: [second.position[0] + 0.0001, second.position[1]] }],
      windowStart: new Date(now.getTime() + 48 * 3600_000).toISOString(),
      windowEnd: new Date(now.getTime() + 50 * 3600_000).toISOString(),
    });
    expect(more.status).toBe(200);
    expect(more.body.check.excavations).toHaveLength(2);
    expect(preparedTextCount()).toBe(texts);
    await newTrench(w);
  });

  it('gives red close to the trench with a standoff, and a pass at the standoff', async () => {
    await newTrench(w); // nobody else's loads beside it
    const p = await createPermit(w, { loads: [excavatorAt(w, 0.3)] });
    const near = await w.agents.supervisor.post(`/api/permits/${p.id}/check`).send({});
    expect(near.body.check.passes).toBe(false);
    expect(near.body.check.verdict).toBe('fails');
    const standoff = near.body.check.computedStandoff;
    // More than the 0.6 m minimum clearance, so a centimetre closer is a real failure of the check.
    expect(standoff).toBeGreaterThan(0.6);
    // Placed at its standoff the machine passes, and a centimetre closer it fails (the definition of the standoff).
    const at = await w.agents.supervisor.post(`/api/permits/${p.id}/check`).send({ loads: [excavatorAt(w, standoff + 0.005)] });
    expect(at.body.check.passes).toBe(true);
    const closer = await w.agents.supervisor.post(`/api/permits/${p.id}/check`).send({ loads: [excavatorAt(w, standoff - 0.015)] });
    expect(closer.body.check.passes).toBe(false);
  });
});

describe('approving with a standoff', () => {
  beforeAll(async () => newTrench(w));
  async function submittedNearTheEdge() {
    const p = await createPermit(w, { loads: [excavatorAt(w, 0.3)] });
    const s = await act(w.agents.supervisor, p.id, { action: 'submit', version: p.version });
    expect(s.status).toBe(200);
    return { id: p.id, version: s.body.permit.version as number, computed: s.body.permit.current.check.computedStandoff as number };
  }
  /** The coordinator approves `p`, signing with their password, with the rest of `body` (standoff, reason, conditions). */
  const approve = (p: { id: number; version: number }, body: Record<string, unknown> = {}) =>
    act(w.agents.coordinator, p.id, { action: 'approve', version: p.version, password: DEMO_PASSWORD, ...body });
  /** A refused approval changed nothing: the permit still waits for review. */
  const stillSubmitted = async (p: { id: number }) =>
    expect((await w.agents.coordinator.get(`/api/permits/${p.id}`)).body.permit.status).toBe('submitted');

  it('refuses a standoff below the computed one without a reason (400 naming the standoff)', async () => {
    const p = await submittedNearTheEdge();
    const r = await approve(p, { standoff: p.computed - 0.5 });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.standoff).toMatch(/must be at least/);
    await stillSubmitted(p);
  });

  it('accepts a standoff below the computed one with a recorded reason', async () => {
    const p = await submittedNearTheEdge();
    const r = await approve(p, { standoff: p.computed - 0.5, reason: 'Designer confirmed the frames take it (calc ref TW-12)' });
    expect(r.status).toBe(200);
    expect(r.body.permit.current.decision).toMatchObject({
      standoff: p.computed - 0.5,
      reason: 'Designer confirmed the frames take it (calc ref TW-12)',
    });
  });

  it('refuses a standoff at least the computed one without a reason while the loads as placed fail the cumulative check', async () => {
    const p = await submittedNearTheEdge();
    const r = await approve(p, { standoff: Math.ceil(p.computed) + 1 });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)).toEqual(['reason']);
    await stillSubmitted(p);
  });

  it('accepts a standoff at least the computed one, with conditions and a reason, and records the signature', async () => {
    const p = await submittedNearTheEdge();
    const r = await approve(p, {
      standoff: Math.ceil(p.computed) + 1,
      conditions: ['No tracking inside the zone'],
      reason: 'Approved for the standoff: the machine works from there',
    });
    expect(r.status).toBe(200);
    const d = r.body.permit.current.decision;
    expect(d).toMatchObject({
      action: 'approve',
      standoff: Math.ceil(p.computed) + 1,
      computedStandoff: p.computed,
      conditions: ['No tracking inside the zone'],
    });
    expect(d.by.name).toMatch(/Colm Ridley/);
    expect(d.signature).toMatch(/^Signed by Colm Ridley/);
  });

  it('refuses a plain approval of a failing check without a reason, and a wrong password', async () => {
    const p = await submittedNearTheEdge();
    const plain = await approve(p);
    expect(plain.status).toBe(400);
    expect(plain.body.error.fields.reason).toBeDefined();
    const wrong = await approve(p, { password: 'not-my-password', standoff: 10 });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields.password).toBe('is not the one you sign in with: type it again');
    const none = await act(w.agents.coordinator, p.id, { action: 'decline', version: p.version, reason: 'x' });
    expect(none.status).toBe(400);
    expect(none.body.error.fields.password).toMatch(/required/);
  });
});

describe('ids of 2³¹ and above in a body', () => {
  it('refuses each with 400 naming the field, never 500, and keeps nothing', async () => {
    const big = 2147483648;
    const cases: [string, Record<string, unknown>][] = [
      ['siteId', { siteId: big }],
      ['excavationIds[0]', { excavationIds: [big] }],
      ['loads[0].plantItemId', { loads: [{ ...excavatorAt(w, 4), plantItemId: big }] }],
      ['operatorIds[0]', { operatorIds: [big] }],
    ];
    const before = await t.deps.db
      .selectFrom('permits')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    for (const [field, over] of cases) {
      const r = await w.agents.supervisor.post('/api/permits').send({ ...permitBody(w), ...over });
      expect([field, r.status]).toEqual([field, 400]);
      expect(r.body.error.fields[field]).toMatch(/below 2³¹/);
    }
    const after = await t.deps.db
      .selectFrom('permits')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n));
    const invitation = await w.agents.admin
      .post('/api/invitations')
      .send({ email: `${randomUUID()}@example.test`, name: 'Big', siteId: big, role: 'operator' });
    expect(invitation.status).toBe(400);
    expect(invitation.body.error.fields.siteId).toMatch(/below 2³¹/);
  });
});

describe('lists', () => {
  it('shows awaiting my review, my requests, live now and all with filters and sorting', async () => {
    const a = await createPermit(w, { description: 'List test A' });
    const b = await createPermit(w, { description: 'List test B' });
    await act(w.agents.supervisor, b.id, { action: 'submit', version: b.version }).expect(200);
    const review = await w.agents.coordinator.get('/api/permits?view=review');
    expect(review.body.permits.map((p: { id: number }) => p.id)).toContain(b.id);
    expect(review.body.permits.map((p: { id: number }) => p.id)).not.toContain(a.id);
    expect((await w.agents.supervisor.get('/api/permits?view=review')).body.permits).toEqual([]);
    const mine = await w.agents.supervisor.get(
      `/api/permits?view=mine&siteId=${w.siteId}&excavationId=${w.trenchId}&status=draft&sort=number&order=asc`,
    );
    const ids = mine.body.permits.map((p: { id: number }) => p.id);
    expect(ids).toContain(a.id);
    expect(ids).not.toContain(b.id);
    expect([...ids].sort((x: number, y: number) => x - y)).toEqual(ids);
    const bad = await w.agents.supervisor.get('/api/permits?status=pending');
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.status).toMatch(/unknown status pending/);
    expect((await w.agents.outsider.get(`/api/permits?siteId=${w.siteId}`)).status).toBe(403);
    expect((await w.agents.outsider.get('/api/permits')).body.permits.some((p: { siteId: number }) => p.siteId === w.siteId)).toBe(false);
  });
});

describe('text search of the list', () => {
  it('finds words in the reference, the work, a named excavation and a machine, case-insensitive, % and _ taken literally', async () => {
    await newTrench(w);
    const tag = randomUUID().slice(0, 8);
    const a = await createPermit(w, {
      description: `Spoil heap at 50% of bay ${tag}`,
      loads: [{ ...excavatorAt(w, 4), label: 'Loader bucket' }],
    });
    const b = await createPermit(w, { description: `Quiet bay ${tag}`, loads: [] });
    const found = async (q: string) => {
      const r = await w.agents.supervisor.get(`/api/permits?siteId=${w.siteId}&q=${encodeURIComponent(q)}`).expect(200);
      return r.body.permits.map((p: { id: number }) => p.id) as number[];
    };
    expect(await found(tag.toUpperCase())).toEqual(expect.arrayContaining([a.id, b.id]));
    expect(await found(`50% of bay ${tag}`)).toEqual([a.id]);
    expect(await found(`5_% of bay ${tag}`)).toEqual([]); // _ is a character, not a wildcard
    expect(await found(a.number)).toEqual([a.id]);
    expect(await found(w.trenchRef.toLowerCase())).toEqual(expect.arrayContaining([a.id, b.id])); // both name the fresh trench
    const byMachine = await found('excavator 21');
    expect(byMachine).toContain(a.id);
    expect(byMachine).not.toContain(b.id);
    expect(await found('loader BUCKET')).toContain(a.id);
    expect(await found(`nothing-${randomUUID()}`)).toEqual([]);
    const long = await w.agents.supervisor.get(`/api/permits?q=${'x'.repeat(101)}`);
    expect(long.status).toBe(400);
    expect(long.body.error.fields.q).toMatch(/at most 100 characters/);
  });

  it("searches a permit's current revision only: words of an earlier revision no longer find it, on one site or all", async () => {
    const tag = randomUUID().slice(0, 8);
    const p = await createPermit(w, { description: `Old words ${tag}` });
    const approved = await submitAndApprove(w, p.id);
    const revised = await act(w.agents.supervisor, p.id, { action: 'revise', version: approved.version, reason: 'New work' });
    expect(revised.status).toBe(200);
    const found = async (q: string, site: boolean) => {
      const r = await w.agents.supervisor.get(`/api/permits?${site ? `siteId=${w.siteId}&` : ''}q=${encodeURIComponent(q)}`).expect(200);
      return r.body.permits.map((x: { id: number }) => x.id) as number[];
    };
    expect(await found(`Old words ${tag}`, true)).toEqual([p.id]); // revision 2 copies the words
    await w.agents.supervisor
      .patch(`/api/permits/${p.id}`)
      .send({ version: revised.body.permit.version, description: `New words ${tag}` })
      .expect(200);
    for (const site of [true, false]) {
      expect(await found(`Old words ${tag}`, site)).toEqual([]);
      expect(await found(`New words ${tag}`, site)).toEqual([p.id]);
    }
  });
});

describe('dig permits', () => {
  it('need the buried-services checks done before review, each with who and when', async () => {
    const p = await createPermit(w, {
      kind: 'dig',
      loads: [],
      dig: {
        depth: 1.2,
        supportMethod: 'Battered back at 45°',
        servicesChecks: {
          drawings: { state: 'done', by: 'Sana Whitlock', at: new Date().toISOString() },
          locatorScan: { state: 'pending' },
          trialHoles: { state: 'pending' },
        },
      },
    });
    const early = await act(w.agents.supervisor, p.id, { action: 'submit', version: p.version });
    expect(early.status).toBe(400);
    expect(Object.keys(early.body.error.fields).sort()).toEqual(['dig.servicesChecks.locatorScan', 'dig.servicesChecks.trialHoles']);
    const missingWho = await w.agents.supervisor.patch(`/api/permits/${p.id}`).send({
      version: p.version,
      dig: {
        depth: 1.2,
        supportMethod: 'Battered',
        servicesChecks: {
          drawings: { state: 'done', by: 'S', at: new Date().toISOString() },
          locatorScan: { state: 'done' },
          trialHoles: { state: 'not-needed' },
        },
      },
    });
    expect(missingWho.status).toBe(400);
    expect(Object.keys(missingWho.body.error.fields).sort()).toEqual([
      'dig.servicesChecks.locatorScan.at',
      'dig.servicesChecks.locatorScan.by',
      'dig.servicesChecks.trialHoles.notes',
    ]);
    const done = await w.agents.supervisor.patch(`/api/permits/${p.id}`).send({
      version: p.version,
      dig: {
        depth: 1.2,
        supportMethod: 'Battered back at 45°',
        servicesChecks: {
          drawings: { state: 'done', by: 'Sana Whitlock', at: new Date().toISOString() },
          locatorScan: { state: 'done', by: 'Sana Whitlock', at: new Date().toISOString(), notes: 'One cable found at 0.6 m' },
          trialHoles: { state: 'done', by: 'Owen Petts', at: new Date().toISOString() },
        },
      },
    });
    expect(done.status).toBe(200);
    expect((await act(w.agents.supervisor, p.id, { action: 'submit', version: done.body.permit.version })).status).toBe(200);
  });
});

it('makes new permit numbers per site in order', async () => {
  const a = await createPermit(w);
  const b = await createPermit(w);
  expect(a.number).toMatch(/^P-\d{4}$/);
  // Other test files make permits on the same site at the same time: later numbers are larger.
  expect(Number(b.number.slice(2))).toBeGreaterThan(Number(a.number.slice(2)));
});

it('refuses a request from someone who is not a supervisor on the site', async () => {
  expect((await w.agents.coordinator.post('/api/permits').send(permitBody(w))).status).toBe(403);
  expect((await w.agents.outsider.post('/api/permits').send(permitBody(w))).status).toBe(403);
});

describe('drafts', () => {
  it('need a description and an excavation before they are created, each named as the form labels it', async () => {
    const r = await w.agents.supervisor.post('/api/permits').send(permitBody(w, { description: '   ', excavationIds: [] }));
    expect(r.status).toBe(400);
    expect(r.body.error.fields.description).toMatch(/is required/);
    expect(r.body.error.fields.excavationIds).toMatch(/at least one excavation/);
    const long = await w.agents.supervisor.post('/api/permits').send(permitBody(w, { description: 'x'.repeat(1001) }));
    expect(long.body.error.fields.description).toBe('must be at most 1000 characters');
  });

  it('withdrawn before ever being sent for review, tell nobody; withdrawn after, tell the coordinators', async () => {
    const supervisor = await t.deps.db
      .selectFrom('users')
      .select(['id', 'name'])
      .where('id', '=', w.supervisorId)
      .executeTakeFirstOrThrow();
    const actor = { kind: 'user' as const, id: supervisor.id, name: supervisor.name };
    const never = await createPermit(w);
    const quiet = await transition(t.deps, never.id, 'withdraw', actor, { version: never.version });
    expect(quiet.to).toBe('withdrawn');
    expect(quiet.notified).toEqual([]);
    const sent = await createPermit(w);
    const s = await act(w.agents.supervisor, sent.id, { action: 'submit', version: sent.version });
    expect(s.status).toBe(200);
    const told = await transition(t.deps, sent.id, 'withdraw', actor, { version: s.body.permit.version });
    expect(told.notified).toEqual(expect.arrayContaining([demo.coordinator, w.coordinator2Email]));
  });
});

const storedCheck = async (id: number) =>
  (await withCurrentRevision(t.deps.db).select('r.check_result').where('p.id', '=', id).executeTakeFirstOrThrow()).check_result;

describe('a permit stored without a check', () => {
  it('is not checked by reading it; the start-up step keeps its check once', async () => {
    const p = await createPermit(w);
    expect(await storedCheck(p.id)).not.toBeNull();
    // As the demo seed stores its permits (or a database from before checks were kept).
    await t.deps.db.updateTable('permit_revisions').set({ check_result: null, checked_at: null }).where('permit_id', '=', p.id).execute();

    const read = await w.agents.supervisor.get(`/api/permits/${p.id}`);
    expect(read.status).toBe(200);
    expect(read.body.permit.current.check).toBeNull();
    expect(await storedCheck(p.id)).toBeNull();
    expect((await w.agents.supervisor.get(`/api/permits/${p.id}/pdf`)).status).toBe(200);
    expect(await storedCheck(p.id)).toBeNull();

    expect(await checkUnchecked(t.deps.db, t.deps.now(), [p.id])).toEqual({ checked: [p.number], refused: [] });
    const after = await w.agents.supervisor.get(`/api/permits/${p.id}`);
    expect(after.body.permit.current.check.excavations.map((e: { excavationId: number }) => e.excavationId)).toEqual([w.trenchId]);
    expect(await checkUnchecked(t.deps.db, t.deps.now(), [p.id])).toEqual({ checked: [], refused: [] });
  });

  it('the demo permits counted in checks (approved P-0004, live P-0005, suspended P-0006) have theirs before anyone reads them', async () => {
    const siteId = await demoSiteId(t.deps);
    const rows = await withCurrentRevision(t.deps.db)
      .select(['p.number', 'p.status', 'r.check_result'])
      .where('p.site_id', '=', siteId)
      .where('p.number', 'in', ['P-0004', 'P-0005', 'P-0006'])
      .orderBy('p.number')
      .execute();
    expect(rows.map((r) => [r.number, r.status, r.check_result !== null])).toEqual([
      ['P-0004', 'approved', true],
      ['P-0005', 'live', true],
      ['P-0006', 'suspended', true],
    ]);
  });
});
