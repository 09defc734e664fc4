import { randomUUID } from 'node:crypto';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { PermitCheck, PermitDetail } from '@shared/schemas/permits';
import { checkStoredRevision } from '../src/services/permits/check';
import { demo, DEMO_PASSWORD, startTestApp, waitForMail, type TestApp } from './helpers';
import { act, createPermit, excavatorAt, hoursFrom, makeWorld, newTrench, submitAndApprove, type PermitWorld } from './permits-fixtures';

/**
 * An approval stays true to its inputs: the machines are frozen when a permit is sent for review,
 * and a change to an excavation's check inputs re-checks the permits that stand on it, in the
 * change's own transaction. Figures below come from Brink's own check of the test trench (1.0 m
 * wide, hydraulic frames, sand γ 19 kN/m³, φ′ 30°) and the 21 t excavator's tracks; they are the
 * scenario, not check values of the calculation (those are in shared/engineering's tests).
 */
let t: TestApp;
let w: PermitWorld;

beforeAll(async () => {
  t = await startTestApp();
  w = await makeWorld(t);
});
afterAll(async () => t.stop());

async function detail(id: number): Promise<PermitDetail> {
  const r = await w.agents.supervisor.get(`/api/permits/${id}`);
  expect(r.status).toBe(200);
  return r.body.permit;
}

async function excavation(id = w.trenchId) {
  return t.deps.db
    .selectFrom('excavations')
    .select(['id', 'version', 'depth', 'rated_pressure'])
    .where('id', '=', id)
    .executeTakeFirstOrThrow();
}

async function patchExcavation(agent: PermitWorld['agents'][keyof PermitWorld['agents']], body: Record<string, unknown>) {
  const e = await excavation();
  return agent.patch(`/api/sites/${w.siteId}/excavations/${w.trenchId}`).send({ version: e.version, ...body });
}

/** A fresh trench whose frames are rated for 25 kPa: deepening it loads them more. */
async function ratedTrench(): Promise<void> {
  await newTrench(w);
  const r = await patchExcavation(w.agents.coordinator, { ratedPressure: 25 });
  expect(r.status).toBe(200);
}

/** A permit for the excavator 3.0 m clear of the trench, approved; live at once when `live` (no operator to brief). */
async function approvedPermit(opts: { live: boolean; clear?: number; operators?: boolean; standoff?: number }) {
  const now = t.deps.now();
  const p = await createPermit(w, {
    loads: [excavatorAt(w, opts.clear ?? 3.0)],
    operatorIds: opts.operators ? [w.operatorId] : [],
    ...(opts.live ? {} : { windowStart: hoursFrom(now, 4), windowEnd: hoursFrom(now, 12) }),
  });
  await submitAndApprove(w, p.id, opts.standoff !== undefined ? { standoff: opts.standoff } : {});
  if (opts.operators && opts.live) expect((await w.agents.operator.post(`/api/permits/${p.id}/briefing`)).status).toBe(200);
  const d = await detail(p.id);
  expect(d.status).toBe(opts.live ? 'live' : 'approved');
  return d;
}

async function outboxFor(number: string): Promise<number> {
  const { rows } = await sql<{
    n: number;
  }>`select count(*)::int as n from pgboss.job where name = ${t.deps.mailer.queue} and data::text like ${`%Permit ${number} %`}`.execute(
    t.deps.db,
  );
  return rows[0].n;
}

