import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'kysely';
import { addPerson, demo, DEMO_PASSWORD, linkToken, signedIn, startTestApp, unique, waitForMail, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_ACCOUNT: '5' });
});
afterAll(async () => t.stop());

describe('sign-in', () => {
  it('signs in with the right password and sets a safe session cookie', async () => {
    const r = await request(t.app).post('/api/auth/sign-in').send({ email: demo.coordinator, password: DEMO_PASSWORD });
    expect(r.status).toBe(200);
    expect(r.body.user.email).toBe(demo.coordinator);
    expect(r.body.user.memberships[0].role).toBe('coordinator');
    const cookie = String(r.headers['set-cookie']);
    expect(cookie).toMatch(/brink\.sid=/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i); // plain http here
  });

  it('marks the cookie Secure when served over https (behind a local proxy)', async () => {
    const r = await request(t.app)
      .post('/api/auth/sign-in')
      .set('X-Forwarded-Proto', 'https')
      .send({ email: demo.coordinator, password: DEMO_PASSWORD });
    expect(r.status).toBe(200);
    expect(String(r.headers['set-cookie'])).toMatch(/Secure/);
  });

  it('refuses a wrong password and an unknown address alike', async () => {
    const a = await request(t.app).post('/api/auth/sign-in').send({ email: demo.operator, password: 'wrong-password' });
    const b = await request(t.app).post('/api/auth/sign-in').send({ email: 'nobody@example.test', password: 'wrong-password' });
    for (const r of [a, b]) {
      expect(r.status).toBe(401);
      expect(r.body.error.code).toBe('bad_credentials');
      expect(r.headers['set-cookie']).toBeUndefined();
    }
  });

  it('names the fields of a bad body', async () => {
    const r = await request(t.app).post('/api/auth/sign-in').send({ email: 'not-an-address' });
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toMatchObject({ email: expect.any(String), password: expect.any(String) });
    expect(JSON.stringify(r.body)).not.toMatch(/at .*\.ts/); // no stack trace
  });

  it('answers 400 to a body that is not JSON', async () => {
    const r = await request(t.app).post('/api/auth/sign-in').set('content-type', 'application/json').send('{"email":');
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('invalid');
  });

  it('gives a new session id at sign-in and ends the session at sign-out', async () => {
    const agent = request.agent(t.app);
    expect((await agent.get('/api/auth/me')).status).toBe(401);
    await agent.post('/api/auth/sign-in').send({ email: demo.supervisor, password: DEMO_PASSWORD }).expect(200);
    const me = await agent.get('/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe(demo.supervisor);
    await agent.post('/api/auth/sign-out').expect(204);
    expect((await agent.get('/api/auth/me')).status).toBe(401);
  });

  it('rate-limits repeated failures on one account (429), and the right password does not get through then', async () => {
    const email = unique('limited');
    await addPerson(t.deps, { email, name: 'Limited' });
    for (let i = 0; i < 5; i++) {
      const r = await request(t.app).post('/api/auth/sign-in').send({ email, password: 'wrong-password' });
      expect(r.status).toBe(401);
    }
    const blocked = await request(t.app).post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('rate_limited');
    // another account from the same address is not blocked by this account's failures
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: demo.operator, password: DEMO_PASSWORD })).status).toBe(200);
  });

  it('stores passwords as bcrypt hashes of cost 10 or more', async () => {
    const u = await t.deps.db.selectFrom('users').select('password_hash').where('email', '=', demo.admin).executeTakeFirstOrThrow();
    expect(u.password_hash).toMatch(/^\$2[aby]\$(1\d|[2-3]\d)\$/);
  });
});

describe('invitations', () => {
  it('an administrator invites; the link from the e-mail sets a password, signs in, and works once', async () => {
    const admin = await signedIn(t.app, demo.admin);
    const sites = await admin.get('/api/sites');
    const siteId = sites.body.sites[0].id;
    const email = unique('invitee');
    await admin.post('/api/invitations').send({ email, name: 'Iris Invitee', siteId, role: 'operator' }).expect(201);
    const mail = await waitForMail(t.deps, email, /invited/);
    const token = linkToken(mail.text, '/invitations/accept');

    const info = await request(t.app).get(`/api/invitations/${token}`);
    expect(info.status).toBe(200);
    expect(info.body).toMatchObject({ email, role: 'operator', siteName: 'Alder Marsh pumping station' });

    const agent = request.agent(t.app);
    const acc = await agent.post('/api/invitations/accept').send({ token, name: 'Iris Invitee', password: 'a-new-password-1' });
    expect(acc.status).toBe(200);
    expect(acc.body.user.memberships).toEqual([expect.objectContaining({ siteId, role: 'operator' })]);
    expect((await agent.get('/api/auth/me')).body.user.email).toBe(email);

    const again = await request(t.app)
      .post('/api/invitations/accept')
      .send({ token, name: 'Someone Else', password: 'another-password-2' });
    expect(again.status).toBe(400);
    expect(again.body.error.code).toBe('invalid_token');
    expect((await request(t.app).get(`/api/invitations/${token}`)).status).toBe(410);
    await signedIn(t.app, email, 'a-new-password-1');
  });

  it('refuses an expired invitation (72 hours)', async () => {
    const admin = await signedIn(t.app, demo.admin);
    const email = unique('late');
    await admin.post('/api/invitations').send({ email, name: 'Late Larry' }).expect(201);
    const token = linkToken((await waitForMail(t.deps, email, /invited/)).text, '/invitations/accept');
    t.clock.now = new Date(Date.now() + 72 * 3600_000 + 60_000);
    try {
      const r = await request(t.app).post('/api/invitations/accept').send({ token, name: 'Late Larry', password: 'late-password-1' });
      expect(r.status).toBe(400);
      expect(r.body.error.fields).toHaveProperty('token');
    } finally {
      t.clock.now = null;
    }
  });

  it('names the fields of a bad invitation', async () => {
    const admin = await signedIn(t.app, demo.admin);
    const r = await admin.post('/api/invitations').send({ email: 'nope', name: '', siteId: 1 });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['email', 'name', 'role']);
  });
});

