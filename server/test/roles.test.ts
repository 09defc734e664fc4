import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  addPerson,
  demo,
  DEMO_PASSWORD,
  demoSiteId,
  signedIn,
  startTestApp,
  unique,
  type TestApp,
  demoOrganisationId,
  makeOrganisation,
  type OtherOrganisation,
} from './helpers';
import { createPermit, makeWorld } from './permits-fixtures';
import { storeUpload } from '../src/services/uploads';

/**
 * The role matrix: every API route, called by each demo role, by a member of another site only
 * ("outsider") and signed out ("anon"). `allow` lists who gets past the guard; everyone else must
 * be refused (401 signed out, 403 or 404 otherwise). A route added without a row here fails the
 * test at the bottom.
 *
 * The cross-organisation column: the administrator and a coordinator of a second, invented
 * organisation ("B admin", "B coordinator") call every route with real ids of the demo
 * organisation's records (its site, permit, excavation, photo, a person and a machine). Each such
 * call answers 404, as for a record that does not exist; a route that names no record of the demo
 * organisation lets them through as their role allows (what they then see is their own:
 * server/test/organisations.test.ts).
 */
type Who = 'admin' | 'coordinator' | 'supervisor' | 'operator' | 'outsider' | 'anon';
type OtherWho = 'B admin' | 'B coordinator';
/** What each caller of organisation B would be in the demo organisation's matrix. */
const asIfAt: Record<OtherWho, Who> = { 'B admin': 'admin', 'B coordinator': 'outsider' };
const everyone: Who[] = ['admin', 'coordinator', 'supervisor', 'operator', 'outsider', 'anon'];
const signedInPeople: Who[] = ['admin', 'coordinator', 'supervisor', 'operator', 'outsider'];
const siteMembers: Who[] = ['coordinator', 'supervisor', 'operator'];

interface Row {
  allow: Who[];
  /** The body sent, or a function of the demo site's id for bodies that name it. */
  body?: unknown;
  /** The query sent (a read that needs one answers 200 with it). */
  query?: Record<string, string>;
}

