import { execFile, spawn, type ChildProcess } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { createDb, createPool } from '@db/database';
import { migrateToLatest } from '@db/migrate';
import { seedDemoIfEmpty } from '@db/demo';
import { DATABASE_UNAVAILABLE } from '../src/http';
import { demo, DEMO_PASSWORD, freePort } from './helpers';

// A database outage, for real: Brink (server/src/index.ts, as `npm start` runs it) against a
// PostgreSQL cluster of this test's own, which the test stops (pg_ctl stop -m fast, cutting every
// pooled connection) and starts again. While it is down every call answers 503 with a plain message
// and the process stays up; afterwards sessions, sign-in, permit transitions and the mail queue
// work again without a restart.

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const cluster = path.join(root, 'docker-less-scripts/pg-cluster.sh');
const run = promisify(execFile);
const pg = (...args: string[]) => run('bash', [cluster, ...args], { cwd: root, timeout: 120_000 });

let work: string;
let dir: string;
let pgPort: number;
let base: string;
let server: ChildProcess;
let output = '';

beforeAll(async () => {
  work = await mkdtemp('/tmp/brink-outage-');
  dir = path.join(work, 'pg');
  pgPort = await freePort();
  const up = await pg('up', dir, String(pgPort));
  const url = up.stdout.trim().split('\n').pop()!;
  const db = createDb(createPool(url, 2));
  await migrateToLatest(db);
  await seedDemoIfEmpty(db);
  await db.destroy();

  const port = await freePort();
  base = `http://127.0.0.1:${port}`;
  server = spawn(process.execPath, ['--import', 'tsx', 'server/src/index.ts'], {
    cwd: root,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      ...process.env,
      DATABASE_URL: url,
      PORT: String(port),
      PUBLIC_URL: base,
      MAIL_CATCHER: 'on',
      MAIL_CATCHER_PORT: String(await freePort()),
      BRINK_DEMO: '1',
      NODE_ENV: 'test',
      SESSION_SECRET: 'outage-test-secret',
      UPLOAD_DIR: path.join(work, 'uploads'),
    },
  });
  server.stdout!.on('data', (b) => (output += b));
  server.stderr!.on('data', (b) => (output += b));
  // Ready when it answers its health check (or gone, with its output to say why).
  for (const t0 = Date.now(); (await call('/api/health')).status !== 200;) {
    if (!alive() || Date.now() - t0 > 120_000) throw new Error(`the server did not start:\n${output}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}, 240_000);

afterAll(async () => {
  if (server && server.exitCode === null) {
    const gone = new Promise((r) => server.once('exit', r));
    server.kill('SIGTERM');
    await gone;
  }
  if (dir) await pg('destroy', dir).catch(() => undefined);
  if (work) await rm(work, { recursive: true, force: true });
}, 60_000);

async function call(url: string, opts: { method?: string; body?: unknown; cookie?: string } = {}) {
  try {
    const r = await fetch(base + url, {
      method: opts.method ?? 'GET',
      headers: {
        origin: base,
        ...(opts.body ? { 'content-type': 'application/json' } : {}),
        ...(opts.cookie ? { cookie: opts.cookie } : {}),
      },
      body: opts.body ? JSON.stringify(opts.body) : undefined,
    });
    const text = await r.text();
    let body: any = null;
    try {
      body = JSON.parse(text);
    } catch {
      body = text;
    }
    return { status: r.status, body, cookie: r.headers.get('set-cookie')?.split(';')[0] ?? opts.cookie };
  } catch (err) {
    return { status: 0, body: String(err), cookie: opts.cookie };
  }
}

async function signIn(email: string) {
  const r = await call('/api/auth/sign-in', { method: 'POST', body: { email, password: DEMO_PASSWORD } });
  return r;
}

const alive = () => server.exitCode === null && server.signalCode === null;

it('answers 503 with a plain message while PostgreSQL is down, stays up, and recovers by itself when it is back', async () => {
  const coordinator = await signIn(demo.coordinator);
  expect(coordinator.status).toBe(200);
  const cookie = coordinator.cookie!;
  // Idle pooled connections on every pool (the API's, the sessions', the queue's): the kind
  // that PostgreSQL's shutdown turns into 'error' events.
  expect((await call('/api/auth/me', { cookie })).status).toBe(200);
  const sites = await call('/api/sites', { cookie });
  expect(sites.status).toBe(200);
  const pid = server.pid;

  await pg('stop', dir);
  // Brink noticed: its pools lost their connections and said so.
  await expect.poll(() => output, { timeout: 20_000 }).toMatch(/database connection lost/);

  const health = await call('/api/health');
  expect(health).toMatchObject({ status: 503, body: { ok: false, database: 'unreachable' } });
  const me = await call('/api/auth/me', { cookie });
  expect(me.status).toBe(503);
  expect(me.body).toEqual({ error: { code: 'unavailable', message: DATABASE_UNAVAILABLE } });
  const again = await signIn(demo.supervisor);
  expect(again.status).toBe(503);
  expect(again.body.error.message).toBe(DATABASE_UNAVAILABLE);
  const transition = await call('/api/permits/1/transitions', {
    method: 'POST',
    cookie,
    body: { action: 'suspend', version: 1, reason: 'Outage test' },
  });
  expect(transition.status).toBe(503);
  // The mail and schedule workers keep polling into the outage; the process is still the same one.
  await expect.poll(() => output, { timeout: 20_000 }).toMatch(/\[jobs\]/);
  expect(alive()).toBe(true);
  expect(server.pid).toBe(pid);
  expect(output).not.toMatch(/unhandled|Unhandled 'error' event/i);

  await pg('start', dir, String(pgPort));
  await expect.poll(async () => (await call('/api/health')).status, { timeout: 30_000, interval: 250 }).toBe(200);

  // The session made before the outage still holds; a new sign-in works.
  const meAfter = await call('/api/auth/me', { cookie });
  expect(meAfter.status).toBe(200);
  expect(meAfter.body.user.email).toBe(demo.coordinator);
  const supervisor = await signIn(demo.supervisor);
  expect(supervisor.status).toBe(200);

  // A permit transition commits, and its notice goes through the queue to the mail catcher.
  const site = sites.body.sites[0];
  const list = await call(`/api/permits?siteId=${site.id}&status=live`, { cookie });
  expect(list.status).toBe(200);
  const live = list.body.permits.find((p: { status: string }) => p.status === 'live');
  expect(live).toBeTruthy();
  const one = await call(`/api/permits/${live.id}`, { cookie });
  const suspended = await call(`/api/permits/${live.id}/transitions`, {
    method: 'POST',
    cookie,
    body: { action: 'suspend', version: one.body.permit.version, reason: 'Checking the props after the outage' },
  });
  expect(suspended.status).toBe(200);
  expect(suspended.body.permit.status).toBe('suspended');
  await expect
    .poll(
      async () => {
        const mail = await call(`/api/dev/mail?to=${encodeURIComponent(demo.supervisor)}`);
        return (mail.body.messages ?? []).some(
          (m: { subject: string }) => m.subject === `Permit ${live.number} at ${site.name} is suspended`,
        );
      },
      { timeout: 30_000, interval: 250 },
    )
    .toBe(true);
  expect(alive()).toBe(true);
  expect(server.pid).toBe(pid);
}, 180_000);
