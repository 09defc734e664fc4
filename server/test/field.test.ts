import { randomUUID } from 'node:crypto';
import type request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, onTestFinished } from 'vitest';
import { cautionFor } from '@shared/caution';
import type { Polygon } from 'geojson';
import { localProjection, prepareExcavation, signedDistanceToZoneAt, SITE_TOLERANCE } from '@shared/geometry';
import { exclusionDistance } from '@shared/permits/exclusion';
import type { FieldPermit } from '@shared/schemas/field';
import type { PermitDetail } from '@shared/schemas/permits';
import { addPerson, demo, signedIn, startTestApp, unique, waitForMail, type TestApp } from './helpers';
import { createPermit, makeWorld, submitAndApprove, type PermitWorld } from './permits-fixtures';

/**
 * The field view's API: the permits that name me, one permit by its site's members only, the
 * briefing (once; a second is the same), and concerns that count once per idempotency key, with
 * photos checked for type and size.
 */

// The smallest valid PNG: 1 × 1 pixel (PNG specification, ISO/IEC 15948).
const PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==', 'base64');

let t: TestApp;
let w: PermitWorld;
const people: Record<'a' | 'b' | 'c', { id: number; email: string; agent: request.Agent }> = {} as never;
let named: { id: number; number: string }; // names A, approved with a 3.5 m standoff
let other: { id: number; number: string }; // names B
let draft: { id: number; number: string }; // names A, not sent for review
let pair: { id: number; number: string }; // names A and C

async function operator(label: string) {
  const email = unique(`field-${label}`);
  const u = await addPerson(t.deps, {
    email,
    name: `Field operator ${label.toUpperCase()} (test)`,
    member: { siteId: w.siteId, role: 'operator' },
  });
  return { id: u.id, email, agent: await signedIn(t.app, email) };
}

beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_IP: '1000' });
  w = await makeWorld(t);
  people.a = await operator('a');
  people.b = await operator('b');
  people.c = await operator('c');
  named = await createPermit(w, { operatorIds: [people.a.id], description: 'Field test: excavator beside the trench' });
  await submitAndApprove(w, named.id, { standoff: 3.5, conditions: ['A banksman guides every move near the edge.'] });
  other = await createPermit(w, { operatorIds: [people.b.id] });
  await submitAndApprove(w, other.id);
  draft = await createPermit(w, { operatorIds: [people.a.id] });
  pair = await createPermit(w, { operatorIds: [people.a.id, people.c.id] });
  await submitAndApprove(w, pair.id);
});
afterAll(async () => t.stop());

async function myPermits(agent: request.Agent): Promise<FieldPermit[]> {
  const r = await agent.get('/api/field/permits');
  expect(r.status).toBe(200);
  expect(Date.parse(r.body.asOf)).not.toBeNaN();
  return r.body.permits;
}