export const matrix: Record<string, Row> = {
  'GET /api/health': { allow: everyone },
  'GET /api/config': { allow: everyone },
  'GET /api/dev/mail': { allow: everyone },
  'GET /api/openapi.json': { allow: everyone },
  'POST /api/auth/sign-in': { allow: everyone, body: {} },
  'POST /api/auth/sign-out': { allow: everyone },
  'GET /api/auth/me': { allow: signedInPeople },
  'PATCH /api/auth/me': { allow: signedInPeople, body: {} },
  'POST /api/auth/forgot-password': { allow: everyone, body: {} },
  'POST /api/auth/reset-password': { allow: everyone, body: {} },
  'GET /api/invitations/:token': { allow: everyone },
  'POST /api/invitations/accept': { allow: everyone, body: {} },
  'POST /api/invitations': { allow: ['admin'], body: {} },
  'GET /api/users': { allow: ['admin'] },
  'PATCH /api/organisation': { allow: ['admin'], body: {} },
  'PATCH /api/users/:id': { allow: ['admin'], body: { name: 1 } },
  'PUT /api/users/:id/memberships/:siteId': { allow: ['admin'], body: {} },
  'DELETE /api/users/:id/memberships/:siteId': { allow: ['admin'] },
  'GET /api/sites': { allow: signedInPeople },
  'GET /api/sites/:siteId': { allow: ['admin', ...siteMembers] },
  'POST /api/sites': { allow: ['admin'], body: {} },
  'PATCH /api/sites/:siteId': { allow: ['admin'], body: { name: '' } },
  'PUT /api/sites/:siteId/units': { allow: ['admin', 'coordinator'], body: {} },
  'GET /api/uploads/:id': { allow: ['admin', ...siteMembers] },
  'GET /api/sites/:siteId/operators': { allow: ['admin', 'supervisor', 'coordinator'] },
  'POST /api/permits': { allow: ['supervisor'], body: (site: number) => ({ siteId: site }) },
  'GET /api/permits': { allow: signedInPeople },
  'GET /api/permits/:id': { allow: ['admin', ...siteMembers] },
  'GET /api/permits/:id/revisions/:revision': { allow: ['admin', ...siteMembers] },
  'PATCH /api/permits/:id': { allow: ['supervisor'], body: {} },
  'POST /api/permits/:id/check': { allow: ['admin', 'supervisor', 'coordinator'], body: {} },
  'POST /api/sites/:siteId/permits/check': { allow: ['admin', 'supervisor', 'coordinator'], body: {} },
  // The role an action needs is decided before the body is read: an operator takes no action on a
  // permit and an administrator without a role on the site neither, so both are refused whatever
  // they send (server/test/security.test.ts checks each action and role).
  'POST /api/permits/:id/transitions': { allow: ['supervisor', 'coordinator'], body: {} },
  'POST /api/permits/:id/briefing': { allow: ['operator'] },
  'POST /api/permits/:id/comments': { allow: siteMembers, body: {} },
  'GET /api/permits/:id/pdf': { allow: ['admin', ...siteMembers] },
  'POST /api/permits/:id/attachments': { allow: ['supervisor', 'coordinator'] },
  'GET /api/permits/:id/attachments/:attachmentId': { allow: ['admin', ...siteMembers] },
  'DELETE /api/permits/:id/attachments/:attachmentId': { allow: ['supervisor', 'coordinator'] },
  // The field view: my permits for everyone signed in (empty for most); one permit and concerns for
  // members of the permit's site. server/test/field.test.ts checks them on a real permit.
  'GET /api/field/permits': { allow: signedInPeople },
  'GET /api/field/permits/:id': { allow: ['admin', ...siteMembers] },
  // Web Push: anyone signed in may have their own devices told (server/test/push.test.ts).
  'GET /api/push/key': { allow: signedInPeople },
  'GET /api/push/subscription': { allow: signedInPeople, query: { endpoint: 'https://fcm.googleapis.com/fcm/send/roles-test' } },
  'POST /api/push/subscription': { allow: signedInPeople, body: {} },
  'DELETE /api/push/subscription': { allow: signedInPeople, query: { endpoint: 'https://fcm.googleapis.com/fcm/send/roles-test' } },
  'POST /api/permits/:id/concerns': { allow: siteMembers },
  // An organisation's plant library is shared by its sites: everyone signed in reads their own;
  // its administrators and coordinators (of any of its sites, so the outsider too) keep it.
  'GET /api/plant': { allow: signedInPeople },
  'POST /api/plant': { allow: ['admin', 'coordinator', 'outsider'], body: {} },
  'PATCH /api/plant/:id': { allow: ['admin', 'coordinator', 'outsider'], body: {} },
  'DELETE /api/plant/:id': { allow: ['admin', 'coordinator', 'outsider'] },
  // The excavation register and the site map: members read; supervisors and coordinators write.
  'GET /api/sites/:siteId/excavations': { allow: ['admin', ...siteMembers] },
  'POST /api/sites/:siteId/excavations': { allow: ['admin', 'coordinator', 'supervisor'], body: {} },
  'PATCH /api/sites/:siteId/excavations/:id': { allow: ['admin', 'coordinator', 'supervisor'], body: {} },
  'DELETE /api/sites/:siteId/excavations/:id': { allow: ['admin', 'coordinator', 'supervisor'] },
  'GET /api/sites/:siteId/excavations/:id/history': { allow: ['admin', ...siteMembers] },
  'GET /api/sites/:siteId/excavations.geojson': { allow: ['admin', ...siteMembers] },
  'POST /api/sites/:siteId/excavations/import': { allow: ['admin', 'coordinator', 'supervisor'] },
  'POST /api/sites/:siteId/excavations/:id/drawing': { allow: ['admin', 'coordinator', 'supervisor'] },
  'DELETE /api/sites/:siteId/excavations/:id/drawing': { allow: ['admin', 'coordinator', 'supervisor'] },
  'GET /api/sites/:siteId/plan': { allow: ['admin', ...siteMembers] },
  'PUT /api/sites/:siteId/plan': { allow: ['admin', 'coordinator', 'supervisor'] },
  'PATCH /api/sites/:siteId/plan': { allow: ['admin', 'coordinator', 'supervisor'], body: { opacity: 'dim' } },
  'DELETE /api/sites/:siteId/plan': { allow: ['admin', 'coordinator', 'supervisor'] },
  'POST /api/excavations/:id/inspections': { allow: ['coordinator', 'supervisor'], body: {} },
  'GET /api/excavations/:id/inspections': { allow: ['admin', ...siteMembers] },
  'GET /api/excavations/:id/inspections.csv': { allow: ['admin', ...siteMembers] },
  'GET /api/sites/:siteId/inspections/states': { allow: ['admin', ...siteMembers] },
  'GET /api/sites/:siteId/dashboard': { allow: ['admin', ...siteMembers] },
  'GET /api/sites/:siteId/inspections/overdue': { allow: ['admin', ...siteMembers] },
  'GET /api/sites/:siteId/inspections/report.pdf': { allow: ['admin', ...siteMembers] },
  'GET /api/sites/:siteId/shifts': { allow: ['admin', ...siteMembers] },
  'PUT /api/sites/:siteId/shifts': { allow: ['admin', 'coordinator'], body: {} },
};

