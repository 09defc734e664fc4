import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type request from 'supertest';
import { addPerson, DEMO_PASSWORD, signedIn, startTestApp, unique, type TestApp } from './helpers';
import { runPermitSchedule } from '../src/jobs/permits';
import type { PermitCreateInput } from '@shared/schemas/permits';
import { act, hoursFrom, makeWorld, permitBody, version, type PermitWorld } from './permits-fixtures';
import { startFakePushService } from '../src/push/fake-service';

/**
 * Web Push through the local fake push service: a device subscribes at the fake service with the
 * server's VAPID key, the operator registers it, and each transition that names them (live,
 * suspended, resumed) reaches that device exactly once; a concern reaches the supervisor who asked
 * for the permit; a subscription the push service says is gone is removed.
 */
let t: TestApp;
let w: PermitWorld;
let fake: Awaited<ReturnType<typeof startFakePushService>>;
const people: Record<'operator' | 'supervisor', { id: number; agent: request.Agent }> = {} as never;

async function person(role: 'operator' | 'supervisor') {
  const email = unique(`push-${role}`);
  const u = await addPerson(t.deps, { email, name: `Pat Push (${role})`, member: { siteId: w.siteId, role } });
  return { id: u.id, agent: await signedIn(t.app, email) };
}

/** A new device at the fake push service, subscribed with the server's public key. */
async function device(): Promise<{ endpoint: string; keys: { p256dh: string; auth: string }; clientHash: string }> {
  const { publicKey } = (await people.operator.agent.get('/api/push/key')).body as { publicKey: string };
  const r = await fetch(`${fake.url}/subscribe`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ userVisibleOnly: 'true', applicationServerKey: publicKey }),
  });
  expect(r.status).toBe(200);
  return ((await r.json()) as { data: { endpoint: string; keys: { p256dh: string; auth: string }; clientHash: string } }).data;
}

/** A new device, turned on for `who`. */
async function subscribedDevice(who: 'operator' | 'supervisor') {
  const d = await device();
  expect((await people[who].agent.post('/api/push/subscription').send({ endpoint: d.endpoint, keys: d.keys })).status).toBe(201);
  return d;
}

/** A permit asked for by the supervisor, naming the operator, submitted and approved (not yet briefed). */
async function approvedPermit(over: Partial<PermitCreateInput> = {}): Promise<{ id: number; number: string }> {
  const created = await people.supervisor.agent.post('/api/permits').send(permitBody(w, { operatorIds: [people.operator.id], ...over }));
  expect(created.status).toBe(201);
  const { id, number } = created.body.permit as { id: number; number: string };
  expect((await act(people.supervisor.agent, id, { action: 'submit', version: await version(w, id) })).status).toBe(200);
  expect((await act(w.agents.coordinator, id, { action: 'approve', version: await version(w, id), password: DEMO_PASSWORD })).status).toBe(
    200,
  );
  return { id, number };
}

/** The operator's briefing makes an approved permit live. */
async function brief(id: number) {
  expect((await people.operator.agent.post(`/api/permits/${id}/briefing`)).body.briefing.status).toBe('live');
}

/** The notifications the fake service decrypted for a device (payloads parsed). */
async function received(clientHash: string): Promise<{ title: string; body: string; path: string; tag: string }[]> {
  const r = await fetch(`${fake.url}/get-notifications`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ clientHash }),
  });
  const messages = ((await r.json()) as { data: { messages: string[] } }).data.messages;
  return messages.map((m) => JSON.parse(m));
}

/** Waits (by state, polling the queue) until every push job of this app is finished. */
async function queueDrained(): Promise<void> {
  await expect.poll(async () => t.deps.boss.getQueueSize(t.deps.pusher.queue, { before: 'completed' }), { timeout: 20_000 }).toBe(0);
}

beforeAll(async () => {
  fake = await startFakePushService();
  t = await startTestApp({ PUSH_FAKE_SERVICE_URL: fake.url });
  w = await makeWorld(t);
  people.operator = await person('operator');
  people.supervisor = await person('supervisor');
});
afterAll(async () => {
  await t?.stop();
  await fake?.close();
});

describe('push subscriptions', () => {
  it('refuses an address that is no browser push service, naming the field', async () => {
    const r = await people.operator.agent
      .post('/api/push/subscription')
      .send({ endpoint: 'http://10.0.0.1/hook', keys: { p256dh: 'x', auth: 'y' } });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.endpoint).toMatch(/push service/);
  });

  it('turns a device on and off for the person signed in', async () => {
    const d = await device();
    const status = () => people.operator.agent.get('/api/push/subscription').query({ endpoint: d.endpoint });
    expect((await status()).body).toEqual({ subscribed: false });
    expect((await people.operator.agent.post('/api/push/subscription').send({ endpoint: d.endpoint, keys: d.keys })).status).toBe(201);
    expect((await status()).body).toEqual({ subscribed: true });
    // Another person signs in on the same phone and turns it on: it tells them, not the first.
    expect((await people.supervisor.agent.post('/api/push/subscription').send({ endpoint: d.endpoint, keys: d.keys })).status).toBe(201);
    expect((await status()).body).toEqual({ subscribed: false });
    expect((await people.supervisor.agent.delete('/api/push/subscription').query({ endpoint: d.endpoint })).status).toBe(204);
    expect(
      await t.deps.db.selectFrom('push_subscriptions').select('id').where('endpoint', '=', d.endpoint).executeTakeFirst(),
    ).toBeUndefined();
  });
});

