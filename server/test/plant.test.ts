import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { plantItemSchema, type PlantItemInput } from '@shared/schemas/plant';
import { addPerson, demo, signedIn, startTestApp, unique, type TestApp, demoOrganisationId } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_IP: '1000' });
});
afterAll(async () => t.stop());

function machine(name: string, over: Partial<PlantItemInput> = {}): PlantItemInput {
  return {
    name,
    category: 'excavator',
    operatingMass: 12,
    elements: [
      { name: 'Left track', kind: 'track', x: 0, y: 0.95, length: 2.8, width: 0.5, share: 0.5 },
      { name: 'Right track', kind: 'track', x: 0, y: -0.95, length: 2.8, width: 0.5, share: 0.5 },
    ],
    ...over,
  };
}
const uniqueName = (s: string) => unique(s).replace('@example.test', '');

describe('plant library', () => {
  it('is read by every signed-in person, and the seeded machines are valid and add up', async () => {
    const op = await signedIn(t.app, demo.operator);
    const r = await op.get('/api/plant');
    expect(r.status).toBe(200);
    const names = r.body.plant.map((p: { name: string }) => p.name);
    for (const n of ['Mini excavator 1.5 t', 'Excavator 30 t', 'Mobile crane 45 t on outriggers', 'Single-drum roller 7 t'])
      expect(names).toContain(n);
    for (const p of r.body.plant) {
      const parsed = plantItemSchema.safeParse(p);
      expect(parsed.success, `${p.name}: ${JSON.stringify(parsed.error?.issues)}`).toBe(true);
    }
    const crane = r.body.plant.find((p: { name: string }) => p.name === 'Mobile crane 45 t on outriggers');
    expect(crane.elements.filter((e: { kind: string }) => e.kind === 'pad')).toHaveLength(4);
    expect((await request(t.app).get('/api/plant')).status).toBe(401);
  });

  it('lets a coordinator add, change and remove a machine; each change is audited', async () => {
    const co = await signedIn(t.app, demo.coordinator);
    const name = uniqueName('Backhoe');
    const created = await co.post('/api/plant').send(machine(name));
    expect(created.status).toBe(201);
    expect(created.body.item).toMatchObject({ name, operatingMass: 12, designFactor: 1, version: 1 });
    const id = created.body.item.id;

    const changed = await co.patch(`/api/plant/${id}`).send({ ...machine(name, { operatingMass: 13.5, designFactor: 1.2 }), version: 1 });
    expect(changed.status).toBe(200);
    expect(changed.body.item).toMatchObject({ operatingMass: 13.5, designFactor: 1.2, version: 2 });

    const stale = await co.patch(`/api/plant/${id}`).send({ ...machine(name, { operatingMass: 99 }), version: 1 });
    expect(stale.status).toBe(409);
    const list = (await co.get('/api/plant')).body.plant;
    expect(list.find((p: { id: number }) => p.id === id).operatingMass).toBe(13.5);

    expect((await co.delete(`/api/plant/${id}`)).status).toBe(204);
    expect((await co.delete(`/api/plant/${id}`)).status).toBe(404);
    const log = await t.deps.db
      .selectFrom('audit_log')
      .select(['action'])
      .where('entity', '=', 'plant')
      .where('entity_id', '=', String(id))
      .orderBy('id')
      .execute();
    expect(log.map((l) => l.action)).toEqual(['created', 'updated', 'deleted']);
  });

  it('lets an administrator edit, and refuses supervisors and operators before reading the body', async () => {
    const admin = await signedIn(t.app, demo.admin);
    expect((await admin.post('/api/plant').send(machine(uniqueName('Loader')))).status).toBe(201);
    for (const who of [demo.supervisor, demo.operator]) {
      const a = await signedIn(t.app, who);
      expect((await a.post('/api/plant').send({ name: 5 })).status).toBe(403);
      expect((await a.post('/api/plant').send(machine(uniqueName('Nope')))).status).toBe(403);
    }
  });

  it('lets a coordinator of another site edit the (shared) library, but not a supervisor of one', async () => {
    const other = await t.deps.db
      .insertInto('sites')
      .values({ organisation_id: await demoOrganisationId(t.deps), name: 'Plant test other site', latitude: 51.2, longitude: -0.5 })
      .returning('id')
      .executeTakeFirstOrThrow();
    const emails = { coordinator: unique('co'), supervisor: unique('su') } as const;
    for (const [role, email] of Object.entries(emails) as ['coordinator' | 'supervisor', string][]) {
      await addPerson(t.deps, { email, name: `Plant ${role}`, member: { siteId: other.id, role } });
    }
    expect((await (await signedIn(t.app, emails.coordinator)).post('/api/plant').send(machine(uniqueName('Far')))).status).toBe(201);
    expect((await (await signedIn(t.app, emails.supervisor)).post('/api/plant').send(machine(uniqueName('Far')))).status).toBe(403);
  });

  it('names each wrong field: shares that do not add up, a bad element, a repeated name', async () => {
    const co = await signedIn(t.app, demo.coordinator);
    const bad = await co.post('/api/plant').send(
      machine(uniqueName('Bad'), {
        operatingMass: 0,
        elements: [
          { name: 'Pad', kind: 'pad', x: 0, y: 0, length: 0, width: 1, share: 0.5 },
          { name: 'Pad 2', kind: 'skid' as 'pad', x: 1, y: 0, length: 1, width: 1, share: 0.5 },
        ],
      }),
    );
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['elements[0].length', 'elements[1].kind', 'operatingMass']);

    const shares = await co.post('/api/plant').send(
      machine(uniqueName('Shares'), {
        elements: [
          { name: 'Pad', kind: 'pad', x: 0, y: 0, length: 1, width: 1, share: 0.5 },
          { name: 'pad', kind: 'pad', x: 1, y: 0, length: 1, width: 1, share: 0.3 },
        ],
      }),
    );
    expect(shares.status).toBe(400);
    expect(Object.keys(shares.body.error.fields).sort()).toEqual(['elements', 'elements[1].name']);
    expect(shares.body.error.fields.elements).toMatch(/add up to 1 \(they add up to 0\.800\)/);

    const name = uniqueName('Twice');
    expect((await co.post('/api/plant').send(machine(name))).status).toBe(201);
    const again = await co.post('/api/plant').send(machine(name));
    expect(again.status).toBe(400);
    expect(again.body.error.fields).toEqual({ name: 'is already in the library' });
  });
});
