import { execFile, spawn, type ChildProcess } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { createWriteStream } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { parseArgs } from 'node:util';
import { sql } from 'kysely';
import { SMTPServer } from 'smtp-server';
import { createDb, createPool, type Db } from '@db/database';
import { migrateToLatest } from '@db/migrate';
import { freePort } from '../services/ports';
import { seedDemoIfEmpty } from '@db/demo';
import { DEMO_PASSWORD, demoPeople } from '@db/demo/people';
import { localProjection } from '@shared/geometry';
import { checklist } from '@shared/schemas/inspections';
import { permitStatuses, transitionRules, type PermitAction } from '@shared/schemas/permits';

// `npm run chaos`: Brink under fire on this machine only (127.0.0.1). A throw-away PostgreSQL
// cluster, a mail catcher of its own (counting every message it receives by Message-ID) and Brink
// under `supervise` (docker-less-scripts/lib.sh), as `npm start` runs it. Several clients drive
// permit transitions and inspections over HTTP while the server is killed with SIGKILL at random
// points and PostgreSQL is stopped and started once. Then it checks and prints the invariants and
// exits non-zero when one fails. Bounded in count and time; cleans up after itself.
//
//   npm run chaos                      12 kills, 1,000 transitions, 50 inspections, 4 clients
//   npm run chaos -- --short           2 kills, 100 transitions, 10 inspections (inside npm test)
//   npm run chaos -- --kills 20 --transitions 3000 --inspections 80 --clients 6 --time-limit 900

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../..');
const run = promisify(execFile);

const { values: args } = parseArgs({
  options: {
    short: { type: 'boolean', default: false },
    kills: { type: 'string' },
    transitions: { type: 'string' },
    inspections: { type: 'string' },
    clients: { type: 'string' },
    'time-limit': { type: 'string' },
    keep: { type: 'boolean', default: false },
  },
});
const opts = {
  kills: Number(args.kills ?? (args.short ? 2 : 12)),
  transitions: Number(args.transitions ?? (args.short ? 100 : 1000)),
  inspections: Number(args.inspections ?? (args.short ? 10 : 50)),
  clients: Number(args.clients ?? (args.short ? 3 : 4)),
  timeLimitS: Number(args['time-limit'] ?? (args.short ? 170 : 900)),
};
for (const [k, v] of Object.entries(opts)) if (!Number.isInteger(v) || v < 1) fail(`--${k} must be a whole number of at least 1`);
const permitsPerClient = 4;
const started = Date.now();
const deadline = started + opts.timeLimitS * 1000;

function fail(message: string): never {
  console.error(`[chaos] ${message}`);
  process.exit(2);
}
const log = (m: string) => console.log(`[chaos ${((Date.now() - started) / 1000).toFixed(1).padStart(6)} s] ${m}`);
const pause = (ms: number) => new Promise((r) => setTimeout(r, ms));
function overTime(): boolean {
  return Date.now() > deadline;
}

// ------------------------------------------------------------------------------------------------
// The mail catcher: every message received, by Message-ID.

class Catcher {
  readonly received = new Map<string, number>();
  withoutId = 0;
  private server: SMTPServer | null = null;
  async start(port: number) {
    const received = this.received;
    this.server = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      logger: false,
      onData: (stream, _session, callback) => {
        let head = '';
        stream.on('data', (b: Buffer) => {
          if (head.length < 16_384) head += b.toString('utf8');
        });
        stream.on('end', () => {
          const id = head.split(/\r?\n\r?\n/)[0].match(/^Message-ID:\s*<([^>]+)>/im)?.[1];
          if (id) received.set(id, (received.get(id) ?? 0) + 1);
          else this.withoutId++;
          callback();
        });
      },
    });
    // A sender killed mid-message resets its connection: expected here.
    this.server.on('error', () => undefined);
    await new Promise<void>((resolve) => this.server!.listen(port, '127.0.0.1', resolve));
  }
  async stop() {
    const s = this.server;
    this.server = null;
    if (s) await new Promise<void>((r) => s.close(() => r()));
  }
}