let t: TestApp;
let siteId: number;
const agents = new Map<Who | OtherWho, request.Agent | request.SuperTest<request.Test>>();
const outsiderEmail = unique('outsider');
let orgB: OtherOrganisation;

beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_IP: '1000' });
  siteId = await demoSiteId(t.deps);
  const other = await t.deps.db
    .insertInto('sites')
    .values({ organisation_id: await demoOrganisationId(t.deps), name: 'Matrix other site', latitude: 51, longitude: 0 })
    .returning('id')
    .executeTakeFirstOrThrow();
  await addPerson(t.deps, { email: outsiderEmail, name: 'Olive Outsider', member: { siteId: other.id, role: 'coordinator' } });
  for (const who of ['admin', 'coordinator', 'supervisor', 'operator'] as const) agents.set(who, await signedIn(t.app, demo[who]));
  agents.set('outsider', await signedIn(t.app, outsiderEmail));
  agents.set('anon', request(t.app) as unknown as request.Agent);
  orgB = await makeOrganisation(t.deps, 'Matrix');
  agents.set('B admin', await signedIn(t.app, orgB.adminEmail));
  agents.set('B coordinator', await signedIn(t.app, orgB.coordinatorEmail));
  // A person and a machine of the demo organisation of this file's own, for the calls of organisation B.
  real.person = (
    await addPerson(t.deps, { email: unique('matrix-person'), name: 'Mina Matrix', password: null, member: { siteId, role: 'operator' } })
  ).id;
  real.plant = (
    await t.deps.db
      .insertInto('plant_items')
      .values({
        organisation_id: await demoOrganisationId(t.deps),
        name: `Matrix roller ${unique('m')}`,
        category: 'roller',
        operating_mass: 2,
        elements: JSON.stringify([{ name: 'Drum', kind: 'wheel', x: 0, y: 0, length: 0.2, width: 1, share: 1 }]),
      })
      .returning('id')
      .executeTakeFirstOrThrow()
  ).id;
  // Real records of the demo site for the routes that find their site through a record: a draft
  // permit on a test trench of its own, and a stored photo.
  const w = await makeWorld(t);
  real.permit = (await createPermit(w)).id;
  real.excavation = w.trenchId;
  const png = Buffer.from(
    '89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c4890000000d4944415478da63f8cfc0f01f0005000201a5d4cb3b0000000049454e44ae426082',
    'hex',
  );
  real.upload = (
    await storeUpload(t.deps, { buffer: png, originalname: 'matrix.png', size: png.length } as Express.Multer.File, {
      field: 'file',
      accept: 'image',
      purpose: 'photo',
      siteId,
      userId: null,
    })
  ).id;
});

const real = { permit: 0, excavation: 0, upload: 0, person: 0, plant: 0 };
afterAll(async () => t.stop());

