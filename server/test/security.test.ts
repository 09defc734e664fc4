import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demo, demoSiteId, signedIn, startTestApp, TEST_ORIGIN, type TestApp } from './helpers';

/**
 * Issue 12 (a security review): cross-site requests, account recovery, odd input. The matrix style
 * of roles.test.ts: every state-changing route the API declares, each way a foreign page could call it.
 */
let t: TestApp;
let siteId: number;
type Agent = Awaited<ReturnType<typeof signedIn>>;
let admin: Agent;
let stateChanging: [string, string][] = [];

beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_IP: '1000' });
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
    expect(names).toEqual(expect.arrayContaining(['post /api/auth/sign-out', 'post /api/permits/1/comments', 'post /api/permits/1/briefing', 'post /api/permits/1/concerns']));
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
      const r = await admin.post('/api/permits/1/comments').set('Content-Encoding', enc).set('Content-Type', 'application/json').send('{"text":"x"}');
      expect(r.status, enc).toBe(415);
      expect(r.body.error.code).toBe('unsupported_encoding');
    }
  });
});
