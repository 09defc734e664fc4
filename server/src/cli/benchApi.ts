/**
 * `npm run bench`, api part: Brink's server started here on 127.0.0.1 against the throw-away database
 * that docker-less-scripts/bench.sh made and seeded (DATABASE_URL), and a bare Express route in its
 * own process beside it; autocannon (10 connections, a few seconds each, loopback only) on each
 * route in turn, in one run, so the ratios compare like with like. Prints figures; asserts nothing.
 */
import autocannon from 'autocannon';
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DEMO_PASSWORD, demoPeople } from '@db/demo/people';

const HOST = '127.0.0.1';
export const ORIGIN_HEADER = (port: number) => `http://${HOST}:${port}`;

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, HOST, () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });
}

async function waitFor(url: string, child: ChildProcess, seconds = 90): Promise<void> {
  const until = Date.now() + seconds * 1000;
  while (Date.now() < until) {
    if (child.exitCode !== null) throw new Error(`${url}: the server stopped (exit ${child.exitCode})`);
    const ok = await fetch(url).then(
      (r) => r.ok,
      () => false,
    );
    if (ok) return;
    await new Promise((r) => setTimeout(r, 250)); // polling a process that is starting: no state to wait on
  }
  throw new Error(`${url} did not answer within ${seconds} s`);
}

