import { randomUUID } from 'node:crypto';
import { sql } from 'kysely';
import { afterAll, beforeAll, expect, it } from 'vitest';
import request from 'supertest';
import { MAIL_QUEUE_OPTIONS, type QueuedMessage } from '../src/mail/mailer';
import { demo, signedIn, startTestApp, unique, waitForMail, type TestApp } from './helpers';

// The mail outbox: messages queued in the transaction of their cause, retried while the mail
// server is down, and delivered once each even when a job is delivered twice.

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.stop());

const caught = async (to: string) =>
  t.deps.db.selectFrom('caught_mail').select(['id', 'subject']).where('mail_to', 'ilike', `%${to}%`).execute();

/** The mail jobs addressed to `to`, with pg-boss's own record of their tries. */
async function jobsTo(to: string): Promise<{ state: string; retry_count: number }[]> {
  const r = await sql<{ state: string; retry_count: number }>`
    select state, retry_count from pgboss.job where name = ${t.deps.mailer.queue} and data->>'to' like ${`%${to}%`}`.execute(t.deps.db);
  return r.rows;
}

it('applies the retry and expiry settings to the queue as pg-boss stores them', async () => {
  const q = await t.deps.boss.getQueue(t.deps.mailer.queue);
  expect(q).toMatchObject({
    retryLimit: MAIL_QUEUE_OPTIONS.retryLimit,
    retryDelay: MAIL_QUEUE_OPTIONS.retryDelay,
    retryBackoff: true,
    expireInSeconds: MAIL_QUEUE_OPTIONS.expireInSeconds,
  });
});

it('keeps an invitation queued while the mail server is down, retries it, and delivers it once when it is back', async () => {
  const admin = await signedIn(t.app, demo.admin);
  await t.catcher.stop();
  const email = unique('queued');
  try {
    await admin.post('/api/invitations').send({ email, name: 'Quentin Queue' }).expect(201);
    // pg-boss records the failed try (the catcher refused it) and schedules the next one
    await expect.poll(async () => (await jobsTo(email))[0]?.retry_count ?? 0, { timeout: 30_000, interval: 200 }).toBeGreaterThanOrEqual(1);
  } finally {
    await t.catcher.start(t.catcherPort);
  }
  const mail = await waitForMail(t.deps, email, /invited/, 40_000);
  expect(mail.text).toContain('/invitations/accept?token=');
  await expect.poll(async () => (await jobsTo(email))[0]?.state, { timeout: 20_000 }).toBe('completed');
  expect(await caught(email)).toHaveLength(1);
}, 90_000);

it('queues a message with the transaction of its cause: nothing when it rolls back, once when it commits', async () => {
  const gone = unique('rolled-back');
  await expect(
    t.deps.db.transaction().execute(async (trx) => {
      await t.deps.mailer.send(trx, { to: gone, subject: 'Never', text: 'This change did not happen.' });
      throw new Error('the change fails after its notice was queued');
    }),
  ).rejects.toThrow('the change fails');
  expect(await jobsTo(gone)).toEqual([]);

  const kept = unique('committed');
  await t.deps.db.transaction().execute(async (trx) => {
    await t.deps.mailer.send(trx, { to: kept, subject: 'Committed change', text: 'This change happened.' });
  });
  await waitForMail(t.deps, kept, /Committed change/);
  await expect.poll(async () => (await jobsTo(kept))[0]?.state, { timeout: 20_000 }).toBe('completed');
  expect(await caught(kept)).toHaveLength(1);
});

it('sends a message once when its job is delivered twice (the same idempotency key)', async () => {
  const to = unique('twice');
  const message: QueuedMessage = { to: [to], subject: 'Only once', text: 'Sent once, whatever the queue does.', key: randomUUID() };
  await t.deps.boss.send(t.deps.mailer.queue, message);
  await t.deps.boss.send(t.deps.mailer.queue, message);
  await expect.poll(async () => (await jobsTo(to)).map((j) => j.state), { timeout: 20_000 }).toEqual(['completed', 'completed']);
  expect(await caught(to)).toHaveLength(1);
  const delivered = await t.deps.db.selectFrom('mail_deliveries').select('key').where('key', '=', message.key).execute();
  expect(delivered).toHaveLength(1);
});

it('shows caught mail at /api/dev/mail only while the catcher is on', async () => {
  const r = await request(t.app).get('/api/dev/mail?limit=5');
  expect(r.status).toBe(200);
  expect(Array.isArray(r.body.messages)).toBe(true);
  const off = await startTestApp({ MAIL_CATCHER: 'off', SMTP_URL: 'smtp://127.0.0.1:9' });
  try {
    expect((await request(off.app).get('/api/dev/mail')).status).toBe(404);
  } finally {
    await off.stop();
  }
});