describe('the permits that name me', () => {
  it('lists the approved permits naming the operator and no others', async () => {
    const ids = (await myPermits(people.a.agent)).map((p) => p.id);
    expect(ids).toContain(named.id);
    expect(ids).toContain(pair.id);
    expect(ids).not.toContain(other.id);
    expect(ids).not.toContain(draft.id); // not approved: nothing to work under yet
    expect((await myPermits(people.b.agent)).map((p) => p.id)).toEqual([other.id]);
    expect((await myPermits(w.agents.outsider)).map((p) => p.id)).toEqual([]);
  });

  it('carries the zones, standoff and conditions the phone needs, matching the shared geometry', async () => {
    const p = (await myPermits(people.a.agent)).find((x) => x.id === named.id)!;
    expect(p).toMatchObject({ number: named.number, status: 'approved', named: true, briefingDue: true, myBriefedAt: null, standoff: 3.5 });
    expect(p.conditions).toEqual(['A banksman guides every move near the edge.']);
    expect(p.caution).toMatch(/competent temporary works designer/);
    const [x] = p.excavations;
    expect(x.id).toBe(w.trenchId);
    expect(x.standoff).toBe(3.5);
    expect(x.exclusionZone?.type).toBe('Polygon');
    expect(p.footprints.length).toBe(2); // the excavator's two tracks
    // 5 m north of the trench's centre line: 5 − 0.5 (half width) − 3.5 = 1.0 m outside the exclusion zone.
    const proj = localProjection([p.origin.longitude, p.origin.latitude]);
    const [cx, cy] = w.trenchCentre;
    const d = signedDistanceToZoneAt(prepareExcavation(x.shape, proj), proj.toWgs84([cx, cy + 5]), x.standoff!, proj);
    expect(d).toBeCloseTo(1.0, 6);
    // The drawn zone (the site's tolerance, not 64 chords a quarter circle): every corner on or
    // beyond the 3.5 m line, none more than SITE_TOLERANCE beyond it, so it never shows less ground.
    const ring = (x.exclusionZone as Polygon).coordinates[0];
    const beyond = ring.map((c) => signedDistanceToZoneAt(prepareExcavation(x.shape, proj), c as [number, number], 3.5, proj));
    expect(Math.min(...beyond)).toBeGreaterThan(-1e-6);
    expect(Math.max(...beyond)).toBeLessThanOrEqual(SITE_TOLERANCE + 1e-6);
    expect(ring.length).toBeLessThan(60);
  });

  it('shows a permit approved as placed at the figure the permit page shows, saying why (no 3H, no other figure)', async () => {
    const p = (await myPermits(people.a.agent)).find((x) => x.id === pair.id)!;
    const detail: PermitDetail = (await w.agents.coordinator.get(`/api/permits/${pair.id}`)).body.permit;
    expect(detail.current.decision).toMatchObject({ action: 'approve', standoff: null });
    const [x] = p.excavations;
    const computed = detail.current.check!.excavations.find((e) => e.excavationId === x.id)!.standoff;
    expect(computed).not.toBeNull();
    expect(x.standoff).toBe(Math.max(computed!, p.minimumClearance));
    expect(x.standoffBasis).toBe(computed! >= p.minimumClearance ? 'computed' : 'clearance');
    // The permit page computes it with the same function from what GET /api/permits/:id answers.
    expect(exclusionDistance(detail.current, x.id, p.minimumClearance, x.depth)).toEqual({ distance: x.standoff, basis: x.standoffBasis });
    // The coordinator's own figure is said as theirs.
    expect((await myPermits(people.a.agent)).find((y) => y.id === named.id)!.excavations[0].standoffBasis).toBe('set');
  });

  it('lets members of the site open one permit, and refuses other sites', async () => {
    const asB = await people.b.agent.get(`/api/field/permits/${named.id}`);
    expect(asB.status).toBe(200);
    expect(asB.body.permit).toMatchObject({ id: named.id, named: false, briefingDue: false });
    expect((await w.agents.outsider.get(`/api/field/permits/${named.id}`)).status).toBe(403);
    expect((await people.a.agent.get('/api/field/permits/999999')).status).toBe(404);
  });
});