/** The path with real ids where a route finds its site through a record, 999999 elsewhere. */
function concrete(path: string): string {
  let p = path.replace(':siteId', String(siteId)).replace(':token', 'x'.repeat(43));
  if (/^\/api\/(field\/)?permits\/:id/.test(p)) p = p.replace(':id', String(real.permit));
  if (/^\/api\/excavations\/:id|^\/api\/sites\/\d+\/excavations\/:id/.test(p)) p = p.replace(':id', String(real.excavation));
  if (p.startsWith('/api/uploads/:id')) p = p.replace(':id', String(real.upload));
  return p.replace(/:[A-Za-z]+/g, '999999');
}

/** Whether a route names a record (in its path, or a site in its body). */
const namesRecord = (path: string, row: Row) => /:(?!token)[A-Za-z]+/.test(path) || typeof row.body === 'function';

/**
 * The path with real ids of the demo organisation's records: its site, permit, excavation, photo, a
 * person and a machine. An id under one of them (a revision, an attachment) is never looked up.
 */
function ofDemoOrganisation(path: string): string {
  const p = concrete(
    path.replace(/^\/api\/users\/:id/, `/api/users/${real.person}`).replace(/^\/api\/plant\/:id/, `/api/plant/${real.plant}`),
  );
  return p.replace(/^(\/api\/(\w+)\/)999999/, (_, head: string) => {
    throw new Error(`no real record of the demo organisation for ${head}`);
  });
}

describe('role matrix: a second organisation', () => {
  for (const [route, row] of Object.entries(matrix)) {
    const [method, path] = route.split(' ');
    for (const who of ['B admin', 'B coordinator'] as const) {
      const names = namesRecord(path, row);
      const allowed = row.allow.includes(asIfAt[who]);
      // An administrator's route refuses anyone else by role (403) before any record is looked up.
      const byRole = names && !allowed && row.allow.length === 1 && row.allow[0] === 'admin';
      const expected = byRole ? 'refused' : names ? '404' : allowed ? 'allowed' : 'refused';
      it(`${route} as ${who} → ${expected}`, async () => {
        const agent =
          path === '/api/auth/sign-out'
            ? await signedIn(t.app, who === 'B admin' ? orgB.adminEmail : orgB.coordinatorEmail)
            : agents.get(who)!;
        const m = method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete';
        const url = names ? ofDemoOrganisation(path) : concrete(path);
        let req = agent[m](url);
        if (row.query) req = req.query(row.query);
        if (row.body !== undefined) req = req.send((typeof row.body === 'function' ? row.body(siteId) : row.body) as object);
        const r = await req;
        if (expected === '404') {
          // Not 403: an id of another organisation tells nothing, not even that it exists.
          expect(r.status).toBe(404);
          expect(r.body.error.code).toBe('not_found');
        } else if (expected === 'allowed') {
          expect([401, 403]).not.toContain(r.status);
          expect(r.status).toBeLessThan(500);
        } else {
          expect(r.status).toBe(403);
        }
      });
    }
  }

  it("left the demo organisation's person, membership and machine as they were", async () => {
    const person = await t.deps.db.selectFrom('users').select(['name', 'active']).where('id', '=', real.person).executeTakeFirstOrThrow();
    expect(person).toEqual({ name: 'Mina Matrix', active: true });
    const member = await t.deps.db.selectFrom('site_members').select('role').where('user_id', '=', real.person).execute();
    expect(member).toEqual([{ role: 'operator' }]);
    const machine = await t.deps.db.selectFrom('plant_items').select(['version']).where('id', '=', real.plant).executeTakeFirstOrThrow();
    expect(machine.version).toBe(1);
  });
});

