/**
 * Units (docs/calculation.md, "Units"): a person chooses metric or US customary, a site sets the
 * default, and a US site starts with OSHA's 2 ft minimum clearance. The API's figures stay in SI.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { localProjection } from '@shared/geometry';
import { addPerson, demo, demoSiteId, signedIn, startTestApp, unique, type TestApp } from './helpers';

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

  it('refusals follow the reader’s units, limits on their safe side: an excavation’s width, depth and an import report', async () => {
    const siteId = await demoSiteId(t.deps);
    const origin = await t.deps.db.selectFrom('sites').select(['latitude', 'longitude']).where('id', '=', siteId).executeTakeFirstOrThrow();
    const at = (east: number, north: number) => localProjection([origin.longitude, origin.latitude]).toWgs84([east, north]);
    const email = unique('us-coordinator');
    await addPerson(t.deps, { email, name: 'Cass Feet', units: 'us', member: { siteId, role: 'coordinator' } });
    const us = await signedIn(t.app, email);
    const metric = await signedIn(t.app, demo.coordinator);
    const tooWide = {
      reference: unique('W').slice(0, 20),
      name: 'Too wide and too deep',
      kind: 'trench',
      geometry: { type: 'LineString', coordinates: [at(-100, 70), at(-60, 70)] },
      width: 12,
      depth: 60,
      state: 'open',
      supportType: 'hydraulic-frames',
      soil: [{ top: 0, unitWeight: 18, frictionAngle: 28 }],
    };
    const inMetres = await metric.post(`/api/sites/${siteId}/excavations`).send(tooWide).expect(400);
    expect(inMetres.body.error.fields.width).toBe('must be between 0.3 and 10 m');
    expect(inMetres.body.error.fields.depth).toBe('must be at most 50 m');
    const inFeet = await us.post(`/api/sites/${siteId}/excavations`).send(tooWide).expect(400);
    // 0.3 m = 0.98425 ft, rounded up; 10 m = 32.8084 ft and 50 m = 164.042 ft, rounded down
    // (NIST SP 811 B.8: 1 ft = 0.3048 m exactly): the figures shown, typed back, are accepted.
    expect(inFeet.body.error.fields.width).toBe('must be between 0.99 ft and 32.80 ft');
    expect(inFeet.body.error.fields.depth).toBe('must be at most 164.04 ft');
    expect(JSON.stringify(inFeet.body)).not.toMatch(/\d m\b/);

    // An import report: each refused feature's reasons, and the answer's fields, in feet.
    const { geometry, ...properties } = tooWide;
    const doc = JSON.stringify({ type: 'FeatureCollection', features: [{ type: 'Feature', geometry, properties }] });
    const report = await us
      .post(`/api/sites/${siteId}/excavations/import`)
      .attach('file', Buffer.from(doc), 'register.geojson')
      .expect(400);
    expect(report.body.report.refused[0].reasons.width).toBe('must be between 0.99 ft and 32.80 ft');
    expect(report.body.error.fields['features[0].width']).toBe('must be between 0.99 ft and 32.80 ft');
    const metricReport = await metric
      .post(`/api/sites/${siteId}/excavations/import`)
      .attach('file', Buffer.from(doc), 'register.geojson')
      .expect(400);
    expect(metricReport.body.report.refused[0].reasons.width).toBe('must be between 0.3 and 10 m');
  });
});