describe('snapshot at submission', () => {
  it('a library edit after approval leaves the approved standoff unchanged; drafts take the new figures', async () => {
    await newTrench(w);
    // A machine of this test's own in the shared library (other test files use the demo ones).
    const name = `Excavator 21 t (recheck ${randomUUID().slice(0, 4)})`;
    const tracks = [
      { name: 'Left track', kind: 'track', x: 0, y: 1.1, length: 3.35, width: 0.6, share: 0.5 },
      { name: 'Right track', kind: 'track', x: 0, y: -1.1, length: 3.35, width: 0.6, share: 0.5 },
    ];
    const item = { name, category: 'excavator', operatingMass: 21, elements: tracks };
    const made = await w.agents.coordinator.post('/api/plant').send(item);
    expect(made.status).toBe(201);
    const machine = made.body.item;
    const load = { ...excavatorAt(w, 1.0), plantItemId: machine.id };

    const p = await createPermit(w, { loads: [load], operatorIds: [] });
    await submitAndApprove(w, p.id);
    const approved = await detail(p.id);
    const standoff = approved.current.check!.computedStandoff!;
    expect(approved.current.plantSnapshot!.machines).toEqual([expect.objectContaining({ id: machine.id, name, operatingMass: 21 })]);

    // A coordinator of another site makes the machine twice as heavy in the shared library.
    const edited = await w.agents.outsider.patch(`/api/plant/${machine.id}`).send({ ...item, operatingMass: 42, version: machine.version });
    expect(edited.status).toBe(200);

    // The approved permit's check, run again, uses the machine as it was when it was sent for review.
    const again = await checkStoredRevision(t.deps.db, p.id, t.deps.now());
    expect(again.computedStandoff).toBe(standoff);
    const after = await detail(p.id);
    expect(after.current.check!.computedStandoff).toBe(standoff);
    expect(after.current.plantSnapshot!.machines[0].operatingMass).toBe(21);
    // The phone draws the frozen machine's tracks (3.35 m × 0.6 m), not a changed one.
    const field = await w.agents.supervisor.get(`/api/field/permits/${p.id}`);
    expect(field.status).toBe(200);

    // A draft with the same machine is checked with the library as it is now: a larger standoff.
    const draft = await createPermit(w, { loads: [load], operatorIds: [] });
    const d = await detail(draft.id);
    expect(d.current.plantSnapshot).toBeNull();
    expect(d.current.check!.computedStandoff!).toBeGreaterThan(standoff + 0.5);
  });
});

describe('re-check on change', () => {
  it('deepening a trench suspends a live permit that now fails, with the reason on the timeline and e-mailed', async () => {
    await ratedTrench();
    const p = await approvedPermit({ live: true, operators: true });
    expect(p.current.check!.passes).toBe(true);

    const r = await patchExcavation(w.agents.coordinator, { depth: 3.2 });
    expect(r.status).toBe(200);
    expect(r.body.rechecked).toEqual([expect.objectContaining({ permitId: p.id, outcome: 'suspended' })]);

    const after = await detail(p.id);
    expect(after.status).toBe('suspended');
    const reason = after.events.at(-1)!;
    expect(reason).toMatchObject({ action: 'suspend', fromStatus: 'live', toStatus: 'suspended' });
    expect(reason.comment).toMatch(new RegExp(`^${w.trenchRef} deepened from 2.40 m to 3.20 m: utilisation 1\\.\\d\\d; `));
    expect(reason.comment).toContain('the cumulative check fails');
    expect(after.current.check!.passes).toBe(false);
    expect(after.current.excavationSnapshot!.excavations[0]).toMatchObject({ id: w.trenchId, depth: 3.2, ratedPressure: 25 });

    for (const who of [demo.supervisor, demo.operator, demo.coordinator]) {
      const m = await waitForMail(t.deps, who, new RegExp(`Permit ${p.number} at .* is suspended`));
      expect(m.text).toContain(`${w.trenchRef} deepened from 2.40 m to 3.20 m: utilisation`);
    }
  });

  it('sends an approved permit that now fails back for review', async () => {
    await ratedTrench();
    const p = await approvedPermit({ live: false, operators: true });
    const r = await patchExcavation(w.agents.coordinator, { depth: 3.2 });
    expect(r.status).toBe(200);
    expect(r.body.rechecked).toEqual([expect.objectContaining({ permitId: p.id, outcome: 'sent-back' })]);

    const after = await detail(p.id);
    expect(after.status).toBe('submitted');
    expect(after.statusLabel).toBe('Awaiting review');
    expect(after.current.decision).toBeNull();
    expect(after.events.at(-1)).toMatchObject({ action: 'reconsider', fromStatus: 'approved', toStatus: 'submitted' });
    expect(after.events.at(-1)!.comment).toMatch(new RegExp(`^${w.trenchRef} deepened from 2.40 m to 3.20 m: utilisation 1\\.\\d\\d`));
    for (const who of [demo.supervisor, demo.operator, demo.coordinator])
      await waitForMail(t.deps, who, new RegExp(`Permit ${p.number} at .* goes back for review`));

    // The coordinator decides again on the new check: it fails, so approval needs a reason.
    const again = await act(w.agents.coordinator, p.id, { action: 'approve', version: after.version, password: DEMO_PASSWORD });
    expect(again.status).toBe(400);
    expect(again.body.error.fields.reason).toBeDefined();
  });

  it('a change that still passes writes the timeline line with the new figures and changes no status', async () => {
    await newTrench(w);
    const p = await approvedPermit({ live: true, clear: 2.0 });
    const before = p.current.check!;
    const r = await patchExcavation(w.agents.coordinator, { depth: 2.6 });
    expect(r.status).toBe(200);
    expect(r.body.rechecked).toEqual([expect.objectContaining({ permitId: p.id, outcome: 'passes' })]);
    const after = await detail(p.id);
    expect(after.status).toBe('live');
    const line = after.events.at(-1)!;
    expect(line.action).toBe('recheck');
    const check = after.current.check as PermitCheck;
    expect(check.utilisation).not.toBe(before.utilisation);
    expect(line.comment).toBe(
      `${w.trenchRef} deepened from 2.40 m to 2.60 m: still passes: utilisation ${check.utilisation!.toFixed(2)}; computed standoff ${check.computedStandoff!.toFixed(2)} m, approved ${before.computedStandoff!.toFixed(2)} m`,
    );
  });

  it('commits the change and its consequences together: a failure after the consequences leaves nothing changed', async () => {
    await ratedTrench();
    const p = await approvedPermit({ live: true, operators: true });
    const eventsBefore = (await detail(p.id)).events.length;
    const exBefore = await excavation();
    const queuedBefore = await outboxFor(p.number);
    // A fault injected after the consequences: the excavation's audit entry (written last) fails.
    const fn = sql.id(`fail_audit_${randomUUID().slice(0, 8)}`);
    await sql`create function ${fn}() returns trigger language plpgsql as $$
      begin
        if new.entity = 'excavation' and new.detail->>'reference' = ${sql.lit(w.trenchRef)} then raise exception 'injected fault'; end if;
        return new;
      end $$`.execute(t.deps.db);
    await sql`create trigger ${fn} before insert on audit_log for each row execute function ${fn}()`.execute(t.deps.db);
    try {
      const r = await patchExcavation(w.agents.coordinator, { depth: 3.2 });
      expect(r.status).toBe(500);
    } finally {
      await sql`drop trigger ${fn} on audit_log`.execute(t.deps.db);
      await sql`drop function ${fn}()`.execute(t.deps.db);
    }
    expect(await excavation()).toEqual(exBefore);
    const unchanged = await detail(p.id);
    expect(unchanged.status).toBe('live');
    expect(unchanged.events).toHaveLength(eventsBefore);
    expect(unchanged.current.check!.passes).toBe(true);
    expect(await outboxFor(p.number)).toBe(queuedBefore);

    // The same change without the fault: all of it, notices queued with it.
    const ok = await patchExcavation(w.agents.coordinator, { depth: 3.2 });
    expect(ok.status).toBe(200);
    expect((await detail(p.id)).status).toBe('suspended');
    // The supervisor, the named operator and the site's coordinators.
    expect(await outboxFor(p.number)).toBeGreaterThanOrEqual(queuedBefore + 3);
  });
});