describe('role matrix', () => {
  for (const [route, row] of Object.entries(matrix)) {
    const [method, path] = route.split(' ');
    for (const who of everyone) {
      const allowed = row.allow.includes(who);
      it(`${route} as ${who} → ${allowed ? 'allowed' : 'refused'}`, async () => {
        // Signing out would end the shared session: each signed-in role signs out a fresh one of its own.
        const signOut = path === '/api/auth/sign-out' && who !== 'anon';
        const agent = signOut ? await signedIn(t.app, who === 'outsider' ? outsiderEmail : demo[who]) : agents.get(who)!;
        const m = method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete';
        let req = agent[m](concrete(path));
        if (row.query) req = req.query(row.query);
        if (row.body !== undefined) req = req.send((typeof row.body === 'function' ? row.body(siteId) : row.body) as object);
        const r = await req;
        const url = concrete(path);
        if (allowed) {
          expect([401, 403]).not.toContain(r.status);
          expect(r.status).toBeLessThan(500);
          // A read of real records answers with them.
          if (m === 'get' && !url.includes('999999') && !path.includes(':token')) expect(r.status).toBe(200);
          if (signOut) {
            expect(r.status).toBe(204);
            expect((await agent.get('/api/auth/me')).status).toBe(401);
          }
        } else if (who === 'anon') {
          expect(r.status).toBe(401);
        } else {
          // Refused before anything is looked up or read: the record exists, the role or site is wrong.
          expect(r.status).toBe(403);
        }
      });
    }
  }

  it('covers every route the API declares', async () => {
    const doc = (await request(t.app).get('/api/openapi.json')).body;
    const declared = Object.entries(doc.paths as Record<string, Record<string, unknown>>).flatMap(([p, ops]) =>
      Object.keys(ops).map((m) => `${m.toUpperCase()} ${p.replace(/\{([A-Za-z_]+)\}/g, ':$1')}`),
    );
    expect(declared.filter((d) => !(d in matrix))).toEqual([]);
    expect(Object.keys(matrix).filter((k) => !declared.includes(k))).toEqual([]);
  });

  it('decides authorisation before reading the body: a forbidden call with a bad body answers 403', async () => {
    const r = await agents.get('operator')!.post('/api/sites').send({ name: 12, latitude: 'north' });
    expect(r.status).toBe(403);
  });
});

/**
 * The support's design data (issue 10 §3): coordinators and administrators set it; supervisors
 * record the ground as dug. Each row sends one design field with a value the schema refuses: an
 * allowed role gets past the role rule to validation (400 naming the field), a supervisor is refused
 * first (403 naming it), and the excavation is unchanged either way.
 */
const designRows: Record<string, unknown> = {
  supportType: 12,
  designSurcharge: 'ten',
  ratedPressure: 'high',
  soil: 'sand',
  groundwaterDepth: 'wet',
  wallFriction: 'rough',
  pressureState: 'squeezed',
  restraint: 'loose',
  designReference: 7,
};

describe('role matrix: design data of an excavation', () => {
  for (const [field, bad] of Object.entries(designRows)) {
    for (const who of ['admin', 'coordinator', 'supervisor'] as const) {
      const allowed = who !== 'supervisor';
      it(`PATCH ${field} as ${who} → ${allowed ? 'allowed' : '403 naming it'}`, async () => {
        const e = await t.deps.db.selectFrom('excavations').select(['version']).where('id', '=', real.excavation).executeTakeFirstOrThrow();
        const r = await agents
          .get(who)!
          .patch(`/api/sites/${siteId}/excavations/${real.excavation}`)
          .send({ version: e.version, [field]: bad });
        expect(r.status).toBe(allowed ? 400 : 403);
        expect(
          Object.keys(r.body.error.fields ?? {}).some((k) => k === field || k.startsWith(`${field}.`) || k.startsWith(`${field}[`)),
        ).toBe(true);
      });
    }
    it(`POST with ${field} as supervisor → 403 naming it`, async () => {
      const r = await agents
        .get('supervisor')!
        .post(`/api/sites/${siteId}/excavations`)
        .send({ reference: 'X', [field]: bad });
      expect(r.status).toBe(403);
      expect(r.body.error.fields).toEqual({ [field]: 'is set by a coordinator or an administrator' });
    });
  }
});

