import request from 'supertest';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  addPerson,
  demo,
  demoOrganisationId,
  linkToken,
  waitForMail,
  makeOrganisation,
  signedIn,
  startTestApp,
  unique,
  type OtherOrganisation,
  type TestApp,
} from './helpers';
import { createOrganisation } from '../src/services/organisation';
import { addTrench, createPermit, makeWorld, permitBody, submitAndApprove, type PermitWorld } from './permits-fixtures';

/**
 * Organisations (issue 16 §1): nothing of one organisation is visible to another. The demo
 * organisation ("A") and a second, invented one ("B", made here): every list shows each its own;
 * an id of the other answers as one that does not exist; a machine of A's library can be neither
 * changed by B nor placed on B's permits, and A's approved permit keeps its check.
 * (server/test/roles.test.ts calls every route as B's administrator and coordinator.)
 */
let t: TestApp;
let w: PermitWorld;
let b: OtherOrganisation;
let bAdmin: Awaited<ReturnType<typeof signedIn>>;
let bCoordinator: Awaited<ReturnType<typeof signedIn>>;

beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_IP: '1000' });
  w = await makeWorld(t);
  b = await makeOrganisation(t.deps, 'Orgtest');
  bAdmin = await signedIn(t.app, b.adminEmail);
  bCoordinator = await signedIn(t.app, b.coordinatorEmail);
});
afterAll(async () => t.stop());

const ids = (list: { id: number }[]) => list.map((x) => x.id);

