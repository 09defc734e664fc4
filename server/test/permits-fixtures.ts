import { randomUUID } from 'node:crypto';
import { sql } from 'kysely';
import request from 'supertest';
import type { LineString } from 'geojson';
import { localProjection } from '@shared/geometry';
import { shapeColumns, shapesOf } from '@shared/geometry/shapes';
import type { PermitCreateInput, PermitStatus, PlacedLoad } from '@shared/schemas/permits';
import { addPerson, demo, DEMO_PASSWORD, demoSiteId, signedIn, unique, type TestApp, demoOrganisationId } from './helpers';

/**
 * Fixtures of the permit tests: the demo site and people, a test trench of its own on the demo site
 * (an east-west pipe trench at a place of its own on the demo site, 30 m long, 1.0 m wide, 2.4 m deep, in hydraulic frames designed for
 * the customary 10 kPa), and the library's 21 t excavator placed north of it at a chosen clear
 * distance with its tracks parallel to the trench.
 */
export interface PermitWorld {
  t: TestApp;
  siteId: number;
  origin: [number, number];
  trenchId: number;
  trenchRef: string;
  /** The trench's middle in site-local metres (east, north of the site origin). */
  trenchCentre: [number, number];
  excavatorId: number;
  operatorId: number;
  supervisorId: number;
  coordinatorId: number;
  agents: Record<'admin' | 'coordinator' | 'supervisor' | 'operator' | 'outsider' | 'coordinator2', request.Agent>;
  coordinator2Email: string;
}

const TRENCH = { width: 1.0, depth: 2.4, length: 30 };
/** The 21 t excavator of the demo library: tracks 3.35 m × 0.6 m at 2.2 m centres. */
const EXCAVATOR = { name: 'Excavator 21 t', gauge: 2.2, shoe: 0.6 };

/** A fresh test trench on the demo site for the world (so earlier permits on the old one are not counted). */
export async function newTrench(w: PermitWorld): Promise<void> {
  const t = await addTrench(w.t, w.siteId, w.origin);
  w.trenchId = t.id;
  w.trenchRef = t.reference;
  w.trenchCentre = t.centre;
}

/**
 * Each test trench gets a place of its own north of the demo excavations, so that a load beside one
 * is never also beside another (the check counts every open excavation a load reaches).
 */
async function freshCentre(t: TestApp): Promise<[number, number]> {
  // 100 × 100 places, 60 m apart east–west and 25 m north–south: all within 4.3 km of the origin
  // (the register refuses anything beyond 5 km, and the tests export and import the site). The
  // place comes from a database sequence (made in global-setup.ts), so test files running at once
  // never share one.
  const { rows } = await sql<{ n: number }>`select nextval('test_trench_slot')::int as n`.execute(t.deps.db);
  const slot = rows[0].n % 10_000;
  return [(slot % 100) * 60 - 3000, 500 + Math.floor(slot / 100) * 25];
}

/** Another open test trench, parallel to the world's, its centre line `north` metres north of it. */
export async function trenchBeside(w: PermitWorld, north: number): Promise<{ id: number; reference: string }> {
  return addTrench(w.t, w.siteId, w.origin, [w.trenchCentre[0], w.trenchCentre[1] + north]);
}

export async function addTrench(
  t: TestApp,
  siteId: number,
  origin: [number, number],
  at?: [number, number],
): Promise<{ id: number; reference: string; centre: [number, number] }> {
  const proj = localProjection(origin);
  const reference = `TT-${randomUUID().slice(0, 6)}`;
  const [cx, cy] = at ?? (await freshCentre(t));
  const geometry: LineString = {
    type: 'LineString',
    coordinates: [proj.toWgs84([cx - TRENCH.length / 2, cy]), proj.toWgs84([cx + TRENCH.length / 2, cy])],
  };
  const shapes = shapeColumns(
    shapesOf({ kind: 'trench', geometry, width: TRENCH.width, depth: TRENCH.depth }, { longitude: origin[0], latitude: origin[1] }),
  );
  const row = await t.deps.db
    .insertInto('excavations')
    .values({
      site_id: siteId,
      reference,
      name: 'Test pipe trench',
      kind: 'trench',
      geometry: JSON.stringify(geometry),
      ...shapes,
      width: TRENCH.width,
      depth: TRENCH.depth,
      state: 'open',
      support_type: 'hydraulic-frames',
      design_surcharge: 10,
      soil: JSON.stringify([{ top: 0, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 30, cohesion: 0 }]),
    })
    .returning(['id', 'reference'])
    .executeTakeFirstOrThrow();
  return { ...row, centre: [cx, cy] };
}

