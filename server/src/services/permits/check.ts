import { sql } from 'kysely';
import { jsonArrayFrom, jsonObjectFrom } from 'kysely/helpers/postgres';
import { PREPARED, type Db } from '@db/database';
import type { Stored } from '@shared/schemas/stored';
import { contentKey, frozen, Kept } from '@shared/kept';
import { runCheck } from '@shared/engineering';
import {
  CheckInputError,
  checkExcavationOf,
  cumulativeCheck,
  groupStandoff,
  PlacementError,
  type CheckEngine,
  type CheckExcavation,
  type OtherPermit,
  type PlantForCheck,
} from '@shared/permits/check';
import {
  countedStatuses,
  editableStatuses,
  type CheckProposal,
  type ExcavationSnapshot,
  type PermitCheck,
  type PermitStatus,
  type PlacedLoad,
  type PlantSnapshot,
  storedLoads,
  storedPlantSnapshot,
} from '@shared/schemas/permits';
import { storedElements, type PlantElement } from '@shared/schemas/plant';
import { checkInputFields, storedGeometry, storedOutline, storedSoil } from '@shared/schemas/excavations';
import { badRequest, HttpError, notFound } from '../../http';
import { loadExcavations } from '../excavations';
import { withCurrentRevision } from './read';

/** The named excavations of the site, in the order named. */
export async function excavationsFor(db: Db, siteId: number, ids: number[]): Promise<CheckExcavation[]> {
  const list = await loadExcavations(db, siteId, ids);
  return ids.flatMap((id) => list.filter((e) => e.id === id)).map(checkExcavationOf);
}

const plantIdsOf = (loads: PlacedLoad[]) => [...new Set(loads.flatMap((l) => (l.kind === 'plant' ? [l.plantItemId] : [])))];

/**
 * The plant items the loads name: from the revision's frozen machines when it has them (from
 * review on), else from the library as it is now (drafts, and revisions stored before snapshots).
 */
export async function plantFor(
  db: Db,
  loads: PlacedLoad[],
  snapshot: PlantSnapshot | null = null,
  known: Map<number, PlantForCheck> = new Map(),
): Promise<Map<number, PlantForCheck>> {
  const frozen = new Map([...known, ...(snapshot ? machinesOf(snapshot) : [])]);
  const ids = plantIdsOf(loads).filter((id) => !frozen.has(id));
  if (!ids.length) return frozen;
  return addPlant(
    frozen,
    await db
      .selectFrom('plant_items')
      .select(['id', 'name', 'operating_mass', 'design_factor', 'elements'])
      .where('id', 'in', ids)
      .execute(),
  );
}

/** Machines of the library as the check takes them, from their rows. */
export const plantOf = (rows: Parameters<typeof addPlant>[1]) => addPlant(new Map(), rows);

function addPlant(
  into: Map<number, PlantForCheck>,
  rows: { id: number; name: string; operating_mass: number; design_factor: number; elements: Stored<PlantElement[]> }[],
): Map<number, PlantForCheck> {
  for (const r of rows)
    into.set(r.id, {
      id: r.id,
      name: r.name,
      operatingMass: r.operating_mass,
      designFactor: r.design_factor,
      elements: storedElements(r.elements),
    });
  return into;
}

/** The machines of a snapshot as the check takes them. */
export function machinesOf(snapshot: PlantSnapshot): Map<number, PlantForCheck> {
  return new Map(
    snapshot.machines.map((m) => [
      m.id,
      { id: m.id, name: m.name, operatingMass: m.operatingMass, designFactor: m.designFactor, elements: m.elements },
    ]),
  );
}

/** The library's machines that the loads name, as they are now: frozen on a revision sent for review. */
async function takePlantSnapshot(db: Db, loads: PlacedLoad[], now: Date): Promise<PlantSnapshot> {
  const ids = plantIdsOf(loads);
  const rows = ids.length
    ? await db
        .selectFrom('plant_items')
        .select(['id', 'name', 'operating_mass', 'design_factor', 'elements', 'version', 'updated_at'])
        .where('id', 'in', ids)
        .orderBy('id')
        .execute()
    : [];
  return {
    takenAt: now.toISOString(),
    machines: rows.map((r) => ({
      id: r.id,
      name: r.name,
      operatingMass: r.operating_mass,
      designFactor: r.design_factor,
      elements: storedElements(r.elements),
      version: r.version,
      updatedAt: new Date(r.updated_at).toISOString(),
    })),
  };
}