describe('password reset', () => {
  it('e-mails a link that sets a new password once; the old password stops working', async () => {
    const email = unique('forgetful');
    await addPerson(t.deps, { email, name: 'Forgetful Fay', password: 'old-password-1' });
    const r = await request(t.app).post('/api/auth/forgot-password').send({ email });
    expect(r.status).toBe(202);
    const unknown = await request(t.app)
      .post('/api/auth/forgot-password')
      .send({ email: unique('nobody') });
    expect(unknown.status).toBe(202);
    expect(unknown.body).toEqual(r.body);

    const token = linkToken((await waitForMail(t.deps, email, /reset/i)).text, '/reset-password');
    await request(t.app).post('/api/auth/reset-password').send({ token, password: 'new-password-22' }).expect(204);
    const reused = await request(t.app).post('/api/auth/reset-password').send({ token, password: 'newer-password-33' });
    expect(reused.status).toBe(400);
    expect(reused.body.error.code).toBe('invalid_token');
    expect((await request(t.app).post('/api/auth/sign-in').send({ email, password: 'old-password-1' })).status).toBe(401);
    await signedIn(t.app, email, 'new-password-22');
  });

  it('refuses a reset link after its hour', async () => {
    const email = unique('slow');
    await addPerson(t.deps, { email, name: 'Slow Sam', password: 'old-password-1' });
    await request(t.app).post('/api/auth/forgot-password').send({ email }).expect(202);
    const token = linkToken((await waitForMail(t.deps, email, /reset/i)).text, '/reset-password');
    t.clock.now = new Date(Date.now() + 3600_000 + 60_000);
    try {
      const r = await request(t.app).post('/api/auth/reset-password').send({ token, password: 'new-password-22' });
      expect(r.status).toBe(400);
    } finally {
      t.clock.now = null;
    }
    await signedIn(t.app, email, 'old-password-1');
  });

  it('names a too-short password', async () => {
    const r = await request(t.app)
      .post('/api/auth/reset-password')
      .send({ token: 'x'.repeat(40), password: 'short' });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.password).toMatch(/at least 10/);
  });
});

describe('audit log', () => {
  it('is append-only: the database refuses UPDATE and DELETE', async () => {
    const { sql } = await import('kysely');
    await expect(sql`update audit_log set action = 'x'`.execute(t.deps.db)).rejects.toThrow(/append-only/);
    await expect(sql`delete from audit_log`.execute(t.deps.db)).rejects.toThrow(/append-only/);
    const n = await t.deps.db
      .selectFrom('audit_log')
      .select((eb) => eb.fn.countAll().as('n'))
      .executeTakeFirstOrThrow();
    expect(Number(n.n)).toBeGreaterThan(0);
  });
});

describe('the session on every request', () => {
  // The session row as stored: its expiry and when it was last moved on.
  async function row(sid: string) {
    const r = await sql<{ expire: Date; sess: { touchedAt?: number } }>`select expire, sess from session where sid = ${sid}`.execute(
      t.deps.db,
    );
    return r.rows[0];
  }
  const sidOf = (setCookie: string) => /brink\.sid=s:([^.;]+)/.exec(decodeURIComponent(setCookie))![1];

  it('writes the session at most once a minute, and moves its expiry on after a minute of use', async () => {
    const agent = request.agent(t.app);
    const signIn = await agent.post('/api/auth/sign-in').send({ email: demo.coordinator, password: DEMO_PASSWORD });
    expect(signIn.status).toBe(200);
    const sid = sidOf(String(signIn.headers['set-cookie']));
    const first = await row(sid);
    expect(first.sess.touchedAt).toBeGreaterThan(0);

    // Within the minute: answered as signed in, no cookie sent again, the row untouched.
    for (let i = 0; i < 3; i++) {
      const r = await agent.get('/api/auth/me');
      expect(r.status).toBe(200);
      expect(r.body.user.email).toBe(demo.coordinator);
      expect(r.headers['set-cookie']).toBeUndefined();
    }
    const same = await row(sid);
    expect(same.expire.getTime()).toBe(first.expire.getTime());
    expect(same.sess.touchedAt).toBe(first.sess.touchedAt);

    // As if the last move were two minutes ago: the next request moves the expiry and resends the cookie.
    const earlier = first.sess.touchedAt! - 120_000;
    await sql`update session set sess = jsonb_set(sess::jsonb, '{touchedAt}', to_jsonb(${earlier}::bigint))::json, expire = expire - interval '2 minutes' where sid = ${sid}`.execute(
      t.deps.db,
    );
    const moved = await agent.get('/api/auth/me');
    expect(moved.status).toBe(200);
    expect(String(moved.headers['set-cookie'])).toMatch(/brink\.sid=/);
    const after = await row(sid);
    expect(after.sess.touchedAt).toBeGreaterThan(earlier);
    expect(after.expire.getTime()).toBeGreaterThan(first.expire.getTime() - 120_000);
  });
});