// ------------------------------------------------------------------------------------------------
// PostgreSQL and the supervised server.

const cluster = (...a: string[]) =>
  run('bash', [path.join(root, 'docker-less-scripts/pg-cluster.sh'), ...a], { cwd: root, timeout: 180_000 });

interface Env {
  work: string;
  pgDir: string;
  pgPort: number;
  url: string;
  base: string;
  pidFile: string;
  supervisor: ChildProcess | null;
}

async function currentServerPid(env: Env): Promise<number | null> {
  try {
    const n = Number((await readFile(env.pidFile, 'utf8')).trim());
    return n > 0 ? n : null;
  } catch {
    return null;
  }
}

function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

async function healthy(env: Env): Promise<boolean> {
  try {
    const r = await fetch(`${env.base}/api/health`, { signal: AbortSignal.timeout(3000) });
    return r.status === 200;
  } catch {
    return false;
  }
}

/** Waits until the server answers its health check (bounded by the run's deadline). */
async function waitHealthy(env: Env, what: string): Promise<void> {
  while (!(await healthy(env))) {
    if (overTime()) throw new Error(`time limit reached waiting for ${what}`);
    if (env.supervisor?.exitCode !== null) throw new Error(`the supervisor exited waiting for ${what}`);
    await pause(200);
  }
}

// ------------------------------------------------------------------------------------------------
// HTTP clients (cookies by hand; every change says Brink's Origin).

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- answers of every route, read as the tests read them
type Answer = { status: number; body: any };

class Client {
  cookie = '';
  constructor(
    private readonly base: string,
    readonly email: string,
  ) {}
  async call(method: string, url: string, body?: unknown): Promise<Answer> {
    try {
      const r = await fetch(this.base + url, {
        method,
        headers: {
          origin: this.base,
          ...(body ? { 'content-type': 'application/json' } : {}),
          ...(this.cookie ? { cookie: this.cookie } : {}),
        },
        body: body ? JSON.stringify(body) : undefined,
        signal: AbortSignal.timeout(20_000),
      });
      const set = r.headers.get('set-cookie');
      if (set) this.cookie = set.split(';')[0];
      const text = await r.text();
      let parsed: unknown = text;
      try {
        parsed = JSON.parse(text);
      } catch {
        /* not JSON */
      }
      return { status: r.status, body: parsed };
    } catch (err) {
      return { status: 0, body: String(err) };
    }
  }
  async signIn(): Promise<void> {
    const r = await this.call('POST', '/api/auth/sign-in', { email: this.email, password: DEMO_PASSWORD });
    if (r.status !== 200) throw new Error(`sign-in as ${this.email}: ${r.status} ${JSON.stringify(r.body)}`);
  }
}

/** A call that must go through: retried while the server is down or restarting (never on 4xx). */
async function until(c: Client, method: string, url: string, body?: unknown): Promise<Answer> {
  for (;;) {
    const r = await c.call(method, url, body);
    if (r.status !== 0 && r.status !== 502 && r.status !== 503) return r;
    if (overTime()) throw new Error(`time limit reached on ${method} ${url}`);
    await pause(200);
  }
}

// ------------------------------------------------------------------------------------------------
// The run.

interface Acked {
  permitId: number;
  action: PermitAction;
}

interface World {
  siteId: number;
  siteName: string;
  origin: [number, number];
  excavatorId: number;
  coordinator: Client;
  supervisor: Client;
}

const stats = { acked: [] as Acked[], unknown: 0, refused: 0, inspections: 0, inspectionRetries: 0, kills: 0, pgStops: 0 };