describe('organisations', () => {
  it("shows each administrator only their own organisation's people, sites, machines and permits", async () => {
    const [people, sites, plant, permits] = await Promise.all(
      ['/api/users', '/api/sites', '/api/plant', '/api/permits'].map((p) => bAdmin.get(p).expect(200)),
    );
    expect(people.body.users.map((u: { email: string }) => u.email).sort()).toEqual([b.adminEmail, b.coordinatorEmail].sort());
    expect(ids(sites.body.sites)).toEqual([b.siteId]);
    expect(ids(plant.body.plant)).toEqual([b.plantItemId]);
    expect(permits.body.permits).toEqual([]);

    const [aPeople, aSites, aPlant] = await Promise.all(
      ['/api/users?limit=500', '/api/sites', '/api/plant'].map((p) => w.agents.admin.get(p).expect(200)),
    );
    expect(ids(aPeople.body.users)).not.toContain(b.coordinatorId);
    expect(ids(aPeople.body.users)).toContain(w.coordinatorId);
    expect(ids(aSites.body.sites)).not.toContain(b.siteId);
    expect(ids(aSites.body.sites)).toContain(w.siteId);
    expect(ids(aPlant.body.plant)).not.toContain(b.plantItemId);
    expect(ids(aPlant.body.plant)).toContain(w.excavatorId);
    // A filter naming the other organisation's site is not found, as one that does not exist.
    expect((await bAdmin.get('/api/permits').query({ siteId: String(w.siteId) })).status).toBe(404);
    expect((await w.agents.admin.get('/api/permits').query({ siteId: String(b.siteId) })).status).toBe(404);
  });

  it("refuses an invitation to the other organisation's site exactly as one to a site that does not exist", async () => {
    const send = (siteId: number) =>
      bAdmin.post('/api/invitations').send({ email: unique('orgtest-invitee'), name: 'Ivo Invitee', siteId, role: 'operator' });
    const theirs = await send(w.siteId);
    const none = await send(2_000_000_000);
    expect(theirs.status).toBe(400);
    expect(theirs.body).toEqual(none.body);
    expect(theirs.body.error.fields).toEqual({ siteId: 'is not a site' });
  });

  it("refuses, when sent, an invitation to the address of another organisation's person, naming no organisation", async () => {
    const send = (agent: typeof bAdmin, email: string) => agent.post('/api/invitations').send({ email, name: 'Ivo Invitee' });
    const theirs = await send(bAdmin, demo.operator);
    expect(theirs.status).toBe(409);
    expect(theirs.body.error.fields).toEqual({ email: 'cannot be invited here' });
    // Nothing of the other organisation in the answer: neither its name nor the person's.
    const aOrg = await t.deps.db
      .selectFrom('organisations')
      .select('name')
      .where('id', '=', await demoOrganisationId(t.deps))
      .executeTakeFirstOrThrow();
    const person = await t.deps.db.selectFrom('users').select('name').where('email', '=', demo.operator).executeTakeFirstOrThrow();
    for (const word of [aOrg.name, person.name]) expect(JSON.stringify(theirs.body)).not.toContain(word);
    // A deactivated person of A is refused in the same words (the answer tells no more about them).
    const gone = unique('orgtest-gone');
    await addPerson(t.deps, { email: gone, name: 'Gwen Gone', active: false });
    expect((await send(bAdmin, gone)).body).toEqual(theirs.body);
    expect(
      await t.deps.db
        .selectFrom('invitations')
        .select('id')
        .where('email', 'in', [demo.operator, gone])
        .where('organisation_id', '=', b.id)
        .execute(),
    ).toEqual([]);
    const refusals = await t.deps.db
      .selectFrom('audit_log')
      .select('detail')
      .where('entity', '=', 'invitation')
      .where('action', '=', 'refused')
      .where(sql<boolean>`detail @> ${JSON.stringify({ email: gone })}::jsonb`)
      .execute();
    expect(refusals).toHaveLength(1);
    // An address of one's own organisation, and a new one, are still invited.
    expect((await send(bAdmin, b.coordinatorEmail)).status).toBe(201);
    expect((await send(bAdmin, unique('orgtest-new'))).status).toBe(201);
  });

  it('refuses, when accepted, an invitation whose address became a person of another organisation meanwhile', async () => {
    const email = unique('orgtest-race');
    expect((await bAdmin.post('/api/invitations').send({ email, name: 'Rae Race' })).status).toBe(201);
    const token = linkToken((await waitForMail(t.deps, email, /invited/)).text, '/invitations/accept');
    await addPerson(t.deps, { email, name: 'Rae Race (of A)' });
    const accepted = await request(t.app).post('/api/invitations/accept').send({ token, name: 'Rae Race', password: 'a-long-password-1' });
    expect(accepted.status).toBe(409);
    const person = await t.deps.db
      .selectFrom('users')
      .select(['organisation_id', 'name'])
      .where('email', '=', email)
      .executeTakeFirstOrThrow();
    expect(person).toEqual({ organisation_id: await demoOrganisationId(t.deps), name: 'Rae Race (of A)' });
  });

  it("makes a site member only of a person of the site's organisation", async () => {
    const put = (agent: typeof bAdmin, userId: number, siteId: number) =>
      agent.put(`/api/users/${userId}/memberships/${siteId}`).send({ role: 'supervisor', canInspect: false });
    expect((await put(w.agents.admin, b.coordinatorId, w.siteId)).status).toBe(404);
    expect((await put(bAdmin, w.coordinatorId, b.siteId)).status).toBe(404);
    expect((await put(bAdmin, b.coordinatorId, w.siteId)).status).toBe(404);
    const memberships = await t.deps.db.selectFrom('site_members').select('site_id').where('user_id', '=', b.coordinatorId).execute();
    expect(memberships).toEqual([{ site_id: b.siteId }]);
  });

  it("keeps the other organisation's machine out of reach, and A's approved permit keeps its check", async () => {
    const permit = await createPermit(w);
    const approved = await submitAndApprove(w, permit.id);
    expect(approved.status).toBe('approved');
    const before = (await w.agents.coordinator.get(`/api/permits/${permit.id}`).expect(200)).body;
    const machine = await t.deps.db.selectFrom('plant_items').selectAll().where('id', '=', w.excavatorId).executeTakeFirstOrThrow();

    // B's coordinator can neither change nor remove A's excavator: it is not found.
    const edit = await bCoordinator.patch(`/api/plant/${w.excavatorId}`).send({
      name: machine.name,
      category: machine.category,
      operatingMass: machine.operating_mass * 3,
      elements: machine.elements,
      designFactor: 1,
      notes: '',
      version: machine.version,
    });
    expect(edit.status).toBe(404);
    expect((await bCoordinator.delete(`/api/plant/${w.excavatorId}`)).status).toBe(404);
    const after = await t.deps.db.selectFrom('plant_items').selectAll().where('id', '=', w.excavatorId).executeTakeFirstOrThrow();
    expect(after).toEqual(machine);
    const now = (await w.agents.coordinator.get(`/api/permits/${permit.id}`).expect(200)).body;
    expect(now.permit.status).toBe('approved');
    expect(now.permit.check).toEqual(before.permit.check);

    // The same name may stand in both libraries: each organisation keeps its own.
    const same = await bCoordinator.post('/api/plant').send({
      name: machine.name,
      category: machine.category,
      operatingMass: machine.operating_mass,
      elements: machine.elements,
    });
    expect(same.status).toBe(201);
  });

  it("refuses a permit on B's site that places A's machine, naming the load", async () => {
    const email = unique('orgtest-supervisor');
    await addPerson(t.deps, { organisationId: b.id, email, name: 'Suki Second (test)', member: { siteId: b.siteId, role: 'supervisor' } });
    const supervisor = await signedIn(t.app, email);
    const site = await t.deps.db.selectFrom('sites').select(['latitude', 'longitude']).where('id', '=', b.siteId).executeTakeFirstOrThrow();
    const origin: [number, number] = [site.longitude, site.latitude];
    const trench = await addTrench(t, b.siteId, origin, [0, 0]);
    const world = { ...w, siteId: b.siteId, origin, trenchId: trench.id, trenchCentre: trench.centre };
    const body = (plantItemId: number) => permitBody({ ...world, excavatorId: plantItemId }, { operatorIds: [] });
    const theirs = await supervisor.post('/api/permits').send(body(w.excavatorId));
    expect(theirs.status).toBe(400);
    expect(theirs.body.error.fields).toEqual({ 'loads[0].plantItemId': 'is not in the plant library' });
    const own = await supervisor.post('/api/permits').send(body(b.plantItemId));
    expect(own.status).toBe(201);
  });

  it('tells each person which organisation they are in, and lets its administrator rename it', async () => {
    const me = (await bCoordinator.get('/api/auth/me').expect(200)).body.user;
    const row = await t.deps.db.selectFrom('organisations').select(['id', 'name']).where('id', '=', b.id).executeTakeFirstOrThrow();
    expect(me.organisation).toEqual({ id: b.id, name: row.name });
    const aMe = (await w.agents.coordinator.get('/api/auth/me').expect(200)).body.user;
    expect(aMe.organisation.id).not.toBe(b.id);

    // Only an administrator renames, and only their own organisation (the path names none).
    const byCoordinator = await bCoordinator.patch('/api/organisation').send({ name: 'Coup Earthworks (test)' });
    expect(byCoordinator.status).toBe(403);
    const blank = await bAdmin.patch('/api/organisation').send({ name: '   ' });
    expect(blank.status).toBe(400);
    expect(blank.body.error.fields).toEqual({ name: 'is required' });
    const taken = await bAdmin.patch('/api/organisation').send({ name: aMe.organisation.name });
    expect(taken.status).toBe(409);
    expect(taken.body.error.fields).toEqual({ name: 'is already taken on this Brink' });

    const newName = `Renamed Earthworks ${unique('r')} (test)`;
    const renamed = await bAdmin.patch('/api/organisation').send({ name: `  ${newName} ` });
    expect(renamed.status).toBe(200);
    expect(renamed.body.organisation).toEqual({ id: b.id, name: newName });
    expect((await bCoordinator.get('/api/auth/me').expect(200)).body.user.organisation.name).toBe(newName);
    expect((await w.agents.coordinator.get('/api/auth/me').expect(200)).body.user.organisation).toEqual(aMe.organisation);
    const logged = await t.deps.db
      .selectFrom('audit_log')
      .select(['action', 'detail'])
      .where('entity', '=', 'organisation')
      .where('entity_id', '=', String(b.id))
      .execute();
    expect(logged).toEqual([{ action: 'renamed', detail: { from: row.name, to: newName } }]);
  });

  it('is kept apart by the database itself: a membership or a load across organisations is refused', async () => {
    const refused = (rule: string) => expect.objectContaining({ code: '23514', constraint: rule });
    // A person of B made a member of A's site, directly in the database.
    await expect(
      t.deps.db.insertInto('site_members').values({ site_id: w.siteId, user_id: b.coordinatorId, role: 'operator' }).execute(),
    ).rejects.toEqual(refused('site_member_same_organisation'));
    // B's coordinator's own membership moved onto A's site.
    await expect(
      t.deps.db.updateTable('site_members').set({ site_id: w.siteId }).where('user_id', '=', b.coordinatorId).execute(),
    ).rejects.toEqual(refused('site_member_same_organisation'));
    // A's permit made to place B's machine.
    const permit = await createPermit(w);
    const revision = await t.deps.db
      .selectFrom('permit_revisions')
      .select(['id', 'loads'])
      .where('permit_id', '=', permit.id)
      .executeTakeFirstOrThrow();
    const loads = JSON.parse(JSON.stringify(revision.loads)) as { plantItemId: number | null }[];
    expect(loads[0].plantItemId).toBe(w.excavatorId);
    const theirs = JSON.stringify([{ ...loads[0], plantItemId: b.plantItemId }]);
    await expect(t.deps.db.updateTable('permit_revisions').set({ loads: theirs }).where('id', '=', revision.id).execute()).rejects.toEqual(
      refused('permit_loads_own_machines'),
    );
    // A person, a site or a machine moved to another organisation under such rows.
    await expect(t.deps.db.updateTable('users').set({ organisation_id: b.id }).where('id', '=', w.coordinatorId).execute()).rejects.toEqual(
      refused('organisation_kept'),
    );
    await expect(
      t.deps.db.updateTable('plant_items').set({ organisation_id: b.id }).where('id', '=', w.excavatorId).execute(),
    ).rejects.toEqual(refused('organisation_kept'));
    // A load that names no machine, and its own machine, are accepted (its own last: the revision is
    // left as Brink wrote it, for the tests that read every stored revision, stored-shapes.test).
    await t.deps.db
      .updateTable('permit_revisions')
      .set({ loads: JSON.stringify([{ ...loads[0], plantItemId: null }]) })
      .where('id', '=', revision.id)
      .execute();
    await t.deps.db
      .updateTable('permit_revisions')
      .set({ loads: JSON.stringify(loads) })
      .where('id', '=', revision.id)
      .execute();
  });

  it("makes an organisation for the installation's operator, whose invited administrator starts with nothing of another's", async () => {
    const name = `Quillon Drainage ${unique('q')} (test)`;
    const adminEmail = unique('quillon-admin');
    const made = await createOrganisation(t.deps.db, {
      name,
      adminEmail,
      adminName: 'Quin Quillon',
      publicUrl: 'http://brink.test',
      now: new Date(),
    });
    await expect(
      createOrganisation(t.deps.db, {
        name,
        adminEmail: unique('again'),
        adminName: 'Again',
        publicUrl: 'http://brink.test',
        now: new Date(),
      }),
    ).rejects.toThrow(`An organisation called "${name}" already exists.`);
    await expect(
      createOrganisation(t.deps.db, {
        name: `${name} 2`,
        adminEmail: b.adminEmail,
        adminName: 'B',
        publicUrl: 'http://brink.test',
        now: new Date(),
      }),
    ).rejects.toThrow('already has an account');
    const token = new URL(made.link).searchParams.get('token');
    const agent = request.agent(t.app);
    const accepted = await agent.post('/api/invitations/accept').send({ token, name: 'Quin Quillon', password: 'a-long-password-1' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.user).toMatchObject({ email: adminEmail, isAdmin: true, memberships: [] });
    expect((await agent.get('/api/sites').expect(200)).body.sites).toEqual([]);
    expect((await agent.get('/api/plant').expect(200)).body.plant).toEqual([]);
    expect((await agent.get('/api/users').expect(200)).body.users.map((u: { email: string }) => u.email)).toEqual([adminEmail]);
    const site = await agent.post('/api/sites').send({ name: 'Quillon outfall (test)', latitude: 54.1, longitude: -1.6 });
    expect(site.status).toBe(201);
    const row = await t.deps.db.selectFrom('sites').select('organisation_id').where('id', '=', site.body.site.id).executeTakeFirstOrThrow();
    expect(row.organisation_id).toBe(made.organisationId);
    expect((await agent.get(`/api/sites/${w.siteId}`)).status).toBe(404);
  });
});