/** The check inputs of the excavations a check used, from the register as it is now. */
async function excavationSnapshotOf(db: Db, siteId: number, check: PermitCheck, now: Date): Promise<ExcavationSnapshot> {
  const list = await loadExcavations(
    db,
    siteId,
    check.excavations.map((e) => e.excavationId),
  );
  return {
    takenAt: now.toISOString(),
    excavations: list.map((e) => ({
      id: e.id,
      reference: e.reference,
      name: e.name,
      version: e.version,
      ...Object.fromEntries(checkInputFields.map((k) => [k, e[k]])),
    })),
  };
}

function overlappingQuery(
  db: Db,
  siteId: number,
  exceptPermitId: number | null,
  excavationIds: number[],
  window: { start: Date; end: Date },
  opts: { withOpen?: boolean },
) {
  // withOpen: the site's open excavations count too (found in the same query).
  const named = sql`${sql.val(excavationIds)}::int[]`;
  const ids = opts.withOpen
    ? sql`(${named} || array(select e.id from excavations e where e.site_id = ${siteId} and e.state = 'open'))`
    : named;
  let q = withCurrentRevision(db)
    .select(['p.id', 'p.number', 'p.status', 'r.window_start', 'r.window_end', 'r.excavation_ids', 'r.loads', 'r.plant_snapshot'])
    .where('p.site_id', '=', siteId)
    .where('p.status', 'in', countedStatuses as PermitStatus[])
    .where(sql<boolean>`r.excavation_ids && ${ids}`)
    .where('r.window_start', '<', window.end)
    .where('r.window_end', '>', window.start);
  if (exceptPermitId !== null) q = q.where('p.id', '!=', exceptPermitId);
  return q.orderBy('p.seq');
}

/** A row of `overlappingQuery` (timestamps as Date, or as text when read through JSON). */
function otherPermitOf(r: {
  id: number;
  number: string;
  status: PermitStatus;
  window_start: Date | string;
  window_end: Date | string;
  excavation_ids: number[];
  loads: Stored<PlacedLoad[]>;
  plant_snapshot: Stored<PlantSnapshot> | null;
}): OtherPermit & { plantSnapshot: PlantSnapshot | null } {
  return {
    id: r.id,
    number: r.number,
    status: r.status,
    windowStart: new Date(r.window_start).toISOString(),
    windowEnd: new Date(r.window_end).toISOString(),
    excavationIds: r.excavation_ids,
    loads: storedLoads(r.loads),
    plantSnapshot: storedPlantSnapshot(r.plant_snapshot),
  };
}

/**
 * The site's excavations as the check takes them (the named ones, and every open one), with their
 * stored ground outlines: only the columns the check reads, in one query.
 */
function checkExcavationQuery(db: Db, siteId: number, named: number[]) {
  // `= any` rather than `in (…)`: one text whatever the count, so the check's read stays prepared (PREPARED).
  return db
    .selectFrom('excavations')
    .select([
      'id',
      'reference',
      'name',
      'kind',
      'geometry',
      'width',
      'soil',
      'state',
      'outline',
      'depth',
      'groundwater_depth',
      'design_surcharge',
      'rated_pressure',
      'pressure_state',
      'wall_friction',
      'restraint',
    ])
    .where('site_id', '=', siteId)
    .where((eb) => eb.or([eb('state', '=', 'open'), sql<boolean>`id = any(${sql.val(named)}::int[])`]))
    .orderBy('reference');
}

type CheckExcavationRow = Awaited<ReturnType<ReturnType<typeof checkExcavationQuery>['execute']>>[number];