async function makeTrench(w: World, i: number): Promise<number> {
  const proj = localProjection(w.origin);
  const [cx, cy] = [-2000 + i * 80, 1500];
  // the coordinator: design data (support, surcharge, soil) are theirs to set
  const r = await until(w.coordinator, 'POST', `/api/sites/${w.siteId}/excavations`, {
    reference: `CH-${i + 1}-${randomUUID().slice(0, 4)}`,
    name: `Chaos trench ${i + 1}`,
    kind: 'trench',
    geometry: { type: 'LineString', coordinates: [proj.toWgs84([cx - 15, cy]), proj.toWgs84([cx + 15, cy])] },
    width: 1.0,
    depth: 2.4,
    state: 'open',
    supportType: 'hydraulic-frames',
    designSurcharge: 10,
    soil: [{ top: 0, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 30, cohesion: 0 }],
  });
  if (r.status !== 201) throw new Error(`excavation: ${r.status} ${JSON.stringify(r.body)}`);
  return r.body.excavation.id;
}

interface PermitState {
  id: number;
  number: string;
  version: number;
  status: string;
}

async function transition(w: World, c: Client, p: PermitState, action: PermitAction, extra: Record<string, unknown> = {}): Promise<Answer> {
  const r = await c.call('POST', `/api/permits/${p.id}/transitions`, { action, version: p.version, ...extra });
  if (r.status === 200) {
    stats.acked.push({ permitId: p.id, action });
    p.version = r.body.permit.version;
    p.status = r.body.permit.status;
  } else if (r.status === 0 || r.status >= 500) {
    stats.unknown++;
  } else {
    stats.refused++;
  }
  if (r.status !== 200) await refresh(w, p);
  return r;
}

async function refresh(w: World, p: PermitState): Promise<void> {
  const r = await until(w.coordinator, 'GET', `/api/permits/${p.id}`);
  if (r.status !== 200) throw new Error(`permit ${p.id}: ${r.status} ${JSON.stringify(r.body)}`);
  p.version = r.body.permit.version;
  p.status = r.body.permit.status;
}

async function livePermit(w: World, excavationId: number, centre: [number, number]): Promise<PermitState> {
  const proj = localProjection(w.origin);
  const now = Date.now();
  const created = await until(w.supervisor, 'POST', '/api/permits', {
    siteId: w.siteId,
    kind: 'load',
    description: 'Excavator loading out beside the chaos trench',
    windowStart: new Date(now - 3600_000).toISOString(),
    windowEnd: new Date(now + 8 * 3600_000).toISOString(),
    excavationIds: [excavationId],
    // the 21 t excavator of the demo library, its near track 4 m from the trench edge
    loads: [
      {
        id: 'exc',
        kind: 'plant',
        label: 'Excavator',
        plantItemId: w.excavatorId,
        position: proj.toWgs84([centre[0], centre[1] + 0.5 + 4 + 0.3 + 1.1]),
        rotation: 90,
      },
    ],
    operatorIds: [],
  });
  if (created.status !== 201) throw new Error(`permit: ${created.status} ${JSON.stringify(created.body)}`);
  const p: PermitState = {
    id: created.body.permit.id,
    number: created.body.permit.number,
    version: created.body.permit.version,
    status: 'draft',
  };
  // Before the chaos starts: these go through first time.
  for (const [c, action, extra] of [
    [w.supervisor, 'submit', {}],
    [w.coordinator, 'approve', { password: DEMO_PASSWORD }],
  ] as const) {
    const r = await transition(w, c, p, action, extra);
    if (r.status !== 200) throw new Error(`${action}: ${r.status} ${JSON.stringify(r.body)}`);
  }
  if (p.status !== 'live') throw new Error(`permit ${p.number} is ${p.status} after approval, not live`);
  return p;
}

