import { afterAll, beforeAll, expect, it } from 'vitest';
import request from 'supertest';
import { demo, signedIn, startTestApp, unique, waitForMail, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.stop());

it('keeps an invitation queued while the mail server is down and delivers it when it is back', async () => {
  const admin = await signedIn(t.app, demo.admin);
  await t.catcher.stop();
  const email = unique('queued');
  await admin.post('/api/invitations').send({ email, name: 'Quentin Queue' }).expect(201);
  // wait for at least one failed delivery attempt
  await new Promise((r) => setTimeout(r, 2500));
  const before = await t.deps.db.selectFrom('caught_mail').select('id').where('mail_to', 'ilike', `%${email}%`).execute();
  expect(before).toHaveLength(0);
  await t.catcher.start(t.catcherPort);
  const mail = await waitForMail(t.deps, email, /invited/, 40_000);
  expect(mail.text).toContain('/invitations/accept?token=');
  const all = await t.deps.db.selectFrom('caught_mail').select('id').where('mail_to', 'ilike', `%${email}%`).execute();
  expect(all).toHaveLength(1);
}, 60_000);

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