export async function makeWorld(t: TestApp): Promise<PermitWorld> {
  const siteId = await demoSiteId(t.deps);
  const site = await t.deps.db.selectFrom('sites').select(['latitude', 'longitude']).where('id', '=', siteId).executeTakeFirstOrThrow();
  const trench = await addTrench(t, siteId, [site.longitude, site.latitude]);
  const trenchRef = trench.reference;
  const excavator = await t.deps.db.selectFrom('plant_items').select('id').where('name', '=', EXCAVATOR.name).executeTakeFirstOrThrow();
  const ids = await t.deps.db
    .selectFrom('users')
    .select(['id', 'email'])
    .where('email', 'in', [demo.operator, demo.supervisor, demo.coordinator])
    .execute();
  const idOf = (e: string) => ids.find((u) => u.email === e)!.id;

  const coordinator2Email = unique('coordinator2');
  await addPerson(t.deps, { email: coordinator2Email, name: 'Cora Second (test coordinator)', member: { siteId, role: 'coordinator' } });
  const outsiderEmail = unique('outsider');
  const other = await t.deps.db
    .insertInto('sites')
    .values({
      organisation_id: await demoOrganisationId(t.deps),
      name: `Other site ${randomUUID().slice(0, 4)}`,
      latitude: 51,
      longitude: 0,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await addPerson(t.deps, { email: outsiderEmail, name: 'Otto Outsider', member: { siteId: other.id, role: 'coordinator' } });

  const agents = {
    admin: await signedIn(t.app, demo.admin),
    coordinator: await signedIn(t.app, demo.coordinator),
    supervisor: await signedIn(t.app, demo.supervisor),
    operator: await signedIn(t.app, demo.operator),
    outsider: await signedIn(t.app, outsiderEmail),
    coordinator2: await signedIn(t.app, coordinator2Email),
  } as PermitWorld['agents'];
  return {
    t,
    siteId,
    origin: [site.longitude, site.latitude],
    trenchId: trench.id,
    trenchRef,
    trenchCentre: trench.centre,
    excavatorId: excavator.id,
    operatorId: idOf(demo.operator),
    supervisorId: idOf(demo.supervisor),
    coordinatorId: idOf(demo.coordinator),
    agents,
    coordinator2Email,
  };
}

/** The excavator north of the world's trench, its near track `clear` metres from the trench edge, tracks parallel to it. */
export function excavatorAt(w: PermitWorld, clear: number, id = 'exc'): PlacedLoad {
  const proj = localProjection(w.origin);
  const centreNorth = TRENCH.width / 2 + clear + EXCAVATOR.shoe / 2 + EXCAVATOR.gauge / 2;
  const [cx, cy] = w.trenchCentre;
  return {
    id,
    kind: 'plant',
    label: 'Excavator',
    plantItemId: w.excavatorId,
    position: proj.toWgs84([cx, cy + centreNorth]),
    rotation: 90,
  };
}

export function hoursFrom(base: Date, h: number): string {
  return new Date(base.getTime() + h * 3600_000).toISOString();
}

/** A load permit body on the world's trench. */
export function permitBody(w: PermitWorld, over: Partial<PermitCreateInput> = {}): PermitCreateInput {
  const now = w.t.deps.now();
  return {
    siteId: w.siteId,
    kind: 'load',
    description: 'Excavator loading out spoil beside the trench',
    windowStart: hoursFrom(now, -1),
    windowEnd: hoursFrom(now, 8),
    excavationIds: [w.trenchId],
    loads: [excavatorAt(w, 4)],
    // Named and not yet briefed: an approved permit waits (the schedule tests brief them).
    operatorIds: [w.operatorId],
    ...over,
  };
}

export async function createPermit(w: PermitWorld, over: Partial<PermitCreateInput> = {}) {
  const r = await w.agents.supervisor.post('/api/permits').send(permitBody(w, over));
  if (r.status !== 201) throw new Error(`create permit: ${r.status} ${JSON.stringify(r.body)}`);
  return r.body.permit as { id: number; number: string; version: number; status: PermitStatus };
}

/** Sets a permit's status directly (a fixture for the status-machine table; the real paths are tested too). */
export async function forceStatus(w: PermitWorld, id: number, status: PermitStatus): Promise<number> {
  const r = await w.t.deps.db
    .updateTable('permits')
    .set((eb) => ({ status, version: eb('version', '+', 1) }))
    .where('id', '=', id)
    .returning('version')
    .executeTakeFirstOrThrow();
  return r.version;
}

export function act(agent: request.Agent, id: number, body: Record<string, unknown>) {
  return agent.post(`/api/permits/${id}/transitions`).send(body);
}

/** Submits (supervisor) and approves (coordinator) a draft. */
export async function submitAndApprove(w: PermitWorld, id: number, approve: Record<string, unknown> = {}) {
  const s = await act(w.agents.supervisor, id, { action: 'submit', version: await version(w, id) });
  if (s.status !== 200) throw new Error(`submit: ${s.status} ${JSON.stringify(s.body)}`);
  const a = await act(w.agents.coordinator, id, { action: 'approve', version: s.body.permit.version, password: DEMO_PASSWORD, ...approve });
  if (a.status !== 200) throw new Error(`approve: ${a.status} ${JSON.stringify(a.body)}`);
  return a.body.permit;
}

export async function version(w: PermitWorld, id: number): Promise<number> {
  const r = await w.t.deps.db.selectFrom('permits').select('version').where('id', '=', id).executeTakeFirstOrThrow();
  return r.version;
}