function inspectionForm(outcome: 'safe' | 'not-safe'): Record<string, unknown> {
  const items = Object.fromEntries(checklist.map((c) => [c.key, { answer: c.key === 'atmosphere' ? 'na' : 'pass', note: '' }]));
  if (outcome === 'not-safe') items.support = { answer: 'fail', note: 'Frame 3 has slipped 100 mm' };
  return {
    reason: 'shift-start',
    checklist: items,
    outcome,
    ...(outcome === 'not-safe' ? { remarks: 'Frame 3 slipped; keep loads back' } : {}),
    clientRef: randomUUID(),
  };
}

/** Sends one inspection form until it is acknowledged (the same clientRef each time). */
async function inspect(w: World, excavationId: number, outcome: 'safe' | 'not-safe'): Promise<void> {
  const form = inspectionForm(outcome);
  for (let tries = 0; ; tries++) {
    const r = await w.supervisor.call('POST', `/api/excavations/${excavationId}/inspections`, form);
    if (r.status === 201 || r.status === 200) {
      stats.inspections++;
      if (tries) stats.inspectionRetries++;
      return;
    }
    if (r.status !== 0 && r.status < 500) throw new Error(`inspection: ${r.status} ${JSON.stringify(r.body)}`);
    if (overTime()) throw new Error('time limit reached sending an inspection');
    await pause(200);
  }
}

/** One client: its own trench and permits; suspends and resumes, inspects now and then. */
async function drive(w: World, i: number, share: { transitions: number; inspections: number }, done: () => boolean): Promise<void> {
  const excavationId = await makeTrench(w, i);
  const centre: [number, number] = [-2000 + i * 80, 1500];
  const permits: PermitState[] = [];
  for (let k = 0; k < permitsPerClient; k++) permits.push(await livePermit(w, excavationId, centre));
  ready.count++;
  await ready.all;
  let unsafe = false;
  let mine = 0;
  let inspected = 0;
  const every = Math.max(2, Math.floor(share.transitions / Math.max(1, share.inspections)));
  for (let n = 0; !(mine >= share.transitions && inspected >= share.inspections && done()); n++) {
    if (overTime()) throw new Error('time limit reached while driving');
    if (
      (n % every === every - 1 && inspected < share.inspections) ||
      (mine >= share.transitions && inspected < share.inspections) ||
      unsafe
    ) {
      // not safe (suspends the live permits with it), then safe again before anything resumes
      unsafe = !unsafe;
      await inspect(w, excavationId, unsafe ? 'not-safe' : 'safe');
      inspected++;
      if (unsafe) for (const p of permits) await refresh(w, p);
      continue;
    }
    const p = permits[n % permits.length];
    let r: Answer;
    if (p.status === 'live') r = await transition(w, w.coordinator, p, 'suspend', { reason: `Chaos check ${n}` });
    else if (p.status === 'suspended') r = await transition(w, w.coordinator, p, 'resume', { reason: `Chaos check ${n} done` });
    else throw new Error(`permit ${p.number} is ${p.status}`);
    if (r.status === 200) mine++;
  }
}

const ready = { count: 0, all: Promise.resolve() as Promise<void>, release: () => {} };

async function chaos(env: Env, from: number, target: number): Promise<void> {
  // Kill k at a random transition count within the k-th slice of the run; PostgreSQL stopped once,
  // somewhere in the middle.
  const span = (target - from) * 0.9;
  const marks = Array.from({ length: opts.kills }, (_, k) => from + Math.floor(((k + Math.random()) / opts.kills) * span));
  const pgAt = from + Math.floor((target - from) * (0.3 + Math.random() * 0.4));
  let pgDone = false;
  for (const mark of marks) {
    while (stats.acked.length < mark) {
      if (!pgDone && stats.acked.length >= pgAt) {
        pgDone = true;
        await stopStartPostgres(env);
      }
      if (overTime()) throw new Error('time limit reached while waiting to kill');
      await pause(20 + Math.random() * 60);
    }
    await kill(env);
  }
  if (!pgDone) await stopStartPostgres(env);
}