function checkExcavationRowOf(r: CheckExcavationRow): CheckExcavation & { state: string } {
  return {
    state: r.state,
    ...checkExcavationOf({
      id: r.id,
      reference: r.reference,
      name: r.name,
      kind: r.kind,
      geometry: storedGeometry(r.geometry),
      width: r.width,
      soil: storedSoil(r.soil),
      outline: storedOutline(r.outline),
      depth: r.depth,
      groundwaterDepth: r.groundwater_depth,
      designSurcharge: r.design_surcharge,
      ratedPressure: r.rated_pressure,
      pressureState: r.pressure_state,
      wallFriction: r.wall_friction,
      restraint: r.restraint,
    }),
  };
}

/**
 * The engine's two calls, memoised by their whole argument (both are pure functions of it): a
 * permit checked again with nothing changed (the permit page, a re-check of every permit of an
 * excavation) costs a lookup instead of the standoff search. Keyed by content (shared/kept.ts, which
 * tells NaN, ±Infinity, −0 and an absent field apart where JSON would not) and bounded. Answers are
 * frozen and handed out as they are: a caller copies what it changes (a copy of the whole answer
 * cost more than the rest of the route's own work).
 */
const MEMO_ENTRIES = 500;
const memoEngine: CheckEngine = {
  runCheck: memoised((request, options) => runCheck(request, options)),
  groupStandoff: memoised((base, group) => groupStandoff(base, group)),
};

function memoised<A extends unknown[], R>(fn: (...args: A) => R): (...args: A) => R {
  const memo = new Kept<R>(MEMO_ENTRIES);
  return (...args: A) => memo.keep(contentKey(args), () => frozen(fn(...args)));
}

interface CheckSubject {
  siteId: number;
  permitId: number | null;
  number: string;
  windowStart: Date;
  windowEnd: Date;
  excavationIds: number[];
  loads: PlacedLoad[];
  method: 'dispersion-45' | 'elastic';
  /** The machines frozen when the permit was sent for review (null: the library as it is now). */
  plantSnapshot: PlantSnapshot | null;
}

/**
 * The authoritative cumulative check of a permit's content (shared/permits/check.ts) against the
 * database as it is now. A load touching an excavation answers 400 naming `loads[i]`; figures the
 * calculation refuses (docs/calculation.md, "Refusals") answer 400 naming the field.
 */