describe('briefing', () => {
  it('records who and when once; a second confirmation changes nothing', async () => {
    const first = await people.a.agent.post(`/api/permits/${named.id}/briefing`).set('Idempotency-Key', randomUUID());
    expect(first.status).toBe(200);
    const again = await people.a.agent.post(`/api/permits/${named.id}/briefing`).set('Idempotency-Key', randomUUID());
    expect(again.status).toBe(200);
    expect(again.body.briefing.briefedAt).toBe(first.body.briefing.briefedAt);
    const events = await t.deps.db
      .selectFrom('permit_events')
      .select('actor_id')
      .where('permit_id', '=', named.id)
      .where('action', '=', 'briefed')
      .execute();
    expect(events).toEqual([{ actor_id: people.a.id }]);
    const p = (await myPermits(people.a.agent)).find((x) => x.id === named.id)!;
    expect(p.myBriefedAt).toBe(first.body.briefing.briefedAt);
    expect(p.briefingDue).toBe(false);
    expect(p.status).toBe('live'); // the only named operator is briefed and the window is open
  });

  it('keeps a permit from going live until every named operator has confirmed', async () => {
    // A confirmation made on another revision (say, offline before a revision) does not count.
    const current = (await people.a.agent.get(`/api/field/permits/${pair.id}`)).body.permit.revision as number;
    const stale = await people.a.agent.post(`/api/permits/${pair.id}/briefing`).send({ revision: current + 1 });
    expect(stale.status).toBe(409);
    expect((await people.a.agent.get(`/api/field/permits/${pair.id}`)).body.permit.myBriefedAt).toBeNull();
    await people.a.agent.post(`/api/permits/${pair.id}/briefing`).send({ revision: current }).expect(200);
    expect((await people.a.agent.get(`/api/field/permits/${pair.id}`)).body.permit.status).toBe('approved');
    await people.c.agent.post(`/api/permits/${pair.id}/briefing`).expect(200);
    expect((await people.a.agent.get(`/api/field/permits/${pair.id}`)).body.permit.status).toBe('live');
  });

  it('refuses a briefing from an operator the permit does not name, and from another site', async () => {
    expect((await people.b.agent.post(`/api/permits/${named.id}/briefing`)).status).toBe(403);
    expect((await w.agents.outsider.post(`/api/permits/${named.id}/briefing`)).status).toBe(403);
  });
});