async function kill(env: Env): Promise<void> {
  const pid = await currentServerPid(env);
  if (!pid || !isAlive(pid)) throw new Error('no server to kill');
  process.kill(pid, 'SIGKILL');
  stats.kills++;
  log(`SIGKILL server ${pid} (kill ${stats.kills}; ${stats.acked.length} transitions acknowledged)`);
  while ((await currentServerPid(env)) === pid) {
    if (overTime()) throw new Error('time limit reached waiting for the restart');
    await pause(100);
  }
  await waitHealthy(env, 'the restarted server');
  log(`server ${await currentServerPid(env)} is back`);
}

async function stopStartPostgres(env: Env): Promise<void> {
  log(`stopping PostgreSQL (${stats.acked.length} transitions acknowledged)`);
  await cluster('stop', env.pgDir);
  stats.pgStops++;
  const down = await fetch(`${env.base}/api/health`).then(
    (r) => r.status,
    () => 0,
  );
  await pause(3000);
  await cluster('start', env.pgDir, String(env.pgPort));
  log(`PostgreSQL started again (health answered ${down} while it was down)`);
  await waitHealthy(env, 'the database to come back');
}

// ------------------------------------------------------------------------------------------------
// The invariants.

interface Figures {
  rows: [string, string | number, boolean | null][];
  ok: boolean;
}