export async function runPermitCheck(db: Db, s: CheckSubject, now: Date): Promise<PermitCheck> {
  // One query (one round trip): the site's excavations the check takes (the named ones and every
  // open one, with stored outlines), the other permits that may count, this permit's machines and
  // the site's origin and clearance. The library's machines of other permits follow only if some are
  // still missing. Every other open excavation is checked when a load reaches it (passed over
  // cheaply by its stored outline when no load comes near it).
  const ownIds = plantIdsOf(s.loads).filter((id) => !s.plantSnapshot?.machines.some((m) => m.id === id));
  const othersQuery = overlappingQuery(
    db,
    s.siteId,
    s.permitId,
    s.excavationIds,
    { start: s.windowStart, end: s.windowEnd },
    { withOpen: true },
  );
  const read = await db
    .selectNoFrom(() => [
      jsonArrayFrom(checkExcavationQuery(db, s.siteId, s.excavationIds)).as('excavations'),
      jsonArrayFrom(othersQuery).as('others'),
      // The library's machines that this permit's loads and the other permits' loads name, of the
      // site's organisation only (a machine of another organisation is as if absent).
      jsonArrayFrom(
        db
          .selectFrom('plant_items')
          .select(['id', 'name', 'operating_mass', 'design_factor', 'elements'])
          .where('organisation_id', '=', (eb) => eb.selectFrom('sites').select('organisation_id').where('id', '=', s.siteId))
          .where((eb) =>
            eb.or([
              sql<boolean>`id = any(${sql.val(ownIds)}::int[])`,
              sql<boolean>`id in (select (l->>'plantItemId')::int from (${othersQuery}) o, jsonb_array_elements(o.loads) l where l->>'kind' = 'plant')`,
            ]),
          ),
      ).as('plant'),
      jsonObjectFrom(db.selectFrom('sites').select(['latitude', 'longitude', 'minimum_clearance']).where('id', '=', s.siteId)).as('site'),
    ])
    .modifyFront(PREPARED)
    .executeTakeFirstOrThrow();
  const site = read.site;
  if (!site) throw notFound('That site');
  const all = read.excavations.map(checkExcavationRowOf);
  const candidates = read.others.map(otherPermitOf);
  const ownPlant = addPlant(s.plantSnapshot ? machinesOf(s.plantSnapshot) : new Map(), read.plant);
  const excavations = s.excavationIds.flatMap((id) => all.filter((e) => e.id === id));
  const nearby = all.filter((e) => e.state === 'open' && !s.excavationIds.includes(e.id));
  // Each permit's loads with its own machines: frozen from review on, the library's for the rest.
  const plant = await plantFor(
    db,
    candidates.flatMap((o) => o.loads),
    null,
    ownPlant,
  );
  const otherPlant = new Map(candidates.flatMap((o) => (o.plantSnapshot ? [[o.id, machinesOf(o.plantSnapshot)] as const] : [])));
  const others = candidates.map(({ plantSnapshot: _p, ...o }) => o);
  const missing = s.loads.findIndex((l) => l.kind === 'plant' && !plant.has(l.plantItemId));
  if (missing >= 0)
    throw badRequest('A load names a machine that is not in the plant library.', {
      [`loads[${missing}].plantItemId`]: 'is not in the plant library',
    });
  try {
    return cumulativeCheck({
      origin: [site.longitude, site.latitude],
      method: s.method,
      minimumClearance: site.minimum_clearance,
      permit: {
        id: s.permitId,
        number: s.number,
        windowStart: s.windowStart.toISOString(),
        windowEnd: s.windowEnd.toISOString(),
        loads: s.loads,
      },
      excavations,
      nearby,
      plant,
      others,
      otherPlant,
      now,
      engine: memoEngine,
    });
  } catch (err) {
    if (err instanceof PlacementError) {
      const fields: Record<string, string> = {};
      for (const r of err.refusals) fields[`loads[${r.index}]`] ??= r.message;
      throw badRequest(`Some loads cannot be checked where they are: ${err.refusals.map((r) => r.message).join('; ')}.`, fields);
    }
    if (err instanceof CheckInputError) {
      // A load's own field, or an excavation's figures (named by its reference) that the check refuses.
      const key = err.field.startsWith('loads[') ? err.field : 'excavationIds';
      throw badRequest(`Cannot check: ${err.field} ${err.reason}.`, {
        [key]: key === 'excavationIds' ? `${err.field} ${err.reason}` : err.reason,
      });
    }
    throw err;
  }
}

async function subjectOf(db: Db, permitId: number): Promise<{ subject: CheckSubject; revisionId: number; status: PermitStatus }> {
  const r = await withCurrentRevision(db)
    .select([
      'p.id',
      'p.site_id',
      'p.number',
      'p.status',
      'r.id as revision_id',
      'r.window_start',
      'r.window_end',
      'r.excavation_ids',
      'r.loads',
      'r.method',
      'r.plant_snapshot',
    ])
    .modifyFront(PREPARED)
    .where('p.id', '=', permitId)
    .executeTakeFirst();
  if (!r) throw notFound('That permit');
  return {
    revisionId: r.revision_id,
    status: r.status,
    subject: {
      siteId: r.site_id,
      permitId: r.id,
      number: r.number,
      windowStart: new Date(r.window_start),
      windowEnd: new Date(r.window_end),
      excavationIds: r.excavation_ids,
      loads: storedLoads(r.loads),
      method: r.method,
      // A draft or returned request is checked with the library as it is; from review on, with its frozen machines.
      plantSnapshot: editableStatuses.includes(r.status) ? null : storedPlantSnapshot(r.plant_snapshot),
    },
  };
}

/**
 * Checks the permit's current revision as saved and keeps the result on it, with the excavation
 * inputs it used. `freeze` (sending for review) first freezes the machines its loads name; a
 * revision past review without frozen machines (stored before snapshots) has them frozen now.
 */
export async function checkStoredRevision(db: Db, permitId: number, now: Date, opts: { freeze?: boolean } = {}): Promise<PermitCheck> {
  const stored = await checkOfStored(db, permitId, now, opts);
  await keepCheck(db, stored, now);
  return stored.check;
}