/** Brink's server on 127.0.0.1 (stopped by stop()). */
export async function startBrink(
  databaseUrl = process.env.DATABASE_URL,
): Promise<{ port: number; url: string; stop: () => Promise<void> }> {
  if (!databaseUrl) throw new Error('DATABASE_URL is not set: run `npm run bench` (docker-less-scripts/bench.sh)');
  const port = await freePort();
  const env = {
    ...process.env,
    DATABASE_URL: databaseUrl,
    HOST,
    PORT: String(port),
    PUBLIC_URL: ORIGIN_HEADER(port),
    MAIL_CATCHER_PORT: String(await freePort()),
    BRINK_DEMO: '1',
    // As deployed: NODE_ENV=test would also check every answer against its response schema (http.ts),
    // work a real server never does. The mail catcher stays on so that no mail leaves the machine.
    NODE_ENV: 'production',
    MAIL_CATCHER: 'on',
    SESSION_SECRET: process.env.SESSION_SECRET ?? `bench-${process.pid}-${Date.now()}`,
    UPLOAD_DIR: process.env.UPLOAD_DIR ?? mkdtempSync(join(tmpdir(), 'brink-bench-uploads-')),
  };
  // BRINK_BENCH_SERVER_ARGS: node options for the server alone (e.g. `--cpu-prof --cpu-prof-dir=/tmp/p`, which NODE_OPTIONS refuses).
  const nodeArgs = (process.env.BRINK_BENCH_SERVER_ARGS ?? '').split(' ').filter(Boolean);
  const child = spawn(process.execPath, [...nodeArgs, '--import', 'tsx', 'server/src/index.ts'], {
    env,
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  const stop = () =>
    new Promise<void>((resolve) => {
      if (child.exitCode !== null) return resolve();
      child.once('exit', () => resolve());
      child.kill('SIGTERM');
    });
  try {
    await waitFor(`http://${HOST}:${port}/api/health`, child);
  } catch (err) {
    await stop();
    throw err;
  }
  return { port, url: `http://${HOST}:${port}`, stop };
}

/** A bare Express route answering {ok:true}, in its own process like Brink's server. */
async function startBare(): Promise<{ url: string; stop: () => Promise<void> }> {
  const port = await freePort();
  const code = `import('express').then(({default: express}) => { const a = express(); a.get('/ok', (_q, r) => r.json({ ok: true })); a.listen(${port}, '${HOST}'); })`;
  const child = spawn(process.execPath, ['-e', code], { stdio: ['ignore', 'ignore', 'inherit'] });
  const stop = () =>
    new Promise<void>((resolve) => {
      if (child.exitCode !== null) return resolve();
      child.once('exit', () => resolve());
      child.kill('SIGTERM');
    });
  await waitFor(`http://${HOST}:${port}/ok`, child);
  return { url: `http://${HOST}:${port}/ok`, stop };
}

/** Signs in through the API; returns the session cookie. */
export async function signIn(base: string, port: number, email: string): Promise<string> {
  const r = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: ORIGIN_HEADER(port) },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  if (!r.ok) throw new Error(`sign-in as ${email}: ${r.status}`);
  return r.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
}

interface Load {
  label: string;
  url: string;
  method?: 'GET' | 'POST';
  headers?: Record<string, string>;
  body?: string;
}

interface Measured {
  rps: number;
  p50: number;
  p99: number;
  errors: number;
  non2xx: number;
}

async function hammer(l: Load, seconds: number): Promise<Measured> {
  const r = await autocannon({
    url: l.url,
    method: l.method ?? 'GET',
    headers: l.headers,
    body: l.body,
    connections: 10,
    duration: seconds,
  });
  return { rps: r.requests.average, p50: r.latency.p50, p99: r.latency.p99, errors: r.errors + r.timeouts, non2xx: r.non2xx };
}

export async function runApiBench(seconds = 5): Promise<void> {
  console.log(
    `\napi — autocannon, 10 connections, ${seconds} s per route, 127.0.0.1 only; Brink's server and a bare Express route each in its own process`,
  );
  const brink = await startBrink();
  const bare = await startBare();
  try {
    const base = brink.url;
    const supervisor = demoPeople.find((p) => p.email.startsWith('supervisor'))?.email ?? demoPeople[0].email;
    const cookie = await signIn(base, brink.port, supervisor);
    const auth = { cookie, origin: ORIGIN_HEADER(brink.port) };
    const me = (await (await fetch(`${base}/api/auth/me`, { headers: auth })).json()) as { user: { memberships: { siteId: number }[] } };
    const siteId = me.user.memberships[0].siteId;
    const answer = (await (await fetch(`${base}/api/permits?siteId=${siteId}`, { headers: auth })).json()) as Record<string, unknown>;
    const list = (Object.values(answer).find(Array.isArray) ?? []) as { id: number }[];
    if (!list.length) throw new Error('the demo site has no permits');
    const permitId = list[0].id;

    const loads: Load[] = [
      { label: 'bare Express route {ok:true}', url: bare.url },
      { label: 'GET /api/health without a cookie', url: `${base}/api/health` },
      { label: 'GET /api/health with a session cookie', url: `${base}/api/health`, headers: auth },
      {
        label: `POST /api/permits/${permitId}/check (demo permit)`,
        url: `${base}/api/permits/${permitId}/check`,
        method: 'POST',
        headers: { ...auth, 'content-type': 'application/json' },
        body: '{}',
      },
      { label: `GET /api/permits/${permitId}`, url: `${base}/api/permits/${permitId}`, headers: auth },
      // health reads no session since the outage work; this reads it (and the person) like every other call.
      { label: 'GET /api/auth/me (session and person read)', url: `${base}/api/auth/me`, headers: auth },
      { label: `GET /api/sites/${siteId}/excavations`, url: `${base}/api/sites/${siteId}/excavations`, headers: auth },
    ];
    const got = new Map<string, Measured>();
    for (const l of loads) {
      const m = await hammer(l, seconds);
      got.set(l.label, m);
      const bad = m.errors || m.non2xx ? `  (${m.non2xx} non-2xx, ${m.errors} errors)` : '';
      console.log(
        `${l.label.padEnd(48)} ${m.rps.toFixed(0).padStart(7)} req/s  p50 ${String(m.p50).padStart(4)} ms  p99 ${String(m.p99).padStart(4)} ms${bad}`,
      );
    }
    const v = (l: Load) => got.get(l.label)!.rps;
    const [bareL, healthL, sessionL, checkL, permitL, meL, exL] = loads;
    const ratio = (label: string, a: number, b: number, target: number | null) => {
      const r = a / b;
      const verdict = target === null ? '(for reference)' : `target ≥ ${(target * 100).toFixed(0)} %  ${r >= target ? 'meets' : 'MISSES'}`;
      console.log(`${label.padEnd(64)} ${(r * 100).toFixed(0).padStart(4)} %  ${verdict}`);
    };
    console.log('ratios (same run):');
    ratio('health with a session / bare Express route', v(sessionL), v(bareL), 0.5);
    ratio('check route / health with a session', v(checkL), v(sessionL), 0.5);
    ratio('health without a cookie / bare Express route', v(healthL), v(bareL), null);
    ratio('permit read / health with a session', v(permitL), v(sessionL), null);
    ratio('who am I (session read) / bare Express route', v(meL), v(bareL), null);
    // Health has read no session since the outage work; who-am-I reads the session and the person,
    // as health with a cookie did when the target was set.
    ratio('check route / who am I (session and person read)', v(checkL), v(meL), null);
    const ex = got.get(exL.label)!;
    console.log(
      `${"site's excavations, p50".padEnd(64)} ${String(ex.p50).padStart(4)} ms  target ≤ 100 ms  ${ex.p50 <= 100 ? 'meets' : 'MISSES'} (demo site; outlines stored on write: issue 12)`,
    );
  } finally {
    await bare.stop();
    await brink.stop();
  }
}