describe('notifications of a permit', () => {
  it('tells the named operator once per change (live, suspended, resumed) and removes a gone subscription', async () => {
    const d = await subscribedDevice('operator');
    const { id, number } = await approvedPermit();
    // Approved but not yet briefed: nothing pushed. The briefing makes it live.
    await brief(id);
    await expect.poll(() => received(d.clientHash), { timeout: 20_000 }).toHaveLength(1);
    const [live] = await received(d.clientHash);
    expect(live).toEqual({
      title: `Permit ${number} is live`,
      body: 'Work may go ahead: keep out of the exclusion zone.',
      path: `/field/permits/${id}`,
      tag: `permit-${id}`,
    });

    expect(
      (await act(w.agents.coordinator, id, { action: 'suspend', version: await version(w, id), reason: 'Water in the trench' })).status,
    ).toBe(200);
    await expect
      .poll(async () => (await received(d.clientHash)).map((m) => m.title), { timeout: 20_000 })
      .toEqual([`Permit ${number} is live`, `Permit ${number} is suspended`]);

    // Exactly once: the job of the first notification delivered again (a crash, a retry) sends nothing.
    const sub = await t.deps.db.selectFrom('push_subscriptions').select('id').where('endpoint', '=', d.endpoint).executeTakeFirstOrThrow();
    const deliveries = () =>
      t.deps.db
        .selectFrom('push_deliveries')
        .select(['key', 'outcome'])
        .where('subscription_id', '=', sub.id)
        .orderBy('delivered_at')
        .execute();
    const [first] = await deliveries();
    await t.deps.boss.send(t.deps.pusher.queue, { key: first.key, subscriptionId: sub.id, message: live });
    await queueDrained();
    expect(await received(d.clientHash)).toHaveLength(2);

    // The browser dropped the subscription: the push service answers 410 and Brink forgets the device.
    expect((await fetch(`${fake.url}/expire-subscription/${d.clientHash}`, { method: 'POST' })).status).toBe(200);
    expect(
      (await act(w.agents.coordinator, id, { action: 'resume', version: await version(w, id), reason: 'Pumped out and inspected' })).status,
    ).toBe(200);
    await expect
      .poll(async () => t.deps.db.selectFrom('push_subscriptions').select('id').where('id', '=', sub.id).executeTakeFirst(), {
        timeout: 20_000,
      })
      .toBeUndefined();
    expect((await deliveries()).map((o) => o.outcome)).toEqual(['sent', 'sent', 'gone']);
    expect(await received(d.clientHash)).toHaveLength(2);
  });

  it('tells the named operator when their live permit lapses at the end of its window', async () => {
    const d = await subscribedDevice('operator');
    const base = new Date('2031-04-07T07:00:00Z');
    t.clock.now = base;
    try {
      const { id, number } = await approvedPermit({ windowStart: hoursFrom(base, -1), windowEnd: hoursFrom(base, 2) });
      await brief(id);
      t.clock.now = new Date(base.getTime() + 2 * 3600_000 + 60_000);
      expect((await runPermitSchedule(t.deps, { permitIds: [id] })).lapsed).toContain(id);
      await expect
        .poll(async () => (await received(d.clientHash)).filter((m) => m.path === `/field/permits/${id}`).map((m) => m.title), {
          timeout: 20_000,
        })
        .toEqual([`Permit ${number} is live`, `Permit ${number} has lapsed`]);
    } finally {
      t.clock.now = null;
    }
  });

  it('tells the supervisor who asked for the permit of a concern, opening the permit page', async () => {
    const d = await subscribedDevice('supervisor');
    const { id, number } = await approvedPermit();
    const concern = await people.operator.agent
      .post(`/api/permits/${id}/concerns`)
      .field('excavationId', String(w.trenchId))
      .field('note', 'Crack opening along the north edge');
    expect(concern.status).toBe(201);
    await expect.poll(() => received(d.clientHash), { timeout: 20_000 }).toHaveLength(1);
    const [m] = await received(d.clientHash);
    expect(m).toMatchObject({ title: `Concern on permit ${number}`, path: `/permits/${id}` });
    expect(m.body).toContain(w.trenchRef);
  });

  it('queues nothing when the transition rolls back', async () => {
    const d = await subscribedDevice('operator');
    const sub = await t.deps.db.selectFrom('push_subscriptions').select('id').where('endpoint', '=', d.endpoint).executeTakeFirstOrThrow();
    await expect(
      t.deps.db.transaction().execute(async (trx) => {
        await t.deps.pusher.notify(trx, [people.operator.id], { title: 'Never', body: '', path: '/field', tag: 'x' });
        throw new Error('the change failed');
      }),
    ).rejects.toThrow('the change failed');
    await t.deps.pusher.notify(t.deps.db, [people.operator.id], { title: 'After', body: '', path: '/field', tag: 'y' });
    await expect.poll(async () => (await received(d.clientHash)).map((m) => m.title), { timeout: 20_000 }).toContain('After');
    await queueDrained();
    expect((await received(d.clientHash)).map((m) => m.title)).not.toContain('Never');
    expect(sub.id).toBeGreaterThan(0);
  });
});
