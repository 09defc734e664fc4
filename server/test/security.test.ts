import express from 'express';
import request from 'supertest';
import bcrypt from 'bcryptjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  addPerson,
  demo,
  DEMO_PASSWORD,
  demoSiteId,
  filesIn,
  ownFileStore,
  signedIn,
  startTestApp,
  TEST_ORIGIN,
  unique,
  type TestApp,
  demoOrganisationId,
} from './helpers';
import { newToken } from '../src/services/tokens';
import { Api, conflict, errorHandler } from '../src/http';
import { limits, receiveFiles, storeUpload } from '../src/services/uploads';
import { permitActions } from '@shared/schemas/permits';
import { roleFor } from './expected-transitions';
import { act, createPermit, makeWorld, permitBody, version, type PermitWorld } from './permits-fixtures';

/**
 * Issue 12 (a security review): cross-site requests, account recovery, odd input. The matrix style
 * of roles.test.ts: every state-changing route the API declares, each way a foreign page could call it.
 */
let t: TestApp;
let siteId: number;
type Agent = Awaited<ReturnType<typeof signedIn>>;
let admin: Agent;
let stateChanging: [string, string][] = [];

/** This file's own upload folder and bucket (ownFileStore), so that the files counted are this file's alone. */
const filesKept = () => filesIn(t.deps.files);
const PNG = Buffer.from(
  '89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d4944415478da63f8cfc0f01f0005000201a5d4cb3b0000000049454e44ae426082',
  'hex',
);

beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_IP: '1000', ...ownFileStore() });
  siteId = await demoSiteId(t.deps);
  admin = await signedIn(t.app, demo.admin);
  const doc = (await request(t.app).get('/api/openapi.json')).body as { paths: Record<string, Record<string, unknown>> };
  stateChanging = Object.entries(doc.paths).flatMap(([p, ops]) =>
    Object.keys(ops)
      .filter((m) => m !== 'get')
      .map((m): [string, string] => [m, p.replace('{siteId}', String(siteId)).replace(/\{[A-Za-z_]+\}/g, '1')]),
  );
});
afterAll(async () => t.stop());

/** Ways a page of another site (or no page) could send a change; each must be refused. */
const foreign: Record<string, Record<string, string>> = {
  'a foreign Origin': { Origin: 'https://attacker.example' },
  'an opaque Origin (null)': { Origin: 'null' },
  'Brink as a subdomain of another origin': { Origin: 'http://brink.test.attacker.example' },
  'no Origin, Sec-Fetch-Site cross-site': { 'Sec-Fetch-Site': 'cross-site' },
  'no Origin, Sec-Fetch-Site same-site': { 'Sec-Fetch-Site': 'same-site' },
};