describe('administration of people', () => {
  it('deactivating a person ends their sessions at once', async () => {
    const email = unique('leaver');
    const u = await addPerson(t.deps, { email, name: 'Lee Leaver' });
    const leaver = await signedIn(t.app, email);
    await agents.get('admin')!.patch(`/api/users/${u.id}`).send({ active: false }).expect(200);
    expect((await leaver.get('/api/auth/me')).status).toBe(401);
    expect((await request(t.app).post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD })).status).toBe(401);
  });

  it('sets and removes a role on a site', async () => {
    const email = unique('roled');
    const u = await addPerson(t.deps, { email, name: 'Rae Roled' });
    const admin = agents.get('admin')!;
    const put = await admin.put(`/api/users/${u.id}/memberships/${siteId}`).send({ role: 'supervisor', canInspect: true });
    expect(put.status).toBe(200);
    expect(put.body.user.memberships).toEqual([expect.objectContaining({ siteId, role: 'supervisor', canInspect: true })]);
    const person = await signedIn(t.app, email);
    expect((await person.get(`/api/sites/${siteId}`)).status).toBe(200);
    await admin.delete(`/api/users/${u.id}/memberships/${siteId}`).expect(204);
    expect((await person.get(`/api/sites/${siteId}`)).status).toBe(403);
  });

  it('creates a site and names bad fields', async () => {
    const admin = agents.get('admin')!;
    const bad = await admin.post('/api/sites').send({ name: '', latitude: 123, longitude: 0, timezone: 'Mars/Olympus' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['latitude', 'name', 'timezone']);
    const ok = await admin.post('/api/sites').send({ name: 'Fen Lane culvert', latitude: 52.1, longitude: -0.9 });
    expect(ok.status).toBe(201);
    expect(ok.body.site).toMatchObject({ name: 'Fen Lane culvert', timezone: 'Europe/London', minimumClearance: 0.6 });
    const patched = await admin.patch(`/api/sites/${ok.body.site.id}`).send({ minimumClearance: 1 });
    expect(patched.body.site.minimumClearance).toBe(1);
    expect(patched.body.site.name).toBe('Fen Lane culvert');
  });
});

describe('API habits', () => {
  it('answers unknown API routes with a JSON 404', async () => {
    const r = await request(t.app).get('/api/no-such-thing');
    expect(r.status).toBe(404);
    expect(r.body.error.code).toBe('not_found');
  });

  it('shows caught mail only to administrators or to callers on this machine', async () => {
    const proxied = await agents.get('coordinator')!.get('/api/dev/mail').set('X-Forwarded-For', '203.0.113.9');
    expect(proxied.status).toBe(403);
    const admin = await agents.get('admin')!.get('/api/dev/mail').set('X-Forwarded-For', '203.0.113.9');
    expect(admin.status).toBe(200);
  });

  it("shows an administrator from elsewhere only mail to their own organisation's people", async () => {
    // A message to a demo person (organisation A), caught as the catcher would keep it.
    const toA = demo.supervisor;
    await t.deps.db
      .insertInto('caught_mail')
      .values({ mail_from: 'brink@test', mail_to: toA, subject: 'Reset your password (matrix)', text: 'a link', html: null })
      .execute();
    const read = async (who: 'admin' | 'B admin') =>
      (
        (await agents.get(who)!.get('/api/dev/mail?limit=500').set('X-Forwarded-For', '203.0.113.9').expect(200)).body as {
          messages: { to: string }[];
        }
      ).messages.map((m) => m.to.toLowerCase());
    // An address that merely contains one of B's people's addresses is not theirs.
    const lookalike = `x${orgB.coordinatorEmail}`;
    await t.deps.db
      .insertInto('caught_mail')
      .values({ mail_from: 'brink@test', mail_to: lookalike, subject: 'Lookalike (matrix)', text: 'a link', html: null })
      .execute();
    expect(await read('admin')).toContain(toA.toLowerCase());
    expect(await read('B admin')).not.toContain(toA.toLowerCase());
    expect(await read('B admin')).not.toContain(lookalike.toLowerCase());
  });

  it('sends a content security policy that allows only its own origin', async () => {
    const r = await request(t.app).get('/api/health');
    const csp = String(r.headers['content-security-policy']);
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toMatch(/https?:\/\//);
  });

  it('publishes an OpenAPI 3.1 document with request schemas', async () => {
    const doc = (await request(t.app).get('/api/openapi.json')).body;
    expect(doc.openapi).toBe('3.1.0');
    const signIn = doc.paths['/api/auth/sign-in'].post;
    expect(signIn.requestBody.content['application/json'].schema.required).toEqual(['email', 'password']);
  });
});