export interface StoredCheck {
  revisionId: number;
  siteId: number;
  check: PermitCheck;
}

/** The check of the permit's current revision as saved, not kept (see `keepCheck`); `freeze` as in checkStoredRevision. */
export async function checkOfStored(db: Db, permitId: number, now: Date, opts: { freeze?: boolean } = {}): Promise<StoredCheck> {
  const { subject, revisionId, status } = await subjectOf(db, permitId);
  if (opts.freeze || (!subject.plantSnapshot && !editableStatuses.includes(status))) {
    subject.plantSnapshot = await takePlantSnapshot(db, subject.loads, now);
    await db
      .updateTable('permit_revisions')
      .set({ plant_snapshot: JSON.stringify(subject.plantSnapshot) })
      .where('id', '=', revisionId)
      .execute();
  }
  return { revisionId, siteId: subject.siteId, check: await runPermitCheck(db, subject, now) };
}

/** Keeps a check on its revision, with the check inputs of the excavations it used. */
export async function keepCheck(db: Db, s: StoredCheck, now: Date): Promise<void> {
  const inputs = await excavationSnapshotOf(db, s.siteId, s.check, now);
  await db
    .updateTable('permit_revisions')
    .set({ check_result: JSON.stringify(s.check), checked_at: now, excavation_snapshot: JSON.stringify(inputs) })
    .where('id', '=', s.revisionId)
    .execute();
}

/**
 * A check as answered to POST /api/permits/:id/check: without the pressure profile of each
 * excavation (a row every 0.05 m, most of the answer's bytes). The placing page reads only the
 * other permits and figures from it; the permit page draws the profile from the stored check.
 */
export function withoutProfiles(check: PermitCheck): PermitCheck {
  return { ...check, excavations: check.excavations.map(({ result: { profile: _profile, ...result }, ...e }) => ({ ...e, result })) };
}

/** Checks a proposal (unsaved changes over the saved permit) without keeping anything. */
export async function checkProposal(db: Db, permitId: number, proposal: CheckProposal, now: Date): Promise<PermitCheck> {
  const { subject } = await subjectOf(db, permitId);
  const s: CheckSubject = {
    ...subject,
    windowStart: proposal.windowStart ? new Date(proposal.windowStart) : subject.windowStart,
    windowEnd: proposal.windowEnd ? new Date(proposal.windowEnd) : subject.windowEnd,
    excavationIds: proposal.excavationIds ?? subject.excavationIds,
    loads: proposal.loads ?? subject.loads,
    method: proposal.method ?? subject.method,
  };
  if (s.windowEnd <= s.windowStart)
    throw badRequest('The window must end after it starts.', { windowEnd: 'must be after the start of the window' });
  return runPermitCheck(db, s, now);
}

/**
 * Runs and keeps the check of every permit whose current revision names loads and excavations but
 * has no check (the demo site is seeded without checks: db/ cannot run the server's check). Brink
 * runs it once at start, after the migrations, so reads never write. A check the placement or the
 * figures refuse (400) is left absent and named in the answer. Returns the permits checked and refused.
 * `onlyPermits` narrows it (tests, which share a database).
 */
export async function checkUnchecked(db: Db, now: Date, onlyPermits?: number[]): Promise<{ checked: string[]; refused: string[] }> {
  let q = withCurrentRevision(db)
    .select(['p.id', 'p.number'])
    .where('r.check_result', 'is', null)
    .where(sql<boolean>`cardinality(r.excavation_ids) > 0 and jsonb_array_length(r.loads) > 0`);
  if (onlyPermits) q = q.where('p.id', 'in', onlyPermits.length ? onlyPermits : [0]);
  const rows = await q.orderBy('p.id').execute();
  const out = { checked: [] as string[], refused: [] as string[] };
  for (const r of rows) {
    try {
      await checkStoredRevision(db, r.id, now);
      out.checked.push(r.number);
    } catch (err) {
      if (!(err instanceof HttpError && err.status === 400)) throw err;
      out.refused.push(r.number);
    }
  }
  return out;
}