describe('cross-site requests: every state-changing route', () => {
  it('lists the state-changing routes (at least the sign-out, comment, briefing and concern)', () => {
    const names = stateChanging.map(([m, p]) => `${m} ${p}`);
    expect(names).toEqual(
      expect.arrayContaining([
        'post /api/auth/sign-out',
        'post /api/permits/1/comments',
        'post /api/permits/1/briefing',
        'post /api/permits/1/concerns',
      ]),
    );
  });

  for (const [way, headers] of Object.entries(foreign)) {
    it(`refuses each with 403 from ${way}`, async () => {
      const wrong: string[] = [];
      for (const [m, p] of stateChanging) {
        const r = await admin[m as 'post'](p).set(headers).send({});
        if (r.status !== 403 || r.body.error?.code !== 'cross_site') wrong.push(`${m} ${p} → ${r.status}`);
      }
      expect(wrong).toEqual([]);
    });
  }

  it('refuses each with 403 when neither Origin nor Sec-Fetch-Site is sent', async () => {
    const wrong: string[] = [];
    for (const [m, p] of stateChanging) {
      // An explicit empty Sec-Fetch-Site keeps the test set-up from adding Origin; the server ignores empty values.
      const r = await admin[m as 'post'](p).set('Sec-Fetch-Site', '').send({});
      if (r.status !== 403) wrong.push(`${m} ${p} → ${r.status}`);
    }
    expect(wrong).toEqual([]);
  });

  it('refuses each with 403 from Brink itself when the body is not the type the route takes (text/plain, a form post)', async () => {
    const wrong: string[] = [];
    for (const [m, p] of stateChanging) {
      for (const type of ['text/plain', 'application/x-www-form-urlencoded']) {
        const r = await admin[m as 'post'](p).set('Content-Type', type).send('{"a":1}');
        if (r.status !== 403 || r.body.error?.code !== 'cross_site') wrong.push(`${m} ${p} as ${type} → ${r.status}`);
      }
    }
    expect(wrong).toEqual([]);
  });

  it('refuses multipart on routes that take no files, and takes it where they do', async () => {
    const comment = await admin.post('/api/permits/1/comments').field('text', 'hello');
    expect(comment.status).toBe(403);
    const concern = await admin.post('/api/permits/999999/concerns').set('Origin', 'https://attacker.example').field('note', 'x');
    expect(concern.status).toBe(403);
    // From Brink, multipart passes the guard (404: no such permit).
    expect((await admin.post('/api/permits/999999/concerns').field('note', 'x')).status).toBe(404);
  });

  it('keeps the session when a foreign page tries to sign the person out, and signs out from Brink (Origin or Sec-Fetch-Site)', async () => {
    const person = await signedIn(t.app, demo.operator);
    expect((await person.post('/api/auth/sign-out').set('Origin', 'https://attacker.example')).status).toBe(403);
    expect((await person.get('/api/auth/me')).status).toBe(200);
    const out = await person.post('/api/auth/sign-out').set('Sec-Fetch-Site', 'same-origin');
    expect(out.status).toBe(204);
    expect((await person.get('/api/auth/me')).status).toBe(401);
    const again = await signedIn(t.app, demo.operator);
    expect((await again.post('/api/auth/sign-out').set('Origin', TEST_ORIGIN)).status).toBe(204);
  });

  it('reads from anywhere: GET is not refused for its origin', async () => {
    expect((await admin.get('/api/auth/me').set('Origin', 'https://attacker.example')).status).toBe(200);
  });

  it('answers 415 to a compressed or otherwise encoded body', async () => {
    for (const enc of ['compress', 'gzip', 'x-unknown']) {
      const r = await admin
        .post('/api/permits/1/comments')
        .set('Content-Encoding', enc)
        .set('Content-Type', 'application/json')
        .send('{"text":"x"}');
      expect(r.status, enc).toBe(415);
      expect(r.body.error.code).toBe('unsupported_encoding');
    }
  });
});

async function person(active = true): Promise<{ id: number; email: string }> {
  const email = unique('sec');
  return addPerson(t.deps, { email, name: 'Sam Second', active });
}
async function invitation(email: string): Promise<string> {
  const { token, hash } = newToken();
  await t.deps.db
    .insertInto('invitations')
    .values({
      organisation_id: await demoOrganisationId(t.deps),
      email,
      name: 'Sam Second',
      site_id: siteId,
      role: 'coordinator',
      token_hash: hash,
      expires_at: new Date(Date.now() + 3600_000),
    })
    .execute();
  return token;
}
async function resetToken(userId: number): Promise<string> {
  const { token, hash } = newToken();
  await t.deps.db
    .insertInto('password_resets')
    .values({ user_id: userId, token_hash: hash, expires_at: new Date(Date.now() + 3600_000) })
    .execute();
  return token;
}
const mailsTo = async (email: string) =>
  (await t.deps.db.selectFrom('caught_mail').select('id').where('mail_to', 'ilike', `%${email}%`).execute()).length;
/** Each forgot-password request from an address of its own (the per-address limit is tested on its own). */
let ip = 0;
const forgot = (email: string) =>
  request(t.app)
    .post('/api/auth/forgot-password')
    .set('X-Forwarded-For', `10.9.${Math.floor(++ip / 250)}.${ip % 250}`)
    .send({ email });