describe('concerns', () => {
  const send = (agent: request.Agent, permitId: number, fields: Record<string, string>, photos: Buffer[] = [PNG], key?: string) => {
    let r = agent.post(`/api/permits/${permitId}/concerns`);
    if (key) r = r.set('Idempotency-Key', key);
    for (const [k, v] of Object.entries(fields)) r = r.field(k, v);
    for (const [i, p] of photos.entries()) r = r.attach('photo', p, { filename: `crack-${i}.png`, contentType: 'image/png' });
    return r;
  };
  const count = async (key: string) =>
    (
      await t.deps.db
        .selectFrom('concerns')
        .select((eb) => eb.fn.countAll<number>().as('n'))
        .where('idempotency_key', '=', key)
        .executeTakeFirstOrThrow()
    ).n;

  it('makes one concern per idempotency key, on the timeline, and e-mails the coordinators and supervisors, each in their units', async () => {
    // The second coordinator works in US customary units: their message names OSHA's rule.
    await t.deps.db.updateTable('users').set({ units: 'us' }).where('email', '=', w.coordinator2Email).execute();
    onTestFinished(async () => {
      await t.deps.db.updateTable('users').set({ units: null }).where('email', '=', w.coordinator2Email).execute();
    });
    const key = randomUUID();
    const note = `Crack opening along the north edge ${key.slice(0, 6)}`;
    const first = await send(people.a.agent, named.id, { excavationId: String(w.trenchId), note }, [PNG], key);
    expect(first.status).toBe(201);
    expect(first.body.concern).toMatchObject({
      permitId: named.id,
      excavationId: w.trenchId,
      excavationReference: w.trenchRef,
      note,
      reporter: { id: people.a.id },
    });
    expect(first.body.concern.photoIds).toHaveLength(1);
    // The answer was lost and the phone sends again with the same key.
    const again = await send(people.a.agent, named.id, { excavationId: String(w.trenchId), note }, [PNG], key);
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ replayed: true, concern: { id: first.body.concern.id } });
    expect(await count(key)).toBe(1);
    const events = await t.deps.db
      .selectFrom('permit_events')
      .select(['action', 'comment'])
      .where('permit_id', '=', named.id)
      .where('action', '=', 'concern')
      .execute();
    expect(events.filter((e) => e.comment === note)).toHaveLength(1);
    const p = (await people.a.agent.get(`/api/field/permits/${named.id}`)).body.permit as FieldPermit;
    expect(p.concerns.filter((c) => c.note === note)).toHaveLength(1);
    for (const to of [demo.coordinator, demo.supervisor, w.coordinator2Email]) {
      const mail = await waitForMail(t.deps, to, new RegExp(`Concern on permit ${named.number}`));
      expect(mail.text).toContain(note);
      // One message each (nobody sees the others' addresses), with the caution in the reader's units.
      expect(mail.mail_to).toBe(to);
      if (to === w.coordinator2Email) expect(mail.text).toContain(cautionFor('us'));
      else expect(mail.text).not.toContain('OSHA');
    }
    // The photo is served to members of the site only.
    const photoId = first.body.concern.photoIds[0];
    expect((await w.agents.coordinator.get(`/api/uploads/${photoId}`)).status).toBe(200);
    expect((await w.agents.outsider.get(`/api/uploads/${photoId}`)).status).toBe(403);
  });

  it('accepts the key as a form field too, and refuses a header and field that differ', async () => {
    const key = randomUUID();
    const r = await send(
      people.a.agent,
      named.id,
      { excavationId: String(w.trenchId), note: 'Water in the trench', idempotencyKey: key },
      [],
    );
    expect(r.status).toBe(201);
    expect(r.body.concern.idempotencyKey).toBe(key);
    const bad = await send(
      people.a.agent,
      named.id,
      { excavationId: String(w.trenchId), note: 'x', idempotencyKey: randomUUID() },
      [],
      randomUUID(),
    );
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('idempotencyKey');
  });

  it('refuses a key used by someone else for another request', async () => {
    const key = randomUUID();
    await send(people.a.agent, named.id, { excavationId: String(w.trenchId), note: 'Edge crumbling' }, [], key).expect(201);
    const r = await send(w.agents.supervisor, named.id, { excavationId: String(w.trenchId), note: 'Something else' }, [], key);
    expect(r.status).toBe(409);
    expect(await count(key)).toBe(1);
  });

  it('names each bad field and keeps nothing', async () => {
    const key = randomUUID();
    const r = await send(people.a.agent, named.id, { excavationId: 'north', note: '   ' }, [], key);
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['excavationId', 'note']);
    const wrongExcavation = await send(people.a.agent, named.id, { excavationId: '999999', note: 'Crack' }, [], key);
    expect(wrongExcavation.status).toBe(400);
    expect(wrongExcavation.body.error.fields).toHaveProperty('excavationId');
    // An id past PostgreSQL's integer is the same refusal, not a 500.
    const outOfRange = await send(people.a.agent, named.id, { excavationId: '2147483648', note: 'Crack' }, [], key);
    expect(outOfRange.status).toBe(400);
    expect(outOfRange.body.error.fields.excavationId).toMatch(/one of the permit/);
    expect(await count(key)).toBe(0);
  });

  it('checks the photo’s type from its content and limits its size and number', async () => {
    const key = randomUUID();
    const fields = { excavationId: String(w.trenchId), note: 'Photo checks' };
    const notImage = await send(people.a.agent, named.id, fields, [Buffer.from('%PDF-1.4 not a photo at all')], key);
    expect(notImage.status).toBe(400);
    expect(notImage.body.error.fields).toHaveProperty('photo');
    const big = Buffer.concat([PNG, Buffer.alloc(10 * 1024 * 1024)]);
    const tooBig = await send(people.a.agent, named.id, fields, [big], key);
    expect(tooBig.status).toBe(413);
    expect(tooBig.body.error.fields).toHaveProperty('photo');
    const tooMany = await send(people.a.agent, named.id, fields, [PNG, PNG, PNG, PNG], key);
    expect(tooMany.status).toBe(400);
    expect(await count(key)).toBe(0);
    const uploads = await t.deps.db
      .selectFrom('uploads')
      .select('id')
      .where('purpose', '=', 'concern-photo')
      .where('original_name', '=', 'crack-3.png')
      .execute();
    expect(uploads).toEqual([]);
  });

  it('refuses members of other sites', async () => {
    const r = await send(w.agents.outsider, named.id, { excavationId: String(w.trenchId), note: 'Not my site' }, [], randomUUID());
    expect(r.status).toBe(403);
  });
});