async function verify(db: Db, w: World, catcher: Catcher, permitIds: number[], since: Date): Promise<Figures> {
  const rows: Figures['rows'] = [];
  const events = await db
    .selectFrom('permit_events')
    .select(['id', 'permit_id', 'action', 'from_status', 'to_status', 'actor_id'])
    .where('permit_id', 'in', permitIds)
    .orderBy('id')
    .execute();
  // The status machine's steps (the first event, 'create', makes the draft).
  const transitions = events.filter((e) => e.to_status !== null && e.action !== 'create');
  const byUsers = transitions.filter((e) => e.actor_id !== null);
  const created = new Set(
    events.filter((e) => e.action === 'create' && e.from_status === null && e.to_status === 'draft').map((e) => e.permit_id),
  );

  // Every acknowledged transition is in its permit's timeline, in the order it was acknowledged.
  let found = 0;
  for (const id of permitIds) {
    const acked = stats.acked.filter((a) => a.permitId === id).map((a) => a.action);
    const timeline = byUsers.filter((e) => e.permit_id === id).map((e) => e.action);
    let j = 0;
    for (const a of acked) {
      while (j < timeline.length && timeline[j] !== a) j++;
      if (j < timeline.length) {
        found++;
        j++;
      }
    }
  }
  rows.push(['transitions acknowledged', stats.acked.length, null]);
  rows.push(['transitions committed (by people)', byUsers.length, byUsers.length >= stats.acked.length]);
  rows.push(['acknowledged transitions found', found, found === stats.acked.length]);
  rows.push(['answers lost to kills/outage (outcome unknown to the client)', stats.unknown, null]);

  // Impossible states: a status outside the machine, a timeline that does not chain, a step the
  // machine does not allow, or a permit whose status is not where its timeline ends.
  const permits = await db.selectFrom('permits').select(['id', 'status']).where('id', 'in', permitIds).execute();
  let impossible = 0;
  for (const p of permits) {
    const line = transitions.filter((e) => e.permit_id === p.id);
    let bad = !(permitStatuses as readonly string[]).includes(p.status) || !created.has(p.id);
    let at: string | null = 'draft';
    for (const e of line) {
      const rule = transitionRules[e.action as PermitAction];
      if (!rule || e.from_status !== at || !rule.from.includes(e.from_status as never) || rule.to !== e.to_status) bad = true;
      at = e.to_status;
    }
    if (at !== p.status) bad = true;
    if (bad) impossible++;
  }
  rows.push(['permits in impossible states', impossible, impossible === 0]);

  // Audit log against the timelines, permit by permit.
  const audits = await db
    .selectFrom('audit_log')
    .select(['entity_id', 'action'])
    .where('entity', '=', 'permit')
    .where('entity_id', 'in', permitIds.map(String))
    .where('action', 'in', Object.keys(transitionRules))
    .orderBy('id')
    .execute();
  let mismatched = 0;
  for (const id of permitIds) {
    const a = audits
      .filter((x) => x.entity_id === String(id))
      .map((x) => x.action)
      .join(',');
    const t = transitions
      .filter((e) => e.permit_id === id)
      .map((e) => e.action)
      .join(',');
    if (a !== t) mismatched++;
  }
  rows.push(['audit vs timeline mismatches', mismatched, mismatched === 0]);

  // Not-safe excavations with live permits, after the reconciliation the last restart ran.
  const { rows: stale } = await sql<{ n: number }>`
    with latest as (
      select distinct on (excavation_id) excavation_id, outcome from inspections order by excavation_id, inspected_at desc, id desc)
    select count(*)::int as n from latest l
    where l.outcome = 'not-safe' and exists (
      select 1 from permits p join permit_revisions r on r.permit_id = p.id and r.revision = p.revision
      where p.status = 'live' and l.excavation_id = any(r.excavation_ids))`.execute(db);
  const inspections = await db.selectFrom('inspections').select(['outcome']).where('recorded_at', '>=', since).execute();
  rows.push([
    'inspections recorded (not safe)',
    `${inspections.length} (${inspections.filter((i) => i.outcome === 'not-safe').length})`,
    inspections.length >= stats.inspections,
  ]);
  rows.push(['not-safe excavations with live permits after reconciliation', stale[0].n, stale[0].n === 0]);

  // Notices. Expected: every message queued (the outbox: queued if and only if its change
  // committed). Delivered: received at the catcher, counted by Message-ID (the idempotency key), so
  // each notice counts once however often it crossed SMTP.
  const { rows: jobs } = await sql<{ key: string; to: string[]; subject: string }>`
    select data->>'key' as key, data->'to' as to, data->>'subject' as subject from pgboss.job where name = 'brink.mail' and created_on >= ${since}
    union all
    select data->>'key', data->'to', data->>'subject' from pgboss.archive where name = 'brink.mail' and created_on >= ${since}`.execute(db);
  const expected = new Set(jobs.map((j) => `${j.key}@brink.mail`));
  const delivered = [...expected].filter((id) => (catcher.received.get(id) ?? 0) > 0).length;
  const resent = [...expected].reduce((n, id) => n + Math.max(0, (catcher.received.get(id) ?? 0) - 1), 0);
  const unexpected = [...catcher.received.keys()].filter((id) => !expected.has(id)).length + catcher.withoutId;

  // Each change notified exactly once: every committed suspension and resumption queued one
  // notice to the permit's requester, every not-safe inspection one "Not safe" notice to the
  // site's supervisor. Duplicated: more notices than changes; missing: fewer.
  const supervisorEmail = demoPeople.find((p) => p.role === 'supervisor')!.email;
  const toSupervisor = (subject: string) => jobs.filter((j) => [j.to].flat().includes(supervisorEmail) && j.subject === subject).length;
  let duplicated = 0;
  let missing = 0;
  const tally = (committed: number, queued: number) => {
    duplicated += Math.max(0, queued - committed);
    missing += Math.max(0, committed - queued);
  };
  const numbers = new Map(
    (await db.selectFrom('permits').select(['id', 'number']).where('id', 'in', permitIds).execute()).map((p) => [p.id, p.number]),
  );
  for (const id of permitIds) {
    for (const [action, headline] of [
      ['suspend', 'is suspended'],
      ['resume', 'is live again'],
    ] as const) {
      tally(
        transitions.filter((e) => e.permit_id === id && e.action === action).length,
        toSupervisor(`Permit ${numbers.get(id)} at ${w.siteName} ${headline}`),
      );
    }
  }
  const { rows: unsafeByExcavation } = await sql<{ reference: string; name: string; n: number }>`
    select e.reference, e.name, count(*)::int as n from inspections i join excavations e on e.id = i.excavation_id
    where i.outcome = 'not-safe' and i.recorded_at >= ${since} group by e.reference, e.name`.execute(db);
  for (const e of unsafeByExcavation) tally(e.n, toSupervisor(`Not safe: ${e.reference} ${e.name} failed its inspection`));

  rows.push(['notices expected (queued with their change)', expected.size, expected.size === jobs.length]);
  rows.push(['notices delivered (by Message-ID)', delivered, delivered === expected.size]);
  rows.push(['notices duplicated (a change notified twice)', duplicated, duplicated === 0]);
  rows.push(['changes without their notice', missing, missing === 0]);
  rows.push(['messages nobody queued', unexpected, unexpected === 0]);
  rows.push(['same Message-ID received again (kill between SMTP acceptance and record)', resent, null]);
  return { rows, ok: rows.every((r) => r[2] !== false) };
}