describe('accounts: deactivation, resets and locks', () => {
  it('deactivating a person revokes their invitations, reset links and sessions', async () => {
    const p = await person();
    const inv = await invitation(p.email);
    const reset = await resetToken(p.id);
    const session = await signedIn(t.app, p.email);
    expect((await admin.patch(`/api/users/${p.id}`).send({ active: false })).status).toBe(200);
    expect((await session.get('/api/auth/me')).status).toBe(401);
    const accept = await request(t.app)
      .post('/api/invitations/accept')
      .send({ token: inv, name: 'Sam Back', password: 'a-new-password-123' });
    expect(accept.status).toBe(400);
    expect(accept.body.error.code).toBe('invalid_token');
    expect((await request(t.app).post('/api/auth/reset-password').send({ token: reset, password: 'a-new-password-123' })).status).toBe(400);
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: p.email, password: 'a-new-password-123' })).status).toBe(401);
  });

  it('refuses to accept an invitation for an inactive account (no reactivation, no new password, no session)', async () => {
    const p = await person(false);
    const inv = await invitation(p.email);
    const agent = request.agent(t.app);
    const accept = await agent.post('/api/invitations/accept').send({ token: inv, name: 'Sam Back', password: 'a-new-password-123' });
    expect(accept.status).toBe(403);
    expect(accept.body.error.code).toBe('deactivated');
    expect((await agent.get('/api/auth/me')).status).toBe(401);
    const row = await t.deps.db.selectFrom('users').select(['active', 'password_hash']).where('id', '=', p.id).executeTakeFirstOrThrow();
    expect(row.active).toBe(false);
    expect(await bcrypt.compare('a-new-password-123', row.password_hash!)).toBe(false);
  });

  it('answers forgot-password the same for known and unknown addresses, sends at most 3 mails an hour per account, and a new link revokes the older', async () => {
    const p = await person();
    const answers = [];
    for (let i = 0; i < 5; i++) answers.push(await forgot(p.email));
    const unknown = await forgot(unique('nobody'));
    for (const a of [...answers, unknown]) {
      expect(a.status).toBe(202);
      expect(a.body).toEqual(unknown.body);
    }
    await expect.poll(() => mailsTo(p.email), { timeout: 20_000 }).toBe(3);
    const live = await t.deps.db
      .selectFrom('password_resets')
      .select('id')
      .where('user_id', '=', p.id)
      .where('used_at', 'is', null)
      .execute();
    expect(live).toHaveLength(1);
  });

  it('limits forgot-password per address: the 11th request in a quarter hour is 429', async () => {
    const from = (n: number) =>
      request(t.app)
        .post('/api/auth/forgot-password')
        .set('X-Forwarded-For', '10.77.0.1')
        .send({ email: unique(`many${n}`) });
    for (let i = 0; i < 10; i++) expect((await from(i)).status).toBe(202);
    expect((await from(10)).status).toBe(429);
  });

  it('a reset revokes every other reset link and session, and clears the sign-in lock', async () => {
    const p = await person();
    const first = await resetToken(p.id);
    const second = await resetToken(p.id);
    const session = await signedIn(t.app, p.email);
    for (let i = 0; i < 8; i++)
      expect((await request(t.app).post('/api/auth/sign-in').send({ email: p.email, password: 'wrong-password' })).status).toBe(401);
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: p.email, password: DEMO_PASSWORD })).status).toBe(429);
    expect((await request(t.app).post('/api/auth/reset-password').send({ token: second, password: 'fresh-password-456' })).status).toBe(
      204,
    );
    expect((await session.get('/api/auth/me')).status).toBe(401);
    expect((await request(t.app).post('/api/auth/reset-password').send({ token: first, password: 'other-password-789' })).status).toBe(400);
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: p.email, password: 'fresh-password-456' })).status).toBe(200);
  });

  it('counts sign-in failures per account and address: 8 wrong from elsewhere do not lock the owner out', async () => {
    const p = await person();
    const elsewhere = () =>
      request(t.app).post('/api/auth/sign-in').set('X-Forwarded-For', '10.66.0.9').send({ email: p.email, password: 'wrong-password' });
    for (let i = 0; i < 8; i++) expect((await elsewhere()).status).toBe(401);
    expect((await elsewhere()).status).toBe(429);
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: p.email, password: DEMO_PASSWORD })).status).toBe(200);
  });
});

