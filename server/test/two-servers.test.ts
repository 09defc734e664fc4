import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { connect } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Db } from '@db/database';
import { seedDemoIfEmpty } from '@db/demo';
import { FAKE_S3_KEY, startFakeS3 } from '../src/files/fake-s3';
import { demo, DEMO_PASSWORD, freePort, ownDatabase } from './helpers';

// Issue 16 §2: two Brink server processes on one database and one object store, as behind a load
// balancer (the same PUBLIC_URL and SESSION_SECRET), requests alternating between them. A database of
// its own (made and dropped here), so that the servers' permit schedule touches nothing of other files.
const ORIGIN = 'http://brink.test';
const PNG = Buffer.from(
  '89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d4944415478da63f8cfc0f01f0005000201a5d4cb3b0000000049454e44ae426082',
  'hex',
);
const work = mkdtempSync(join(tmpdir(), 'brink-two-'));
let drop: () => Promise<void>;
let db: Db;
let fake: Awaited<ReturnType<typeof startFakeS3>>;
const servers: { url: string; child: ChildProcess; log: string[] }[] = [];

async function until<T>(what: string, probe: () => Promise<T | undefined | false>, seconds = 120): Promise<T> {
  const end = Date.now() + seconds * 1000;
  for (;;) {
    const got = await probe().catch(() => undefined);
    if (got) return got;
    if (Date.now() > end) throw new Error(`waited ${seconds} s for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

async function startServer(url: string): Promise<void> {
  const port = await freePort();
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/src/index.ts'], {
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      ...process.env,
      NODE_ENV: 'test',
      DATABASE_URL: url,
      HOST: '127.0.0.1',
      PORT: String(port),
      PUBLIC_URL: ORIGIN,
      SESSION_SECRET: 'two-servers-one-secret',
      BRINK_DEMO: '1',
      MAIL_CATCHER: 'on',
      MAIL_CATCHER_PORT: String(await freePort()),
      SMTP_URL: '',
      PUSH_KEYS_FILE: join(work, 'vapid-keys.json'),
      PUSH_FAKE_SERVICE_URL: '',
      STORAGE: 's3',
      S3_ENDPOINT: fake.url,
      S3_BUCKET: 'brink-two',
      S3_ACCESS_KEY_ID: FAKE_S3_KEY.accessKeyId,
      S3_SECRET_ACCESS_KEY: FAKE_S3_KEY.secretAccessKey,
      SIGNIN_LIMIT_PER_ACCOUNT: '3',
    },
  });
  const log: string[] = [];
  child.stdout!.on('data', (d: Buffer) => log.push(d.toString()));
  child.stderr!.on('data', (d: Buffer) => log.push(d.toString()));
  const server = { url: `http://127.0.0.1:${port}`, child, log };
  servers.push(server);
  await until(`server ${servers.length} to answer`, async () => {
    if (child.exitCode !== null) throw new Error(`server stopped: ${log.join('')}`);
    return (await fetch(`${server.url}/api/health`)).ok;
  });
}

beforeAll(async () => {
  let url: string;
  ({ url, db, drop } = await ownDatabase('brink_two'));
  await seedDemoIfEmpty(db);
  fake = await startFakeS3(join(work, 's3'));
  // One after the other: the first makes pg-boss's schema and the bucket.
  await startServer(url);
  await startServer(url);
}, 240_000);

afterAll(async () => {
  await Promise.all(
    servers.map(
      (s) =>
        new Promise<void>((resolve) => {
          if (s.child.exitCode !== null) return resolve();
          s.child.once('exit', () => resolve());
          s.child.kill('SIGTERM');
        }),
    ),
  );
  await drop?.();
  await fake?.close();
  rmSync(work, { recursive: true, force: true });
}, 60_000);

/** A request to one server, saying it comes from Brink's own origin, with the session cookie if any. */
function call(server: number, path: string, init: RequestInit & { cookie?: string } = {}) {
  const headers = new Headers(init.headers);
  headers.set('Origin', ORIGIN);
  if (init.cookie) headers.set('Cookie', init.cookie);
  return fetch(`${servers[server].url}${path}`, { ...init, headers });
}
const json = (body: unknown) => ({ method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(body) });
async function signIn(server: number, email: string, password = DEMO_PASSWORD) {
  const r = await call(server, '/api/auth/sign-in', json({ email, password }));
  return { status: r.status, cookie: (r.headers.get('set-cookie') ?? '').split(';')[0] };
}

describe('two servers, one database, one object store', () => {
  it('signed in on one, acts on the other', async () => {
    const { status, cookie } = await signIn(0, demo.coordinator);
    expect(status).toBe(200);
    const me = await call(1, '/api/auth/me', { cookie });
    expect(me.status).toBe(200);
    expect(((await me.json()) as { user: { email: string } }).user.email).toBe(demo.coordinator);
    const out = await call(1, '/api/auth/sign-out', { method: 'POST', cookie });
    expect(out.status).toBe(204);
    expect((await call(0, '/api/auth/me', { cookie })).status).toBe(401);
  });

  it('a file uploaded through one is read through the other, only by a member of its site', async () => {
    const { cookie } = await signIn(1, demo.admin);
    const site = await db.selectFrom('sites').select(['id', 'longitude', 'latitude']).orderBy('id').executeTakeFirstOrThrow();
    const form = new FormData();
    form.set('file', new Blob([PNG], { type: 'image/png' }), 'plan.png');
    for (const [k, v] of Object.entries({
      south: site.latitude - 0.001,
      north: site.latitude + 0.001,
      west: site.longitude - 0.001,
      east: site.longitude + 0.001,
    }))
      form.set(k, String(v));
    const put = await call(1, `/api/sites/${site.id}/plan`, { method: 'PUT', body: form, cookie });
    expect(put.status).toBe(200);
    const { plan_upload_id: uploadId } = await db
      .selectFrom('sites')
      .select('plan_upload_id')
      .where('id', '=', site.id)
      .executeTakeFirstOrThrow();
    expect(uploadId).not.toBeNull();
    const got = await call(0, `/api/uploads/${uploadId}`, { cookie });
    expect(got.status).toBe(200);
    expect(Buffer.from(await got.arrayBuffer()).equals(PNG)).toBe(true);
    expect((await call(0, `/api/uploads/${uploadId}`)).status).toBe(401);
  });

  it('a sign-in limit reached on one holds on the other', async () => {
    for (let i = 0; i < 3; i++) expect((await signIn(i % 2, demo.supervisor, 'not-the-password')).status).toBe(401);
    expect((await signIn(1, demo.supervisor)).status).toBe(429);
    expect((await signIn(0, demo.supervisor)).status).toBe(429);
  });

  it('a scheduled lapse runs once', async () => {
    const live = await db
      .selectFrom('permits')
      .select(['id', 'revision'])
      .where('status', 'in', ['live', 'approved'])
      .orderBy('id')
      .executeTakeFirstOrThrow();
    await db
      .updateTable('permit_revisions')
      .set({ window_start: new Date(Date.now() - 2 * 3600_000), window_end: new Date(Date.now() - 60_000) })
      .where('permit_id', '=', live.id)
      .where('revision', '=', live.revision)
      .execute();
    // The servers' own one-minute schedule (pg-boss cron) lapses it; both servers' workers poll.
    await until(
      'the permit to lapse',
      async () => {
        const p = await db.selectFrom('permits').select('status').where('id', '=', live.id).executeTakeFirstOrThrow();
        return p.status === 'lapsed';
      },
      150,
    );
    const events = await db
      .selectFrom('permit_events')
      .select('id')
      .where('permit_id', '=', live.id)
      .where('action', '=', 'lapse')
      .execute();
    expect(events).toHaveLength(1);
    const said = servers.flatMap((s) => s.log.join('').match(new RegExp(`lapsed [0-9,]*\\b${live.id}\\b`, 'g')) ?? []);
    expect(said).toHaveLength(1);
  }, 200_000);

  // Last in the file: it stops the second server.
  it('a request being answered when its server is told to stop gets its answer before the server goes', async () => {
    const s = servers[1];
    const socket = connect(Number(new URL(s.url).port), '127.0.0.1');
    let text = '';
    socket.on('data', (d: Buffer) => (text += d.toString()));
    const closed = new Promise<void>((resolve) => socket.on('close', () => resolve()));
    const answers = () => text.match(/HTTP\/1\.1 \d{3}/g) ?? [];
    // A first request on the connection: the server has taken it and reads from it.
    socket.write('GET /api/health HTTP/1.1\r\nHost: 127.0.0.1\r\n\r\n');
    await until('the first answer', async () => answers().length === 1);
    // Then a sign-in's head and the start of its body.
    const body = JSON.stringify({ email: demo.operator, password: DEMO_PASSWORD });
    socket.write(
      `POST /api/auth/sign-in HTTP/1.1\r\nHost: 127.0.0.1\r\nOrigin: ${ORIGIN}\r\nContent-Type: application/json\r\n` +
        `Content-Length: ${Buffer.byteLength(body)}\r\nConnection: close\r\n\r\n${body.slice(0, 10)}`,
    );
    // An answer to bytes that reached the server after those: the server has read them too.
    expect((await fetch(`${s.url}/api/health`)).ok).toBe(true);
    s.child.kill('SIGTERM');
    await until('the server to say it is stopping', async () => s.log.join('').includes('SIGTERM: stopping Brink'));
    // The rest of the body (the connection stays open: an HTTP server drops a request whose client half-closes).
    socket.write(body.slice(10));
    await closed; // Connection: close, once the sign-in is answered
    expect(answers()).toEqual(['HTTP/1.1 200', 'HTTP/1.1 200']);
    await until('the server to exit', async () => s.child.exitCode !== null);
    expect(s.child.exitCode).toBe(0);
  });
});
