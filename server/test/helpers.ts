import { randomUUID } from 'node:crypto';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import type { Express } from 'express';
import { loadConfig } from '../src/config';
import { createApp } from '../src/app';
import { startRuntime, type Runtime } from '../src/runtime';
import { MailCatcher } from '../src/mail/catcher';
import { DEMO_PASSWORD } from '@db/demo/people';
import bcrypt from 'bcryptjs';
import type { Deps } from '../src/deps';
import { freePort } from '../src/services/ports';
import { readdirSync } from 'node:fs';
import { ListObjectsV2Command } from '@aws-sdk/client-s3';
import { DiskStore, type FileStore } from '../src/files/store';
import { sql } from 'kysely';
import type { SiteRole } from '@shared/schemas/common';
import type { UnitSystem } from '@shared/units';
import { createDb, createPool, type Db } from '@db/database';
import { migrateToLatest } from '@db/migrate';

export { DEMO_PASSWORD, freePort };

export const demo = {
  admin: 'admin@demo.brink.test',
  coordinator: 'coordinator@demo.brink.test',
  supervisor: 'supervisor@demo.brink.test',
  operator: 'operator@demo.brink.test',
} as const;

/** The test app's own origin (its PUBLIC_URL): supertest requests say they come from it (setup-origin.ts). */
export const TEST_ORIGIN = 'http://brink.test';

export interface TestApp {
  app: Express;
  deps: Deps;
  catcher: MailCatcher;
  catcherPort: number;
  /** A mutable clock: set `clock.now` to move time. */
  clock: { now: Date | null };
  stop(): Promise<void>;
}

/**
 * A whole Brink (API, job queue on its own queue names, a mail catcher on its own port) against
 * the test database. Each test file makes its own.
 */
export async function startTestApp(env: Record<string, string> = {}): Promise<TestApp> {
  const catcherPort = await freePort();
  // The VAPID keys of a test app live in a throw-away folder, never in .data/.
  const pushKeys = join(mkdtempSync(join(tmpdir(), 'brink-push-')), 'vapid-keys.json');
  const config = loadConfig({
    ...process.env,
    NODE_ENV: 'test',
    SESSION_SECRET: 'test-secret-123456',
    MAIL_CATCHER: 'on',
    MAIL_CATCHER_PORT: String(catcherPort),
    PUBLIC_URL: TEST_ORIGIN,
    BRINK_DEMO: '1',
    PUSH_KEYS_FILE: pushKeys,
    ...env,
  });
  const clock: TestApp['clock'] = { now: null };
  const runtime: Runtime = await startRuntime(config, {
    now: () => clock.now ?? new Date(),
    queuePrefix: `t${randomUUID().slice(0, 8)}`,
  });
  const catcher = new MailCatcher(runtime.deps.db);
  if (config.mailCatcher.enabled) await catcher.start(catcherPort);
  const app = createApp(runtime.deps, { log: false });
  return {
    app,
    deps: runtime.deps,
    catcher,
    catcherPort,
    clock,
    async stop() {
      await catcher.stop();
      await runtime.stop();
    },
  };
}

/** A supertest agent (keeps cookies) signed in as the given address. */
export async function signedIn(app: Express, email: string, password = DEMO_PASSWORD) {
  const agent = request.agent(app);
  const r = await agent.post('/api/auth/sign-in').send({ email, password });
  if (r.status !== 200) throw new Error(`sign-in as ${email} failed: ${r.status} ${JSON.stringify(r.body)}`);
  return agent;
}

export function unique(prefix: string): string {
  return `${prefix}-${randomUUID().slice(0, 8)}@example.test`;
}