describe('odd input', () => {
  it('answers 400 naming the path parameter for ids of 2³¹ and above, on every route with an id', async () => {
    const doc = (await request(t.app).get('/api/openapi.json')).body as { paths: Record<string, Record<string, unknown>> };
    const wrong: string[] = [];
    for (const [p, ops] of Object.entries(doc.paths)) {
      if (!/\{(id|siteId|revision|attachmentId)\}/.test(p)) continue;
      for (const m of Object.keys(ops)) {
        const url = p.replace(/\{(id|siteId|revision|attachmentId)\}/g, '2147483648').replace(/\{[A-Za-z]+\}/g, '1');
        const r = await admin[m as 'get'](url).send(m === 'get' ? undefined : {});
        if (r.status !== 400) wrong.push(`${m} ${url} → ${r.status}`);
      }
    }
    expect(wrong).toEqual([]);
  });

  it('answers 400, not 500, when PostgreSQL finds a number out of range that no schema stopped', async () => {
    const app = express();
    app.get('/probe', () => {
      throw Object.assign(new Error('value "2147483648" is out of range for type integer'), { code: '22003' });
    });
    app.use(errorHandler);
    const r = await request(app).get('/probe');
    expect(r.status).toBe(400);
    expect(r.body.error.message).toMatch(/too large/);
  });

  it('answers 400 naming the filter for ids of 2³¹ and above in the permit list, never 500', async () => {
    for (const field of ['siteId', 'excavationId']) {
      const r = await admin.get(`/api/permits?${field}=2147483648`);
      expect(r.status).toBe(400);
      expect(r.body.error.fields[field]).toMatch(/below 2³¹/);
    }
  });
});

