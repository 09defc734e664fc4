/**
 * Units (docs/calculation.md, "Units"): a person chooses metric or US customary, a site sets the
 * default, and a US site starts with OSHA's 2 ft minimum clearance. The API's figures stay in SI.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addPerson, demo, signedIn, startTestApp, unique, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.stop());

describe('units', () => {
  it('a person chooses US customary, then follows the site again; anything else is refused by name', async () => {
    const email = unique('feet');
    await addPerson(t.deps, { email, name: 'Fern Feet' });
    const agent = await signedIn(t.app, email);
    expect((await agent.get('/api/auth/me').expect(200)).body.user.units).toBeNull();
    expect((await agent.patch('/api/auth/me').send({ units: 'us' }).expect(200)).body.user.units).toBe('us');
    expect((await agent.get('/api/auth/me').expect(200)).body.user.units).toBe('us');
    const bad = await agent.patch('/api/auth/me').send({ units: 'imperial' }).expect(400);
    expect(bad.body.error.fields.units).toMatch(/metric or US customary/);
    expect((await agent.patch('/api/auth/me').send({ units: null }).expect(200)).body.user.units).toBeNull();
  });

  it("a US site starts with OSHA's 2 ft clearance (29 CFR 1926.651(j)(2): 2 ft = 0.6096 m, NIST SP 811); switching units moves only a default clearance", async () => {
    const admin = await signedIn(t.app, demo.admin);
    const us = (
      await admin
        .post('/api/sites')
        .send({ name: unique('Ohio yard'), latitude: 40, longitude: -83, units: 'us' })
        .expect(201)
    ).body.site;
    expect(us).toMatchObject({ units: 'us', minimumClearance: 0.6096 });
    const metric = (await admin.put(`/api/sites/${us.id}/units`).send({ units: 'metric' }).expect(200)).body.site;
    expect(metric).toMatchObject({ units: 'metric', minimumClearance: 0.6 });
    const backAgain = (await admin.patch(`/api/sites/${us.id}`).send({ units: 'us' }).expect(200)).body.site;
    expect(backAgain).toMatchObject({ units: 'us', minimumClearance: 0.6096 });
    const set = (await admin.patch(`/api/sites/${us.id}`).send({ minimumClearance: 1 }).expect(200)).body.site;
    expect(set.minimumClearance).toBe(1);
    expect((await admin.put(`/api/sites/${us.id}/units`).send({ units: 'metric' }).expect(200)).body.site.minimumClearance).toBe(1);
    const plain = (
      await admin
        .post('/api/sites')
        .send({ name: unique('Leeds yard'), latitude: 53.8, longitude: -1.5 })
        .expect(201)
    ).body.site;
    expect(plain).toMatchObject({ units: 'metric', minimumClearance: 0.6 });
  });
});