// ------------------------------------------------------------------------------------------------

/** Waits until no e-mail is waiting, being sent or to be retried (a job left active by a kill expires after 30 s). */
async function drained(db: Db): Promise<void> {
  log('waiting for the mail queue to drain');
  for (;;) {
    const { rows } = await sql<{
      n: number;
    }>`select count(*)::int as n from pgboss.job where name = 'brink.mail' and state in ('created', 'retry', 'active')`.execute(db);
    if (rows[0].n === 0) return;
    if (overTime()) throw new Error(`time limit reached with ${rows[0].n} e-mails still queued`);
    await pause(500);
  }
}

async function main(): Promise<number> {
  const work = await mkdtemp('/tmp/brink-chaos-');
  const env: Env = {
    work,
    pgDir: path.join(work, 'pg'),
    pgPort: await freePort(),
    url: '',
    base: '',
    pidFile: path.join(work, 'server.pid'),
    supervisor: null,
  };
  const catcher = new Catcher();
  let db: Db | null = null;
  try {
    log(
      `${opts.kills} kills, ${opts.transitions} transitions, ${opts.inspections} inspections, ${opts.clients} clients; time limit ${opts.timeLimitS} s; in ${work}`,
    );
    env.url = (await cluster('up', env.pgDir, String(env.pgPort))).stdout.trim().split('\n').pop()!;
    db = createDb(createPool(env.url, 3, { name: 'chaos' }));
    await migrateToLatest(db);
    await seedDemoIfEmpty(db);
    const catcherPort = await freePort();
    await catcher.start(catcherPort);
    const port = await freePort();
    env.base = `http://127.0.0.1:${port}`;
    const out = createWriteStream(path.join(work, 'server.log'));
    env.supervisor = spawn('bash', ['-c', 'source docker-less-scripts/lib.sh && supervise node --import tsx server/src/index.ts'], {
      cwd: root,
      stdio: ['ignore', 'pipe', 'pipe'],
      env: {
        ...process.env,
        DATABASE_URL: env.url,
        PORT: String(port),
        PUBLIC_URL: env.base,
        MAIL_CATCHER: 'off',
        SMTP_URL: `smtp://127.0.0.1:${catcherPort}`,
        BRINK_DEMO: '1',
        NODE_ENV: 'test',
        SESSION_SECRET: `chaos-${randomUUID()}`,
        UPLOAD_DIR: path.join(work, 'uploads'),
        BRINK_PID_FILE: env.pidFile,
        BRINK_RESTART_MAX_DELAY: '1',
      },
    });
    env.supervisor.stdout!.pipe(out);
    env.supervisor.stderr!.pipe(out);
    await waitHealthy(env, 'the server to start');
    const since = new Date();
    log('server up; setting up the clients');

    const site = await db.selectFrom('sites').select(['id', 'name', 'longitude', 'latitude']).orderBy('id').executeTakeFirstOrThrow();
    const excavator = await db.selectFrom('plant_items').select('id').where('name', '=', 'Excavator 21 t').executeTakeFirstOrThrow();
    const email = (role: string) => demoPeople.find((p) => p.role === role)!.email;
    const worlds: World[] = [];
    for (let i = 0; i < opts.clients; i++) {
      const w: World = {
        siteId: site.id,
        siteName: site.name,
        origin: [site.longitude, site.latitude],
        excavatorId: excavator.id,
        coordinator: new Client(env.base, email('coordinator')),
        supervisor: new Client(env.base, email('supervisor')),
      };
      await w.coordinator.signIn();
      await w.supervisor.signIn();
      worlds.push(w);
    }
    ready.all = new Promise<void>((r) => (ready.release = r));
    const share = { transitions: Math.ceil(opts.transitions / opts.clients), inspections: Math.ceil(opts.inspections / opts.clients) };
    let chaosDone = false;
    const drivers = worlds.map((w, i) => drive(w, i, share, () => chaosDone));
    while (ready.count < opts.clients) {
      if (overTime()) throw new Error('time limit reached setting up');
      await Promise.race([pause(100), ...drivers]);
    }
    const setupTransitions = stats.acked.length;
    log(`${opts.clients * permitsPerClient} live permits (${setupTransitions} transitions); the chaos starts`);
    ready.release();
    const target = setupTransitions + share.transitions * opts.clients;
    await chaos(env, setupTransitions, target).finally(() => (chaosDone = true));
    await Promise.all(drivers);
    log(`driving done: ${stats.acked.length} transitions acknowledged, ${stats.inspections} inspections`);

    await drained(db);
    // One last kill once the queue is empty: the restarted server runs the reconciliation as it
    // starts (and queues whatever notices that brings).
    await kill(env);
    await drained(db);
    const restarts = ((await readFile(path.join(work, 'server.log'), 'utf8')).match(/restarting in/g) ?? []).length;
    const figures = await verify(db, worlds[0], catcher, [...new Set(stats.acked.map((a) => a.permitId))], since);
    figures.rows.unshift(
      ['server kills (SIGKILL) / restarts logged by the supervisor', `${stats.kills} / ${restarts}`, restarts === stats.kills],
      ['PostgreSQL stops', stats.pgStops, stats.pgStops === 1],
      ['inspections acknowledged (resent after a kill)', `${stats.inspections} (${stats.inspectionRetries})`, null],
    );
    figures.ok &&= restarts === stats.kills && stats.pgStops === 1;
    console.log('');
    for (const [label, value, ok] of figures.rows)
      console.log(`  ${label.padEnd(74)} ${String(value).padStart(10)}  ${ok === null ? '' : ok ? 'ok' : 'FAILED'}`);
    console.log(
      `\n[chaos] ${figures.ok ? 'every invariant holds' : 'INVARIANTS FAILED'} (${((Date.now() - started) / 1000).toFixed(0)} s)`,
    );
    return figures.ok ? 0 : 1;
  } catch (err) {
    console.error(`[chaos] ${(err as Error).message}`);
    try {
      console.error(
        '--- server log (last lines) ---\n' + (await readFile(path.join(work, 'server.log'), 'utf8')).split('\n').slice(-40).join('\n'),
      );
    } catch {
      /* no log */
    }
    return 1;
  } finally {
    if (env.supervisor && env.supervisor.exitCode === null) {
      const gone = new Promise((r) => env.supervisor!.once('exit', r));
      env.supervisor.kill('SIGTERM');
      await Promise.race([gone, pause(15_000)]);
    }
    await catcher.stop();
    if (db) await db.destroy().catch(() => undefined);
    if (!args.keep) {
      await cluster('destroy', env.pgDir).catch(() => undefined);
      await rm(work, { recursive: true, force: true });
    }
  }
}

process.exitCode = await main();