describe('permit decisions: the role first, never one\u2019s own permit, a limit on the signing password', () => {
  let w: PermitWorld;
  beforeAll(async () => {
    w = await makeWorld(t);
  });

  /** A new person with a role on the demo site, signed in. */
  async function member(role: 'supervisor' | 'coordinator') {
    const p = await person();
    await t.deps.db.insertInto('site_members').values({ site_id: w.siteId, user_id: p.id, role }).execute();
    return { ...p, agent: await signedIn(t.app, p.email) };
  }
  const setRole = (userId: number, role: 'supervisor' | 'coordinator') =>
    t.deps.db.updateTable('site_members').set({ role }).where('site_id', '=', w.siteId).where('user_id', '=', userId).execute();
  async function submitted(agent = w.agents.supervisor) {
    const r = await agent.post('/api/permits').send(permitBody(w));
    expect(r.status).toBe(201);
    const s = await act(agent, r.body.permit.id, { action: 'submit', version: r.body.permit.version });
    expect(s.status).toBe(200);
    return { id: r.body.permit.id as number, number: r.body.permit.number as string, version: s.body.permit.version as number };
  }

  it('decides the role before the body: with only an action, a role that may not take it gets 403, one that may gets 400 naming the fields', async () => {
    const p = await createPermit(w);
    const roles = { operator: 'operator', supervisor: 'supervisor', coordinator: 'coordinator' } as const;
    const wrong: string[] = [];
    for (const action of [...permitActions, 'no-such-action', undefined]) {
      for (const [who, role] of Object.entries(roles)) {
        const r = await act(w.agents[who as keyof typeof roles], p.id, action === undefined ? {} : { action });
        const mayTake =
          typeof action === 'string' && (permitActions as readonly string[]).includes(action)
            ? roleFor(action) === role
            : role !== 'operator'; // an operator takes no action at all: refused whatever the body
        const expected = mayTake ? 400 : 403;
        if (r.status !== expected || (expected === 400 && !r.body.error.fields))
          wrong.push(`${who} ${String(action)} → ${r.status}, expected ${expected}`);
      }
      for (const who of ['outsider', 'admin'] as const) {
        const r = await act(w.agents[who], p.id, action === undefined ? {} : { action });
        if (r.status !== 403) wrong.push(`${who} ${String(action)} → ${r.status}, expected 403`);
      }
    }
    expect(wrong).toEqual([]);
    // The operator's refusal says nothing about the fields an approval needs.
    const op = await act(w.agents.operator, p.id, { action: 'approve' });
    expect(op.body.error.fields).toBeUndefined();
    expect(op.body.error.message).not.toMatch(/password|version/);
  });

  it('nobody approves, returns or declines a permit they requested, even after their role changed', async () => {
    const x = await member('supervisor');
    const p = await submitted(x.agent);
    await setRole(x.id, 'coordinator');
    for (const decision of [
      { action: 'approve' },
      { action: 'return', reason: 'My own request' },
      { action: 'decline', reason: 'My own request' },
    ]) {
      const r = await act(x.agent, p.id, { ...decision, version: p.version, password: DEMO_PASSWORD });
      expect(r.status, decision.action).toBe(403);
      expect(r.body.error.message).toMatch(new RegExp(`You requested or changed permit ${p.number}`));
    }
    expect(await version(w, p.id)).toBe(p.version);
    // The permit page offers them no decision; another coordinator is offered all three.
    expect((await x.agent.get(`/api/permits/${p.id}`)).body.permit.actions).toEqual([]);
    expect((await w.agents.coordinator.get(`/api/permits/${p.id}`)).body.permit.actions).toEqual(
      expect.arrayContaining(['approve', 'return', 'decline']),
    );
    // Another coordinator may: the refusal was about the person.
    const other = await act(w.agents.coordinator, p.id, {
      action: 'return',
      reason: 'Move the loads',
      version: p.version,
      password: DEMO_PASSWORD,
    });
    expect(other.status).toBe(200);
  });

  it('nobody decides on a permit whose revision they edited or revised, even after their role changed', async () => {
    const editor = await member('supervisor');
    const reviser = await member('supervisor');
    const p = await createPermit(w);
    expect(
      (await editor.agent.patch(`/api/permits/${p.id}`).send({ version: p.version, description: 'Edited by a second supervisor' })).status,
    ).toBe(200);
    const s = await act(w.agents.supervisor, p.id, { action: 'submit', version: await version(w, p.id) });
    expect(s.status).toBe(200);
    await setRole(editor.id, 'coordinator');
    const mine = await act(editor.agent, p.id, { action: 'approve', version: s.body.permit.version, password: DEMO_PASSWORD });
    expect(mine.status).toBe(403);
    expect(mine.body.error.message).toMatch(/requested or changed/);
    // Approved by someone else, then revised by a third person, who becomes a coordinator too.
    const a = await act(w.agents.coordinator, p.id, { action: 'approve', version: s.body.permit.version, password: DEMO_PASSWORD });
    expect(a.status).toBe(200);
    const r = await act(reviser.agent, p.id, { action: 'revise', version: a.body.permit.version, reason: 'Longer window' });
    expect(r.status).toBe(200);
    const s2 = await act(w.agents.supervisor, p.id, { action: 'submit', version: r.body.permit.version });
    expect(s2.status).toBe(200);
    await setRole(reviser.id, 'coordinator');
    const revised = await act(reviser.agent, p.id, {
      action: 'decline',
      reason: 'No',
      version: s2.body.permit.version,
      password: DEMO_PASSWORD,
    });
    expect(revised.status).toBe(403);
    expect(revised.body.error.message).toMatch(/requested or changed/);
    await act(w.agents.supervisor, p.id, { action: 'withdraw', version: s2.body.permit.version }).expect(200);
  });

  it('limits the password that signs a decision like sign-in: the last allowed wrong one ends every session (401), signing in again starts afresh', async () => {
    const limit = t.deps.config.signInLimitPerAccount;
    const c = await member('coordinator');
    const second = await signedIn(t.app, c.email);
    const p = await submitted();
    for (let i = 1; i < limit; i++) {
      const r = await act(c.agent, p.id, { action: 'approve', version: p.version, password: `wrong-${i}` });
      expect(r.status, `attempt ${i}`).toBe(400);
      expect(r.body.error.fields).toEqual({ password: 'is not the one you sign in with: type it again' });
    }
    const last = await act(c.agent, p.id, { action: 'approve', version: p.version, password: 'wrong-last' });
    expect(last.status).toBe(401);
    expect(last.body.error.code).toBe('signed_out');
    // Every session of the person has ended: the right password no longer signs anything.
    expect((await act(c.agent, p.id, { action: 'approve', version: p.version, password: DEMO_PASSWORD })).status).toBe(401);
    expect((await second.get('/api/auth/me')).status).toBe(401);
    expect(await version(w, p.id)).toBe(p.version);
    // Signing in (itself limited) proves the password and clears the count.
    const again = await signedIn(t.app, c.email);
    const ok = await act(again, p.id, { action: 'return', reason: 'Move the loads', version: p.version, password: DEMO_PASSWORD });
    expect(ok.status).toBe(200);
  });
});

