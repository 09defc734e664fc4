import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { area, booleanPointInPolygon, point } from '@turf/turf';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { localProjection } from '@shared/geometry';
import {
  calcExcavationOf,
  excavationInputSchema,
  storedAuditDetail,
  type Excavation,
  type ExcavationInput,
} from '@shared/schemas/excavations';
import { calcRequestSchema } from '@shared/schemas/calc';
import { loadExcavationPage, loadExcavations, siteAnswerReuse } from '../src/services/excavations';
import { addPerson, demo, demoSiteId, makeOrganisation, signedIn, startTestApp, unique, type TestApp, demoOrganisationId } from './helpers';

let t: TestApp;
let siteId: number;
let origin: { latitude: number; longitude: number };
type Agent = Awaited<ReturnType<typeof signedIn>>;
const as: Record<'admin' | 'coordinator' | 'supervisor' | 'operator', Agent> = {} as never;

beforeAll(async () => {
  t = await startTestApp({ SIGNIN_LIMIT_PER_IP: '1000' });
  siteId = await demoSiteId(t.deps);
  origin = await t.deps.db.selectFrom('sites').select(['latitude', 'longitude']).where('id', '=', siteId).executeTakeFirstOrThrow();
  for (const who of ['admin', 'coordinator', 'supervisor', 'operator'] as const) as[who] = await signedIn(t.app, demo[who]);
});
afterAll(async () => t.stop());

const ref = (p: string) => `${p}-${randomUUID().slice(0, 6)}`;
/** WGS84 position `east`, `north` metres from the site origin. */
const at = (east: number, north: number) => localProjection([origin.longitude, origin.latitude]).toWgs84([east, north]);

function trench(over: Partial<ExcavationInput> = {}): ExcavationInput {
  return {
    reference: ref('T'),
    name: 'Test drain trench',
    kind: 'trench',
    geometry: { type: 'LineString', coordinates: [at(-100, 80), at(-50, 80)] },
    width: 1.2,
    depth: 2.4,
    state: 'open',
    supportType: 'hydraulic-frames',
    soil: [
      { top: 0, unitWeight: 18, frictionAngle: 28 },
      { top: 0.6, unitWeight: 19.5, saturatedUnitWeight: 20, undrainedShearStrength: 50 },
    ],
    ...over,
  };
}

function pit(over: Partial<ExcavationInput> = {}): ExcavationInput {
  return {
    reference: ref('P'),
    name: 'Test chamber pit',
    kind: 'pit',
    geometry: { type: 'Polygon', coordinates: [[at(60, -60), at(68, -60), at(68, -54), at(60, -54), at(60, -60)]] },
    depth: 4.5,
    state: 'open',
    supportType: 'sheet-piles',
    groundwaterDepth: 2.2,
    soil: [{ top: 0, unitWeight: 19, saturatedUnitWeight: 21, frictionAngle: 34 }],
    ...over,
  };
}

const count = async (reference?: string) =>
  Number(
    (
      await t.deps.db
        .selectFrom('excavations')
        .select((eb) => eb.fn.countAll().as('n'))
        .where('site_id', '=', siteId)
        .$if(reference !== undefined, (q) => q.where('reference', '=', reference!))
        .executeTakeFirstOrThrow()
    ).n,
  );