describe('design data by coordinators', () => {
  it('refuses design fields from a supervisor with 403 naming them, on create, change and import; the ground as dug is theirs', async () => {
    await newTrench(w);
    const before = await excavation();
    const r = await patchExcavation(w.agents.supervisor, { supportType: 'trench-box', designSurcharge: 5, depth: 2.5 });
    expect(r.status).toBe(403);
    expect(r.body.error.fields).toEqual({
      supportType: 'is set by a coordinator or an administrator',
      designSurcharge: 'is set by a coordinator or an administrator',
    });
    expect(r.body.error.message).toMatch(/supportType, designSurcharge/);
    expect(await excavation()).toEqual(before);

    const dug = await patchExcavation(w.agents.supervisor, { depth: 2.5, state: 'open', notes: 'Dug to 2.5 m at the east end.' });
    expect(dug.status).toBe(200);
    expect(dug.body.excavation).toMatchObject({ depth: 2.5, notes: 'Dug to 2.5 m at the east end.' });

    const created = await w.agents.supervisor
      .post(`/api/sites/${w.siteId}/excavations`)
      .send({ reference: 'SV-1', name: 'x', kind: 'pit', depth: 2, soil: [], groundwaterDepth: 1 });
    expect(created.status).toBe(403);
    expect(Object.keys(created.body.error.fields)).toEqual(['soil', 'groundwaterDepth']);

    const file = JSON.stringify({
      type: 'FeatureCollection',
      features: [{ type: 'Feature', geometry: null, properties: { reference: 'SV-2', wallFriction: 10 } }],
    });
    const imported = await w.agents.supervisor
      .post(`/api/sites/${w.siteId}/excavations/import`)
      .attach('file', Buffer.from(file), 'e.geojson');
    expect(imported.status).toBe(403);
    expect(imported.body.error.fields).toEqual({ 'features[0].wallFriction': 'is set by a coordinator or an administrator' });

    const coordinator = await patchExcavation(w.agents.coordinator, { designSurcharge: 12 });
    expect(coordinator.status).toBe(200);
  });
});