describe('odd input: text, multipart, files left behind, what a refusal names', () => {
  let w: PermitWorld;
  let permit: { id: number; version: number };
  beforeAll(async () => {
    w = await makeWorld(t);
    permit = await createPermit(w);
  });

  it('answers 400 naming the field for a NUL character or a lone surrogate in any text, in bodies, nested fields, queries and paths', async () => {
    const wrong: string[] = [];
    for (const [bad, what] of [
      ['\u0000', /NUL/],
      ['\ud800', /surrogate/],
    ] as const) {
      const cases: [string, () => request.Test, string][] = [
        ['comment', () => w.agents.supervisor.post(`/api/permits/${permit.id}/comments`).send({ text: `hello${bad}` }), 'text'],
        [
          'permit description',
          () => w.agents.supervisor.post('/api/permits').send(permitBody(w, { description: `dig${bad}` })),
          'description',
        ],
        [
          'a load\u2019s label',
          () =>
            w.agents.supervisor.post('/api/permits').send({ ...permitBody(w), loads: [{ ...permitBody(w).loads![0], label: `x${bad}` }] }),
          'loads[0].label',
        ],
        [
          'transition reason',
          () => act(w.agents.supervisor, permit.id, { action: 'withdraw', version: permit.version, reason: `why${bad}` }),
          'reason',
        ],
        [
          'excavation reference',
          () => w.agents.coordinator.post(`/api/sites/${w.siteId}/excavations`).send({ reference: `T${bad}` }),
          'reference',
        ],
        ['plant name', () => admin.post('/api/plant').send({ name: `Digger${bad}` }), 'name'],
        ['site name', () => admin.patch(`/api/sites/${w.siteId}`).send({ name: `Site${bad}` }), 'name'],
        [
          'sign-in e-mail',
          () =>
            request(t.app)
              .post('/api/auth/sign-in')
              .send({ email: `a${bad}@example.test`, password: 'x' }),
          'email',
        ],
        // A URL carries UTF-8, where half a surrogate pair cannot be written: NUL only there.
        ...(bad === '\u0000'
          ? ([
              ['query', () => w.agents.supervisor.get('/api/permits?view=all%00'), 'view'],
              ['path', () => request(t.app).get(`/api/invitations/${'x'.repeat(30)}%00`), 'token'],
            ] as [string, () => request.Test, string][])
          : []),
      ];
      for (const [name, send, field] of cases) {
        const r = await send();
        if (r.status !== 400 || !what.test(r.body.error?.fields?.[field] ?? ''))
          wrong.push(`${name} with ${JSON.stringify(bad)} → ${r.status} ${JSON.stringify(r.body.error?.fields)}`);
      }
    }
    expect(wrong).toEqual([]);
    expect(await version(w, permit.id)).toBe(permit.version);
  });

  it('answers 400 to a truncated multipart body and to a NUL in an upload\u2019s file name, and keeps no file', async () => {
    const before = await filesKept();
    const part = (disposition: string, body: Buffer | string, close = true) =>
      Buffer.concat([
        Buffer.from(
          `--XB\r\nContent-Disposition: form-data; name="kind"\r\n\r\nphoto\r\n--XB\r\nContent-Disposition: form-data; name="file"; ${disposition}\r\nContent-Type: image/png\r\n\r\n`,
        ),
        Buffer.isBuffer(body) ? body : Buffer.from(body),
        Buffer.from(close ? '\r\n--XB--\r\n' : ''),
      ]);
    const post = (raw: Buffer) =>
      w.agents.supervisor.post(`/api/permits/${permit.id}/attachments`).set('Content-Type', 'multipart/form-data; boundary=XB').send(raw);
    const truncated = await post(part('filename="site.png"', PNG.subarray(0, 20), false));
    expect(truncated.status).toBe(400);
    expect(truncated.body.error.message).toMatch(/cut short|well-formed/);
    for (const name of ["filename*=UTF-8''site%00.png", 'filename="site\u0000.png"']) {
      const r = await post(part(name, PNG));
      expect(r.status, name).toBe(400);
      expect(r.body.error.code).toBe('invalid');
    }
    const encoded = await post(part("filename*=UTF-8''site%00.png", PNG));
    expect(encoded.body.error.fields).toEqual({ file: expect.stringMatching(/NUL/) });
    // The same upload with a plain name is kept: the refusals were about the body and the name.
    const ok = await post(part('filename="site.png"', PNG));
    expect(ok.status).toBe(201);
    expect(await filesKept()).toBe(before + 1);
  });

  it('removes every stored file a request does not keep: refused after storing, or rolled back', async () => {
    const api = new Api(t.deps);
    let stored = 0;
    for (const [path, keep] of [
      ['/api/test/refused', false],
      ['/api/test/kept', true],
    ] as const) {
      api.route(
        {
          method: 'post',
          path,
          summary: 'test',
          tag: 'test',
          access: { kind: 'public' },
          before: [receiveFiles(['file'], limits.image)],
          files: ['file'],
        },
        async ({ req, deps }) => {
          const file = (req.files as Record<string, Express.Multer.File[]>).file[0];
          await deps.db.transaction().execute(async (trx) => {
            await storeUpload(deps, file, { field: 'file', accept: 'image', purpose: 'test', siteId: null, userId: null, db: trx });
            stored += 1;
            if (!keep) throw conflict('Refused after the file was stored.');
          });
          return { ok: true };
        },
      );
    }
    const app = express();
    app.use('/api', api.router);
    app.use(errorHandler);
    const before = await filesKept();
    const refused = await request(app).post('/api/test/refused').attach('file', PNG, { filename: 'a.png', contentType: 'image/png' });
    expect(refused.status).toBe(409);
    expect(await filesKept()).toBe(before);
    const kept = await request(app).post('/api/test/kept').attach('file', PNG, { filename: 'b.png', contentType: 'image/png' });
    expect(kept.status).toBe(200);
    expect(stored).toBe(2);
    expect(await filesKept()).toBe(before + 1);
  });

  it('a 409 on deleting an excavation never names another site\u2019s permits: their excavation is 404 like a missing one', async () => {
    // A coordinator of a second site, and the world's trench on the demo site named on a permit.
    const other = await t.deps.db
      .insertInto('sites')
      .values({ organisation_id: await demoOrganisationId(t.deps), name: `Second site ${unique('s')}`, latitude: 51.2, longitude: 0.1 })
      .returning('id')
      .executeTakeFirstOrThrow();
    const p = await person();
    await t.deps.db.insertInto('site_members').values({ site_id: other.id, user_id: p.id, role: 'coordinator' }).execute();
    const them = await signedIn(t.app, p.email);
    const theirs = await them.delete(`/api/sites/${other.id}/excavations/${w.trenchId}`);
    const missing = await them.delete(`/api/sites/${other.id}/excavations/2147483000`);
    expect(theirs.status).toBe(404);
    expect(theirs.body).toEqual(missing.body);
    expect(JSON.stringify(theirs.body)).not.toMatch(/P-\d+/);
    // On the demo site itself they are refused alike, whether the excavation exists or not.
    const a = await them.delete(`/api/sites/${w.siteId}/excavations/${w.trenchId}`);
    const b = await them.delete(`/api/sites/${w.siteId}/excavations/2147483000`);
    expect([a.status, b.status]).toEqual([403, 403]);
    expect(a.body).toEqual(b.body);
    // A member of the demo site is told which permits name it.
    const own = await w.agents.coordinator.delete(`/api/sites/${w.siteId}/excavations/${w.trenchId}`);
    expect(own.status).toBe(409);
    expect(own.body.error.message).toMatch(/P-\d+/);
    // The shared plant library: a coordinator of another site learns only that permits elsewhere keep the machine.
    const plant = await them.delete(`/api/plant/${w.excavatorId}`);
    expect(plant.status).toBe(409);
    expect(plant.body.error.message).not.toMatch(/P-\d+/);
    expect((await w.agents.coordinator.delete(`/api/plant/${w.excavatorId}`)).body.error.message).toMatch(/P-\d+/);
  });
});