/** Waits until the catcher holds a message to `to` whose subject matches; returns it. */
export async function waitForMail(
  deps: Deps,
  to: string,
  subject: RegExp = /./,
  timeoutMs = 20_000,
): Promise<{ subject: string; text: string; html: string | null; mail_to: string }> {
  const t0 = Date.now();
  for (;;) {
    const rows = await deps.db.selectFrom('caught_mail').selectAll().where('mail_to', 'ilike', `%${to}%`).orderBy('id', 'desc').execute();
    const hit = rows.find((r) => subject.test(r.subject));
    if (hit) return hit;
    if (Date.now() - t0 > timeoutMs) throw new Error(`no mail to ${to} matching ${subject} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

export function linkToken(text: string, path: string): string {
  const m = text.match(new RegExp(`${path.replace(/[/?]/g, (c) => `\\${c}`)}\\?token=([A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`no ${path} link in: ${text}`);
  return m[1];
}

/** The demo organisation (the demo administrator's): the demo site, its people and plant library belong to it. */
export async function demoOrganisationId(deps: Deps): Promise<number> {
  const o = await deps.db.selectFrom('users').select('organisation_id').where('email', '=', demo.admin).executeTakeFirstOrThrow();
  return o.organisation_id;
}

/**
 * A person for a test: of the demo organisation unless `organisationId` is given, signing in with
 * `password` (the demo password unless given; null: no password), and a member of `member.siteId`
 * in `member.role` when asked. Returns their id and e-mail.
 */
export async function addPerson(
  deps: Deps,
  p: {
    name: string;
    email: string;
    password?: string | null;
    organisationId?: number;
    isAdmin?: boolean;
    active?: boolean;
    units?: UnitSystem;
    member?: { siteId: number; role: SiteRole; canInspect?: boolean };
  },
): Promise<{ id: number; email: string }> {
  const password = p.password === undefined ? DEMO_PASSWORD : p.password;
  const { id } = await deps.db
    .insertInto('users')
    .values({
      organisation_id: p.organisationId ?? (await demoOrganisationId(deps)),
      email: p.email,
      name: p.name,
      password_hash: password === null ? null : await bcrypt.hash(password, 4),
      is_admin: p.isAdmin ?? false,
      active: p.active ?? true,
      units: p.units ?? null,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  if (p.member) {
    await deps.db
      .insertInto('site_members')
      .values({
        site_id: p.member.siteId,
        user_id: id,
        role: p.member.role,
        ...(p.member.canInspect === undefined ? {} : { can_inspect: p.member.canInspect }),
      })
      .execute();
  }
  return { id, email: p.email };
}

/** A second, invented organisation: its own site, administrator, coordinator (of that site) and one machine. */
export interface OtherOrganisation {
  id: number;
  siteId: number;
  adminEmail: string;
  coordinatorEmail: string;
  coordinatorId: number;
  plantItemId: number;
}

export async function makeOrganisation(deps: Deps, label = 'Other'): Promise<OtherOrganisation> {
  const db = deps.db;
  const org = await db
    .insertInto('organisations')
    .values({ name: `${label} Earthworks ${randomUUID().slice(0, 8)} (test)` })
    .returning('id')
    .executeTakeFirstOrThrow();
  const site = await db
    .insertInto('sites')
    .values({ organisation_id: org.id, name: `${label} quarry road (test)`, latitude: 53.2, longitude: -2.1 })
    .returning('id')
    .executeTakeFirstOrThrow();
  const adminEmail = unique(`${label.toLowerCase()}-org-admin`);
  const coordinatorEmail = unique(`${label.toLowerCase()}-org-coordinator`);
  await addPerson(deps, { organisationId: org.id, email: adminEmail, name: `${label} Admin`, isAdmin: true });
  const c = await addPerson(deps, {
    organisationId: org.id,
    email: coordinatorEmail,
    name: `${label} Coordinator`,
    member: { siteId: site.id, role: 'coordinator', canInspect: true },
  });
  const machine = await db
    .insertInto('plant_items')
    .values({
      organisation_id: org.id,
      name: `${label} dumper 3 t`,
      category: 'dumper',
      operating_mass: 3,
      elements: JSON.stringify([{ name: 'Body', kind: 'pad', x: 0, y: 0, length: 2.5, width: 1.5, share: 1 }]),
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return { id: org.id, siteId: site.id, adminEmail, coordinatorEmail, coordinatorId: c.id, plantItemId: machine.id };
}

export async function demoSiteId(deps: Deps): Promise<number> {
  const s = await deps.db.selectFrom('sites').select('id').where('name', '=', 'Alder Marsh pumping station').executeTakeFirstOrThrow();
  return s.id;
}

/**
 * How many files a store holds: its folder's files or its bucket's objects. Give the test app a
 * folder and a bucket of its own (`ownFileStore()`) so that the count is the file's alone.
 */
export async function filesIn(store: FileStore): Promise<number> {
  if (store instanceof DiskStore) return readdirSync(store.dir, { recursive: true, withFileTypes: true }).filter((d) => d.isFile()).length;
  const s3 = store as FileStore & { client: import('@aws-sdk/client-s3').S3Client; bucket: string };
  let n = 0;
  let token: string | undefined;
  do {
    const page = await s3.client.send(new ListObjectsV2Command({ Bucket: s3.bucket, ContinuationToken: token }));
    n += page.KeyCount ?? 0;
    token = page.NextContinuationToken;
  } while (token);
  return n;
}

/** Settings for a test app with an upload folder and an S3 bucket of its own (whichever STORAGE names). */
export function ownFileStore(): Record<string, string> {
  return { UPLOAD_DIR: mkdtempSync(join(tmpdir(), 'brink-uploads-')), S3_BUCKET: `brink-test-${randomUUID().slice(0, 12)}` };
}

/**
 * A database of the test file's own on the test cluster, migrated (for tests that seed or start
 * servers of their own); `drop()` closes it and removes it.
 */
export async function ownDatabase(prefix: string): Promise<{ url: string; db: Db; drop: () => Promise<void> }> {
  const name = `${prefix}_${randomUUID().slice(0, 8)}`;
  const admin = createDb(createPool(process.env.DATABASE_URL!, 1));
  await sql.raw(`create database "${name}"`).execute(admin);
  const url = new URL(process.env.DATABASE_URL!);
  url.pathname = `/${name}`;
  const db = createDb(createPool(url.toString(), 2));
  await migrateToLatest(db);
  return {
    url: url.toString(),
    db,
    drop: async () => {
      await db.destroy();
      await sql.raw(`drop database if exists "${name}" with (force)`).execute(admin);
      await admin.destroy();
    },
  };
}