describe('excavation register: roles', () => {
  it('lets coordinators create; supervisors and coordinators edit what is on the ground and delete; operators only read', async () => {
    for (const who of ['coordinator', 'supervisor'] as const) {
      // Registering an excavation sets its design data (support, soil): a coordinator's part.
      const c = await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(trench());
      expect(c.status).toBe(201);
      const e: Excavation = c.body.excavation;
      const p = await as[who].patch(`/api/sites/${siteId}/excavations/${e.id}`).send({ name: 'Renamed trench', version: e.version });
      expect(p.status).toBe(200);
      expect(p.body.excavation).toMatchObject({ name: 'Renamed trench', version: e.version + 1, depth: 2.4 });
      expect((await as[who].delete(`/api/sites/${siteId}/excavations/${e.id}`)).status).toBe(204);
      expect((await as[who].delete(`/api/sites/${siteId}/excavations/${e.id}`)).status).toBe(404);
    }

    const made = (await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(trench())).body.excavation as Excavation;
    const list = await as.operator.get(`/api/sites/${siteId}/excavations`);
    expect(list.status).toBe(200);
    expect(list.body.excavations.map((e: Excavation) => e.reference)).toContain(made.reference);

    const before = await count();
    expect((await as.operator.post(`/api/sites/${siteId}/excavations`).send(trench())).status).toBe(403);
    expect((await as.operator.patch(`/api/sites/${siteId}/excavations/${made.id}`).send({ depth: 9, version: made.version })).status).toBe(
      403,
    );
    expect((await as.operator.delete(`/api/sites/${siteId}/excavations/${made.id}`)).status).toBe(403);
    expect(await count()).toBe(before);
    expect((await request(t.app).get(`/api/sites/${siteId}/excavations`)).status).toBe(401);
  });

  it('keeps each site to its own people: another site is 403, another site’s excavation is 404', async () => {
    const other = await t.deps.db
      .insertInto('sites')
      .values({
        organisation_id: await demoOrganisationId(t.deps),
        name: `Other ${randomUUID().slice(0, 6)}`,
        latitude: origin.latitude,
        longitude: origin.longitude,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const email = unique('othercoord');
    await addPerson(t.deps, { email, name: 'Other coordinator', member: { siteId: other.id, role: 'coordinator' } });
    const outsider = await signedIn(t.app, email);

    const mine = (await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(trench())).body.excavation as Excavation;
    const theirs = await outsider.post(`/api/sites/${other.id}/excavations`).send(trench());
    expect(theirs.status).toBe(201);

    expect((await outsider.get(`/api/sites/${siteId}/excavations`)).status).toBe(403);
    expect((await outsider.patch(`/api/sites/${siteId}/excavations/${mine.id}`).send({ depth: 3, version: 1 })).status).toBe(403);
    expect((await as.coordinator.get(`/api/sites/${other.id}/excavations`)).status).toBe(403);
    // The other site's excavation through this site's path: not found here, and not changed.
    const cross = await as.coordinator
      .patch(`/api/sites/${siteId}/excavations/${theirs.body.excavation.id}`)
      .send({ depth: 3, version: 1 });
    expect(cross.status).toBe(404);
    expect((await as.coordinator.delete(`/api/sites/${siteId}/excavations/${theirs.body.excavation.id}`)).status).toBe(404);
    const still = await t.deps.db
      .selectFrom('excavations')
      .select('depth')
      .where('id', '=', theirs.body.excavation.id)
      .executeTakeFirstOrThrow();
    expect(still.depth).toBe(2.4);
  });
});

describe('excavation register: what an excavation carries', () => {
  it('has the demo site seeded with three valid excavations, each with an outline', async () => {
    const list = (await as.operator.get(`/api/sites/${siteId}/excavations`)).body.excavations as Excavation[];
    const demoRefs = ['PIT-01', 'TR-01', 'TR-02'];
    const seeded = list.filter((e) => demoRefs.includes(e.reference));
    expect(seeded.map((e) => e.reference).sort()).toEqual(demoRefs);
    for (const e of seeded) {
      const { id: _i, siteId: _s, version: _v, drawing: _d, outline, influenceZone, createdAt: _c, updatedAt: _u, ...values } = e;
      expect(excavationInputSchema.safeParse(values).success, e.reference).toBe(true);
      expect(outline?.type, e.reference).toBe('Polygon');
      expect(influenceZone, e.reference).not.toBeNull();
    }
    // TR-01 is 1.2 m wide and 35 m + √(28² + 26²) = 73.2 m long along its centre line: about 88 m² in plan.
    const tr01 = seeded.find((e) => e.reference === 'TR-01')!;
    expect(area(tr01.outline!)).toBeGreaterThan(85);
    expect(area(tr01.outline!)).toBeLessThan(91);
    expect(seeded.find((e) => e.reference === 'PIT-01')).toMatchObject({
      depth: 4.5,
      supportType: 'sheet-piles',
      state: 'open',
      groundwaterDepth: 2.2,
    });
  });

  it('returns the calculation fields, the ground outline and the influence zone', async () => {
    const c = await as.coordinator
      .post(`/api/sites/${siteId}/excavations`)
      .send(trench({ designSurcharge: 12.5, ratedPressure: 40, restraint: 'yielding' }));
    expect(c.status).toBe(201);
    const e: Excavation = c.body.excavation;
    expect(e).toMatchObject({
      depth: 2.4,
      designSurcharge: 12.5,
      ratedPressure: 40,
      restraint: 'yielding',
      pressureState: 'active',
      wallFriction: 0,
      groundwaterDepth: null,
      state: 'open',
    });
    // A calculation request can be made straight from it.
    const req = calcRequestSchema.safeParse({ excavation: calcExcavationOf(e), soil: e.soil, method: 'dispersion-45', loads: [] });
    expect(req.success).toBe(true);
    // A straight 50 m trench 1.2 m wide has a 60 m² outline (arithmetic; turf's area on the ellipsoid-free sphere is within 0.5 %).
    expect(e.outline?.type).toBe('Polygon');
    expect(area(e.outline!)).toBeGreaterThan(60 * 0.995);
    expect(area(e.outline!)).toBeLessThan(60 * 1.005);
    // The influence zone reaches H = 2.4 m beyond the trench side (0.6 m from the centre line): 2.9 m is in, 3.2 m is out.
    expect(booleanPointInPolygon(point(at(-75, 80 + 0.6 + 2.3)), e.influenceZone!)).toBe(true);
    expect(booleanPointInPolygon(point(at(-75, 80 + 0.6 + 2.6)), e.influenceZone!)).toBe(false);
  });

  it('sorts soil layers by depth and defaults the design surcharge allowance to 10 kPa', async () => {
    const c = await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(
      pit({
        soil: [
          { top: 1.5, unitWeight: 20, frictionAngle: 35 },
          { top: 0, unitWeight: 18, frictionAngle: 28 },
        ],
      }),
    );
    expect(c.status).toBe(201);
    expect(c.body.excavation.designSurcharge).toBe(10);
    expect(c.body.excavation.width).toBeNull();
    expect(c.body.excavation.soil.map((l: { top: number }) => l.top)).toEqual([0, 1.5]);
  });
});

describe('excavation register: bad input is refused naming the field, and nothing changes', () => {
  const post = (body: unknown) => as.coordinator.post(`/api/sites/${siteId}/excavations`).send(body as object);

  it('refuses geometry that is not valid GeoJSON', async () => {
    for (const geometry of [
      { type: 'LineString', coordinates: [[-1.04, 52.37]] },
      { type: 'LineString', coordinates: 'nowhere' },
      {
        type: 'Polygon',
        coordinates: [
          [
            [-1.04, 52.37],
            [-1.0401, 52.37],
            [-1.0401, 52.3701],
          ],
        ],
      },
      {
        type: 'LineString',
        coordinates: [
          [-1.04, 95],
          [-1.04, 52.37],
        ],
      },
      { type: 'Point', coordinates: [-1.04, 52.37] },
      null,
    ]) {
      const r = await post(trench({ geometry: geometry as never }));
      expect(r.status, JSON.stringify(geometry)).toBe(400);
      expect(
        Object.keys(r.body.error.fields).some((k) => k.startsWith('geometry')),
        JSON.stringify(r.body.error.fields),
      ).toBe(true);
    }
  });

  it('refuses a self-intersecting pit outline and a trench centre line that crosses itself', async () => {
    const bowtie = { type: 'Polygon' as const, coordinates: [[at(0, 100), at(10, 110), at(10, 100), at(0, 110), at(0, 100)]] };
    const r = await post(pit({ geometry: bowtie }));
    expect(r.status).toBe(400);
    expect(r.body.error.fields.geometry).toMatch(/must not cross itself/);
    const loop = { type: 'LineString' as const, coordinates: [at(0, 100), at(20, 120), at(20, 100), at(0, 120)] };
    const l = await post(trench({ geometry: loop }));
    expect(l.status).toBe(400);
    expect(l.body.error.fields.geometry).toMatch(/must not cross itself/);
  });

  it('refuses a trench 50 km from the site origin', async () => {
    const reference = ref('FAR');
    const r = await post(trench({ reference, geometry: { type: 'LineString', coordinates: [at(50_000, 0), at(50_040, 0)] } }));
    expect(r.status).toBe(400);
    expect(r.body.error.fields.geometry).toBe('must lie within 5 km of the site origin (a point is 50 km from it)');
    expect(await count(reference)).toBe(0);
  });

  it('refuses a depth of zero or less, and a trench width outside 0.3 to 10 m', async () => {
    for (const depth of [0, -1.5]) {
      const r = await post(trench({ depth }));
      expect(r.status).toBe(400);
      expect(r.body.error.fields).toEqual({ depth: 'must be greater than 0 m' });
    }
    for (const width of [0.2, 12]) {
      const r = await post(trench({ width }));
      expect(r.status).toBe(400);
      expect(r.body.error.fields).toEqual({ width: 'must be between 0.3 and 10 m' });
    }
    expect((await post(trench({ width: null }))).body.error.fields).toEqual({ width: 'is required for a trench (0.3 to 10 m)' });
    expect((await post(pit({ width: 2 }))).body.error.fields).toEqual({ width: 'applies to trenches only; leave it empty for a pit' });
    expect((await post(pit({ kind: 'trench', width: 1 }))).body.error.fields).toEqual({
      geometry: 'a trench is drawn as its centre line (a LineString)',
    });
  });

  it('refuses soil the calculation would refuse, with the same field names', async () => {
    const r = await post(trench({ soil: [{ top: 0.5, unitWeight: 19, frictionAngle: 30 }], wallFriction: 35 }));
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['soil[0].top', 'wallFriction']);
    const both = await post(trench({ soil: [{ top: 0, unitWeight: 19, frictionAngle: 30, undrainedShearStrength: 40 }] }));
    expect(Object.keys(both.body.error.fields)).toEqual(['soil[0].undrainedShearStrength']);
  });

  it('refuses a repeated reference on the same site', async () => {
    const body = trench();
    expect((await post(body)).status).toBe(201);
    const again = await post(body);
    expect(again.status).toBe(400);
    expect(again.body.error.fields).toEqual({ reference: 'is already used on this site' });
  });
});

describe('excavation register: changes', () => {
  it('records a change of depth or support with who and when; a stale version is 409 and changes nothing', async () => {
    const e = (await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(trench())).body.excavation as Excavation;
    t.clock.now = new Date('2026-03-02T07:30:00Z');
    try {
      const p = await as.coordinator
        .patch(`/api/sites/${siteId}/excavations/${e.id}`)
        .send({ depth: 3.1, supportType: 'trench-box', version: e.version });
      expect(p.status).toBe(200);
      expect(p.body.excavation).toMatchObject({ depth: 3.1, supportType: 'trench-box', version: e.version + 1 });
    } finally {
      t.clock.now = null;
    }
    const stale = await as.coordinator.patch(`/api/sites/${siteId}/excavations/${e.id}`).send({ depth: 5, version: e.version });
    expect(stale.status).toBe(409);
    const bad = await as.coordinator.patch(`/api/sites/${siteId}/excavations/${e.id}`).send({ depth: -1, version: e.version + 1 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toEqual({ depth: 'must be greater than 0 m' });

    const [saved] = (await as.operator.get(`/api/sites/${siteId}/excavations`)).body.excavations.filter((x: Excavation) => x.id === e.id);
    expect(saved).toMatchObject({ depth: 3.1, supportType: 'trench-box', version: e.version + 1 });

    const coordinatorId = (await t.deps.db.selectFrom('users').select('id').where('email', '=', demo.coordinator).executeTakeFirstOrThrow())
      .id;
    const log = await t.deps.db
      .selectFrom('audit_log')
      .selectAll()
      .where('entity', '=', 'excavation')
      .where('entity_id', '=', String(e.id))
      .orderBy('id')
      .execute();
    expect(log.map((l) => l.action)).toEqual(['created', 'depth-or-support-changed']);
    expect(log[1].actor_id).toBe(coordinatorId);
    expect(storedAuditDetail(log[1].detail).changes).toEqual({
      depth: { from: 2.4, to: 3.1 },
      supportType: { from: 'hydraulic-frames', to: 'trench-box' },
    });

    const history = await as.operator.get(`/api/sites/${siteId}/excavations/${e.id}/history`);
    expect(history.status).toBe(200);
    expect(history.body.entries[0]).toMatchObject({ by: 'Colm Ridley (demo coordinator)', action: 'depth-or-support-changed' });
    expect(history.body.entries[0].changes.depth).toEqual({ from: 2.4, to: 3.1 });
  });

  it('checks a changed geometry as strictly as a new one', async () => {
    const e = (await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(pit())).body.excavation as Excavation;
    const r = await as.coordinator
      .patch(`/api/sites/${siteId}/excavations/${e.id}`)
      .send({ geometry: { type: 'Polygon', coordinates: [[at(0, 0), at(10, 10), at(10, 0), at(0, 10), at(0, 0)]] }, version: e.version });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.geometry).toMatch(/must not cross itself/);
    const moved = await as.coordinator.patch(`/api/sites/${siteId}/excavations/${e.id}`).send({
      geometry: { type: 'Polygon', coordinates: [[at(0, 0), at(9_000, 0), at(9_000, 6), at(0, 6), at(0, 0)]] },
      version: e.version,
    });
    expect(moved.status).toBe(400);
    expect(moved.body.error.fields.geometry).toMatch(/within 5 km/);
  });
});

/** A multipart upload of `content` as `name` in field `file`, with text fields. */
function upload(
  agent: Agent,
  path: string,
  content: Buffer | string,
  name: string,
  fields: Record<string, string> = {},
  method: 'post' | 'put' = 'post',
) {
  let r = agent[method](path);
  for (const [k, v] of Object.entries(fields)) r = r.field(k, v);
  return r.attach('file', Buffer.isBuffer(content) ? content : Buffer.from(content), name);
}

describe('GeoJSON export and import', () => {
  const importTo = (agent: Agent, site: number, doc: unknown, fields: Record<string, string> = {}) =>
    upload(agent, `/api/sites/${site}/excavations/import`, typeof doc === 'string' ? doc : JSON.stringify(doc), 'register.geojson', fields);
  const feature = (e: ExcavationInput) => {
    const { geometry, ...properties } = e;
    return { type: 'Feature', geometry, properties };
  };

  it('refuses a file that is not JSON, naming the file', async () => {
    const before = await count();
    const r = await importTo(as.coordinator, siteId, 'reference,depth\nT9,2.0\n');
    expect(r.status).toBe(400);
    expect(r.body.error.fields.file).toMatch(/is not JSON/);
    const notCollection = await importTo(as.coordinator, siteId, { type: 'Feature', geometry: null, properties: {} });
    expect(notCollection.status).toBe(400);
    expect(notCollection.body.error.fields.file).toMatch(/FeatureCollection/);
    expect(await count()).toBe(before);
  });

  it('refuses a feature of the wrong geometry type and imports nothing', async () => {
    const good = trench();
    const r = await importTo(as.coordinator, siteId, {
      type: 'FeatureCollection',
      features: [
        feature(good),
        {
          type: 'Feature',
          geometry: { type: 'Point', coordinates: at(5, 5) },
          properties: { reference: ref('PT'), name: 'A point', depth: 2, supportType: 'trench-box', soil: good.soil },
        },
      ],
    });
    expect(r.status).toBe(400);
    expect(r.body.report.imported).toEqual([]);
    expect(r.body.report.refused).toHaveLength(1);
    expect(r.body.report.refused[0].index).toBe(1);
    expect(r.body.report.refused[0].reasons).toEqual({
      'geometry.type': 'must be a LineString (a trench centre line) or a Polygon (a pit outline), not "Point"',
    });
    expect(await count(good.reference)).toBe(0);
  });

  it('refuses the whole file when one feature among good ones is bad, and says which and why', async () => {
    const goods = [trench(), pit(), trench({ geometry: { type: 'LineString', coordinates: [at(-100, 90), at(-60, 95)] } })];
    const bad = trench({ depth: 0 });
    const before = await count();
    const r = await importTo(as.coordinator, siteId, {
      type: 'FeatureCollection',
      features: [feature(goods[0]), feature(goods[1]), feature(bad), feature(goods[2])],
    });
    expect(r.status).toBe(400);
    expect(r.body.error.message).toMatch(/Nothing was imported: 1 of 4 features was refused/);
    expect(r.body.report.refused).toEqual([{ index: 2, reference: bad.reference, reasons: { depth: 'must be greater than 0 m' } }]);
    expect(r.body.error.fields).toEqual({ 'features[2].depth': 'must be greater than 0 m' });
    expect(await count()).toBe(before);
  });

  it('exports the site as a FeatureCollection that imports back to the same geometries', async () => {
    const made = [trench({ geometry: { type: 'LineString', coordinates: [at(-30, 150), at(0, 150), at(20, 170)] } }), pit()];
    for (const e of made) expect((await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(e)).status).toBe(201);

    const exp = await as.operator.get(`/api/sites/${siteId}/excavations.geojson`);
    expect(exp.status).toBe(200);
    expect(exp.headers['content-type']).toMatch(/application\/geo\+json/);
    expect(exp.headers['content-disposition']).toMatch(/attachment; filename="alder-marsh-pumping-station-excavations.geojson"/);
    const fc = JSON.parse(exp.text);
    expect(fc.type).toBe('FeatureCollection');
    const exported = fc.features.filter((f: { properties: { reference: string } }) =>
      made.some((m) => m.reference === f.properties.reference),
    );
    expect(exported).toHaveLength(2);
    expect(exported[0].properties).toMatchObject({ depth: expect.any(Number), supportType: expect.any(String), soil: expect.any(Array) });

    // Into a new site at the same origin: every feature is created with the same geometry.
    const admin = as.admin;
    const fresh = (
      await admin
        .post('/api/sites')
        .send({ name: `Import target ${randomUUID().slice(0, 6)}`, latitude: origin.latitude, longitude: origin.longitude })
    ).body.site;
    const imp = await importTo(admin, fresh.id, fc);
    expect(imp.status, JSON.stringify(imp.body)).toBe(200);
    expect(imp.body.report.imported).toHaveLength(fc.features.length);
    expect(imp.body.report.imported.every((i: { action: string }) => i.action === 'created')).toBe(true);
    const back = (await admin.get(`/api/sites/${fresh.id}/excavations`)).body.excavations as Excavation[];
    for (const f of fc.features) {
      const e = back.find((x) => x.reference === f.properties.reference)!;
      expect(e.geometry).toEqual(f.geometry);
      expect(e).toMatchObject({
        depth: f.properties.depth,
        width: f.properties.width,
        soil: f.properties.soil,
        supportType: f.properties.supportType,
      });
    }

    // Into the same site: "add" refuses existing references; "replace" updates them in place.
    const add = await importTo(as.coordinator, siteId, { type: 'FeatureCollection', features: exported });
    expect(add.status).toBe(400);
    expect(add.body.report.refused.map((r: { reasons: Record<string, string> }) => r.reasons.reference)).toEqual([
      expect.stringMatching(/already used/),
      expect.stringMatching(/already used/),
    ]);
    const replace = await importTo(as.coordinator, siteId, { type: 'FeatureCollection', features: exported }, { mode: 'replace' });
    expect(replace.status).toBe(200);
    expect(replace.body.report.imported.map((i: { action: string }) => i.action)).toEqual(['updated', 'updated']);
  });
});

describe('uploads: design drawings and the site plan', () => {
  const pdf = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
  // An ELF executable header (the start of any Linux program), named as a PDF.
  const elf = Buffer.concat([Buffer.from([0x7f, 0x45, 0x4c, 0x46, 0x02, 0x01, 0x01, 0x00]), Buffer.alloc(56)]);
  // A Windows executable starts with "MZ" and points to a "PE\0\0" header.
  const pe = Buffer.alloc(256);
  pe.write('MZ', 0, 'latin1');
  pe.writeUInt32LE(0x80, 0x3c);
  pe.write('PE\0\0', 0x80, 'latin1');
  const png = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==', 'base64');

  it('attaches a PDF drawing that members can read, and refuses an executable renamed .pdf', async () => {
    const e = (await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(pit())).body.excavation as Excavation;
    const path = `/api/sites/${siteId}/excavations/${e.id}/drawing`;
    for (const program of [elf, pe]) {
      const r = await upload(as.coordinator, path, program, 'TW-108 rev C.pdf');
      expect(r.status).toBe(400);
      expect(r.body.error.fields).toEqual({ file: 'must be a PDF' });
    }
    expect((await upload(as.operator, path, pdf, 'drawing.pdf')).status).toBe(403);
    const ok = await upload(as.coordinator, path, pdf, 'TW-108 rev C.pdf');
    expect(ok.status).toBe(200);
    expect(ok.body.excavation.drawing).toMatchObject({ name: 'TW-108 rev C.pdf', size: pdf.length });
    expect(ok.body.excavation.version).toBe(e.version + 1);
    const file = await as.operator.get(`/api/uploads/${ok.body.excavation.drawing.id}`);
    expect(file.status).toBe(200);
    expect(file.headers['content-type']).toBe('application/pdf');
    const removed = await as.coordinator.delete(path);
    expect(removed.body.excavation.drawing).toBeNull();
  });

  it('answers 413 to a drawing over 20 MB and a site plan over 10 MB', async () => {
    const e = (await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(pit())).body.excavation as Excavation;
    const big = Buffer.concat([pdf, Buffer.alloc(20 * 1024 * 1024)]);
    const r = await upload(as.coordinator, `/api/sites/${siteId}/excavations/${e.id}/drawing`, big, 'huge.pdf');
    expect(r.status).toBe(413);
    expect(r.body.error.fields).toEqual({ file: 'is too large' });
    const bigImage = Buffer.concat([png, Buffer.alloc(10 * 1024 * 1024)]);
    const corners = {
      south: String(origin.latitude - 0.001),
      west: String(origin.longitude - 0.002),
      north: String(origin.latitude + 0.001),
      east: String(origin.longitude + 0.002),
    };
    const p = await upload(as.coordinator, `/api/sites/${siteId}/plan`, bigImage, 'plan.png', corners, 'put');
    expect(p.status).toBe(413);
  });

  it('pins a site plan image by two corners, changes its opacity, and refuses a PDF or crossed corners', async () => {
    // A site of its own, so the demo site's plan is left alone.
    const site = (
      await as.admin
        .post('/api/sites')
        .send({ name: `Plan site ${randomUUID().slice(0, 6)}`, latitude: origin.latitude, longitude: origin.longitude })
    ).body.site;
    const path = `/api/sites/${site.id}/plan`;
    const corners = {
      south: String(origin.latitude - 0.001),
      west: String(origin.longitude - 0.002),
      north: String(origin.latitude + 0.001),
      east: String(origin.longitude + 0.002),
    };
    expect((await as.admin.get(path)).body.plan).toBeNull();
    const asPut = (body: Buffer, name: string, fields: Record<string, string>) => upload(as.admin, path, body, name, fields, 'put');
    const wrongType = await asPut(pdf, 'plan.png', corners);
    expect(wrongType.status).toBe(400);
    expect(wrongType.body.error.fields).toEqual({ file: 'must be a PNG or JPEG image' });
    const crossed = await asPut(png, 'plan.png', { ...corners, north: corners.south });
    expect(crossed.status).toBe(400);
    expect(crossed.body.error.fields).toEqual({ north: 'must be north of the south edge' });
    const ok = await asPut(png, 'plan.png', { ...corners, opacity: '0.5' });
    expect(ok.status).toBe(200);
    expect(ok.body.plan).toMatchObject({ name: 'plan.png', opacity: 0.5, bounds: { south: origin.latitude - 0.001 } });
    const faded = await as.admin.patch(path).send({ opacity: 0.3 });
    expect(faded.body.plan.opacity).toBe(0.3);
    expect((await as.admin.patch(path).send({ opacity: 2 })).body.error.fields).toEqual({ opacity: 'must be from 0 to 1' });
    expect((await as.admin.get(`/api/uploads/${ok.body.plan.uploadId}`)).headers['content-type']).toBe('image/png');
    expect((await as.admin.delete(path)).status).toBe(204);
    expect((await as.admin.get(path)).body.plan).toBeNull();
  });
});

describe("the list's stored answers (excavations.answer, migration 0015)", () => {
  const listed = async (id: number) =>
    ((await as.operator.get(`/api/sites/${siteId}/excavations`)).body.excavations as Excavation[]).find((x) => x.id === id);
  // The excavation read from its columns, as every other answer reads it.
  const one = async (id: number) => JSON.parse(JSON.stringify((await loadExcavations(t.deps.db, siteId, [id]))[0])) as Excavation;
  const stored = (id: number) =>
    t.deps.db.selectFrom('excavations').select(['answer', 'answer_key', 'version']).where('id', '=', id).executeTakeFirstOrThrow();

  it('are written with every change, so the list says what the excavation itself says', async () => {
    const e = (await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(pit())).body.excavation as Excavation;
    const check = async (version: number) => {
      const row = await stored(e.id);
      expect(row.version).toBe(version);
      expect(row.answer_key).toMatch(new RegExp(`:${version}$`));
      expect(JSON.parse(row.answer!)).toEqual(await one(e.id));
      expect(await listed(e.id)).toEqual(await one(e.id));
    };
    await check(1);
    await as.coordinator
      .patch(`/api/sites/${siteId}/excavations/${e.id}`)
      .send({ depth: 5.5, name: 'Deeper chamber', version: 1 })
      .expect(200);
    await check(2);
    expect(await listed(e.id)).toMatchObject({ depth: 5.5, name: 'Deeper chamber' });
    const pdf = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
    expect((await upload(as.coordinator, `/api/sites/${siteId}/excavations/${e.id}/drawing`, pdf, 'TW-9 rev A.pdf')).status).toBe(200);
    await check(3);
    expect((await listed(e.id))?.drawing).toMatchObject({ name: 'TW-9 rev A.pdf', size: pdf.length });
    const { geometry, ...properties } = pit({ reference: e.reference, depth: 6 });
    const file = { type: 'FeatureCollection', features: [{ type: 'Feature', geometry, properties }] };
    const imported = await upload(as.coordinator, `/api/sites/${siteId}/excavations/import`, JSON.stringify(file), 'pits.geojson', {
      mode: 'replace',
    });
    expect(imported.status).toBe(200);
    await check(4);
    expect(await listed(e.id)).toMatchObject({ depth: 6 });
  });

  it('are not used once stale (another format, an older version): the row is answered from its columns and its answer written again', async () => {
    const e = (await as.coordinator.post(`/api/sites/${siteId}/excavations`).send(trench())).body.excavation as Excavation;
    const truth = await one(e.id);
    const before = await stored(e.id);
    for (const key of [`0.older-format:${before.version}`, `${before.answer_key!.split(':')[0]}:${before.version - 1}`, null]) {
      await t.deps.db
        .updateTable('excavations')
        .set({ answer: JSON.stringify({ ...truth, depth: 99 }), answer_key: key })
        .where('id', '=', e.id)
        .execute();
      expect(await listed(e.id)).toEqual(truth);
      expect(await stored(e.id)).toEqual(before);
    }
  });
});

describe("a whole site's list answer, kept and sent again while the site's excavations are unchanged", () => {
  // Sites of this file alone (the demo site is written by other files at the same time), each with its own coordinator.
  const sites: Record<'own' | 'beside', { id: number; agent: Agent }> = {} as never;
  let other: Agent;
  beforeAll(async () => {
    const organisation_id = await demoOrganisationId(t.deps);
    for (const which of ['own', 'beside'] as const) {
      const { id } = await t.deps.db
        .insertInto('sites')
        .values({ organisation_id, name: `Kept answers ${which} (test)`, latitude: origin.latitude, longitude: origin.longitude })
        .returning('id')
        .executeTakeFirstOrThrow();
      const email = unique(`kept-${which}`);
      await addPerson(t.deps, { email, name: `Kept ${which}`, member: { siteId: id, role: 'coordinator' } });
      sites[which] = { id, agent: await signedIn(t.app, email) };
    }
    const o = await makeOrganisation(t.deps, 'Kept');
    other = await signedIn(t.app, o.coordinatorEmail);
  });

  /** The site's excavations read from their columns now, as the wire has them. */
  const truth = async (site: number) => JSON.parse(JSON.stringify(await loadExcavations(t.deps.db, site))) as Excavation[];
  /** Lists the site; returns whether the kept answer was sent, after checking that the list is the truth. */
  const listed = async (which: 'own' | 'beside' = 'own') => {
    const before = siteAnswerReuse.count;
    const r = await sites[which].agent.get(`/api/sites/${sites[which].id}/excavations`).expect(200);
    const reused = siteAnswerReuse.count - before;
    expect(r.body).toEqual({ excavations: await truth(sites[which].id), next: null });
    return reused;
  };
  /** After a write: the first list is read afresh and right, the next is the kept one and still right. */
  const afterWrite = async (which: 'own' | 'beside' = 'own') => {
    expect(await listed(which)).toBe(0);
    expect(await listed(which)).toBe(1);
  };

  it('is sent again (compressed) only while nothing changed, after every kind of write', async () => {
    const own = sites.own;
    const path = `/api/sites/${own.id}/excavations`;
    const first = (await own.agent.post(path).send(trench())).body.excavation as Excavation;
    await afterWrite();
    // Sent as gzip to a client that takes it, as plain JSON to one that does not: the same answer.
    const gz = await own.agent.get(path).set('accept-encoding', 'gzip').expect(200);
    expect(gz.headers['content-encoding']).toBe('gzip');
    const plain = await own.agent.get(path).set('accept-encoding', 'identity').expect(200);
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body).toEqual(gz.body);

    const second = (await own.agent.post(path).send(pit())).body.excavation as Excavation;
    await afterWrite();
    await own.agent.patch(`${path}/${first.id}`).send({ depth: 3.1, name: 'Kept trench', version: first.version }).expect(200);
    await afterWrite();
    const pdf = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
    expect((await upload(own.agent, `${path}/${second.id}/drawing`, pdf, 'Kept pit.pdf')).status).toBe(200);
    await afterWrite();
    const { geometry, ...properties } = pit({ reference: second.reference, depth: 6.5 });
    const file = { type: 'FeatureCollection', features: [{ type: 'Feature', geometry, properties }] };
    expect((await upload(own.agent, `${path}/import`, JSON.stringify(file), 'kept.geojson', { mode: 'replace' })).status).toBe(200);
    await afterWrite();
    // A write by anything else (a tool), even one that leaves the row's version and so its stored
    // answer's key as they were (the row's own answer is then that tool's to store): not the kept one.
    await t.deps.db.updateTable('excavations').set({ notes: 'Seen outside' }).where('id', '=', first.id).execute();
    const before = siteAnswerReuse.count;
    await own.agent.get(path).expect(200);
    expect(siteAnswerReuse.count).toBe(before);
    await t.deps.db
      .updateTable('excavations')
      .set((eb) => ({ depth: 3.3, version: eb('version', '+', 1) }))
      .where('id', '=', first.id)
      .execute();
    // That row's answer is written again by the first read (not kept: the write changes the site), then kept.
    expect(await listed()).toBe(0);
    await afterWrite();
    expect((await own.agent.delete(`${path}/${second.id}`)).status).toBe(204);
    await afterWrite();
    // A page smaller than the site is never the kept whole.
    const page = await own.agent.get(`${path}?limit=1`).expect(200);
    expect(page.body.excavations).toHaveLength(1);
    expect(await listed()).toBe(1);
    const all = await own.agent.get(`${path}?limit=2`).expect(200);
    expect(all.body.excavations.map((e: Excavation) => e.id)).toEqual([first.id]);
  });

  it('never crosses sites or organisations, and access is checked before it is sent', async () => {
    const { own, beside } = sites;
    await own.agent.post(`/api/sites/${own.id}/excavations`).send(pit()).expect(201);
    await beside.agent.post(`/api/sites/${beside.id}/excavations`).send(trench()).expect(201);
    for (const which of ['own', 'beside'] as const) await listed(which);
    expect(await listed('own')).toBe(1);
    expect(await listed('beside')).toBe(1);
    // The kept answers are there, and still each reader hears only what they may see.
    expect((await own.agent.get(`/api/sites/${beside.id}/excavations`)).status).toBe(403);
    expect((await beside.agent.get(`/api/sites/${own.id}/excavations`)).status).toBe(403);
    expect((await other.get(`/api/sites/${own.id}/excavations`)).status).toBe(404);
    const ownIds = (await truth(own.id)).map((e) => e.id);
    const besideIds = (await truth(beside.id)).map((e) => e.id);
    expect(ownIds.some((id) => besideIds.includes(id))).toBe(false);
    // A change on one site leaves the other's kept answer in use.
    await beside.agent.post(`/api/sites/${beside.id}/excavations`).send(pit()).expect(201);
    expect(await listed('own')).toBe(1);
    await afterWrite('beside');
  });
  it('is read once for readers who come together, each of whom gets the site as it is', async () => {
    const { id, agent } = sites.beside;
    // A write (the answer kept for the site no longer fits it), then ten readers at once.
    await agent
      .post(`/api/sites/${id}/excavations`)
      .send(pit({ reference: 'KEPT-TOGETHER' }))
      .expect(201);
    const before = siteAnswerReuse.count;
    const answers = await Promise.all(Array.from({ length: 10 }, () => loadExcavationPage(t.deps.db, id, { limit: 500 })));
    // One of the ten read the database; the nine others waited for it and took its answer.
    expect(siteAnswerReuse.count - before).toBe(9);
    const wire = { excavations: await truth(id), next: null };
    expect(wire.excavations.map((e) => e.reference)).toContain('KEPT-TOGETHER');
    for (const a of answers) expect(JSON.parse(a.text)).toEqual(wire);
    // A reader after a change does not take the answer of a read under way before it.
    const under = loadExcavationPage(t.deps.db, id, { limit: 500 });
    await agent
      .post(`/api/sites/${id}/excavations`)
      .send(pit({ reference: 'KEPT-AFTER' }))
      .expect(201);
    const after = await loadExcavationPage(t.deps.db, id, { limit: 500 });
    await under;
    expect(JSON.parse(after.text)).toEqual({ excavations: await truth(id), next: null });
  });
});
