import { sql } from 'kysely';
import type { Db } from '@db/database';
import { CheckInputError, checkExcavationOf, cumulativeCheck, PlacementError, type CheckExcavation, type OtherPermit, type PlantForCheck } from '@shared/permits/check';
import { countedStatuses, type CheckProposal, type PermitCheck, type PermitStatus, type PlacedLoad } from '@shared/schemas/permits';
import { badRequest, HttpError, notFound } from '../../http';
import { loadExcavations } from '../excavations';
import { withCurrentRevision } from './read';

/** The named excavations of the site, in the order named. */
export async function excavationsFor(db: Db, siteId: number, ids: number[]): Promise<CheckExcavation[]> {
  const list = await loadExcavations(db, siteId, ids);
  return ids.flatMap((id) => list.filter((e) => e.id === id)).map(checkExcavationOf);
}

/** The plant items the loads name, from the library. */
export async function plantFor(db: Db, loads: PlacedLoad[]): Promise<Map<number, PlantForCheck>> {
  const ids = [...new Set(loads.flatMap((l) => (l.kind === 'plant' ? [l.plantItemId] : [])))];
  if (!ids.length) return new Map();
  const rows = await db.selectFrom('plant_items').select(['id', 'name', 'operating_mass', 'design_factor', 'elements']).where('id', 'in', ids).execute();
  return new Map(rows.map((r) => [r.id, { id: r.id, name: r.name, operatingMass: r.operating_mass, designFactor: r.design_factor, elements: r.elements }]));
}

/**
 * Other permits of the site that may stand beside the same excavations at the same time: approved,
 * live or suspended, naming one of the excavations, with a window that overlaps. Their current
 * revision's loads.
 */
export async function overlappingPermits(
  db: Db,
  siteId: number,
  exceptPermitId: number | null,
  excavationIds: number[],
  window: { start: Date; end: Date },
): Promise<OtherPermit[]> {
  if (!excavationIds.length) return [];
  let q = withCurrentRevision(db)
    .select(['p.id', 'p.number', 'p.status', 'r.window_start', 'r.window_end', 'r.excavation_ids', 'r.loads'])
    .where('p.site_id', '=', siteId)
    .where('p.status', 'in', countedStatuses as PermitStatus[])
    .where(sql<boolean>`r.excavation_ids && ${sql.val(excavationIds)}::int[]`)
    .where('r.window_start', '<', window.end)
    .where('r.window_end', '>', window.start);
  if (exceptPermitId !== null) q = q.where('p.id', '!=', exceptPermitId);
  const rows = await q.orderBy('p.seq').execute();
  return rows.map((r) => ({
    id: r.id,
    number: r.number,
    status: r.status,
    windowStart: new Date(r.window_start).toISOString(),
    windowEnd: new Date(r.window_end).toISOString(),
    excavationIds: r.excavation_ids,
    loads: r.loads as PlacedLoad[],
  }));
}

export interface CheckSubject {
  siteId: number;
  permitId: number | null;
  number: string;
  windowStart: Date;
  windowEnd: Date;
  excavationIds: number[];
  loads: PlacedLoad[];
  method: 'dispersion-45' | 'elastic';
}

/**
 * The authoritative cumulative check of a permit's content (shared/permits/check.ts) against the
 * database as it is now. A load touching an excavation answers 400 naming `loads[i]`; figures the
 * calculation refuses (docs/calculation.md, "Refusals") answer 400 naming the field.
 */
export async function runPermitCheck(db: Db, s: CheckSubject, now: Date): Promise<PermitCheck> {
  const site = await db.selectFrom('sites').select(['latitude', 'longitude', 'minimum_clearance']).where('id', '=', s.siteId).executeTakeFirstOrThrow();
  // Every open excavation of the site: the named ones are checked, the others when a load reaches them.
  const all = await loadExcavations(db, s.siteId);
  const excavations = s.excavationIds.flatMap((id) => all.filter((e) => e.id === id)).map(checkExcavationOf);
  const nearby = all.filter((e) => e.state === 'open' && !s.excavationIds.includes(e.id)).map(checkExcavationOf);
  const others = await overlappingPermits(db, s.siteId, s.permitId, [...s.excavationIds, ...nearby.map((e) => e.id)], { start: s.windowStart, end: s.windowEnd });
  const plant = await plantFor(db, [...s.loads, ...others.flatMap((o) => o.loads)]);
  const missing = s.loads.findIndex((l) => l.kind === 'plant' && !plant.has(l.plantItemId));
  if (missing >= 0) throw badRequest('A load names a machine that is not in the plant library.', { [`loads[${missing}].plantItemId`]: 'is not in the plant library' });
  try {
    return cumulativeCheck({
      origin: [site.longitude, site.latitude],
      method: s.method,
      minimumClearance: site.minimum_clearance,
      permit: { id: s.permitId, number: s.number, windowStart: s.windowStart.toISOString(), windowEnd: s.windowEnd.toISOString(), loads: s.loads },
      excavations,
      nearby,
      plant,
      others,
      now,
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
      throw badRequest(`Cannot check: ${err.field} ${err.reason}.`, { [key]: key === 'excavationIds' ? `${err.field} ${err.reason}` : err.reason });
    }
    throw err;
  }
}

async function subjectOf(db: Db, permitId: number): Promise<{ subject: CheckSubject; revisionId: number }> {
  const r = await withCurrentRevision(db)
    .select(['p.id', 'p.site_id', 'p.number', 'r.id as revision_id', 'r.window_start', 'r.window_end', 'r.excavation_ids', 'r.loads', 'r.method'])
    .where('p.id', '=', permitId)
    .executeTakeFirst();
  if (!r) throw notFound('That permit');
  return {
    revisionId: r.revision_id,
    subject: {
      siteId: r.site_id,
      permitId: r.id,
      number: r.number,
      windowStart: new Date(r.window_start),
      windowEnd: new Date(r.window_end),
      excavationIds: r.excavation_ids,
      loads: r.loads as PlacedLoad[],
      method: r.method,
    },
  };
}

/** Checks the permit's current revision as saved and keeps the result on it. */
export async function checkStoredRevision(db: Db, permitId: number, now: Date): Promise<PermitCheck> {
  const { subject, revisionId } = await subjectOf(db, permitId);
  const check = await runPermitCheck(db, subject, now);
  await db.updateTable('permit_revisions').set({ check_result: JSON.stringify(check), checked_at: now }).where('id', '=', revisionId).execute();
  return check;
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
  if (s.windowEnd <= s.windowStart) throw badRequest('The window must end after it starts.', { windowEnd: 'must be after the start of the window' });
  return runPermitCheck(db, s, now);
}

/**
 * Runs and keeps the check of a permit whose current revision has loads and excavations but no
 * check yet (demo permits seeded without one). A check the placement refuses is left absent.
 */
export async function ensureChecked(db: Db, permitId: number, now: Date): Promise<void> {
  const r = await withCurrentRevision(db)
    .select(['r.check_result', 'r.excavation_ids', 'r.loads'])
    .where('p.id', '=', permitId)
    .executeTakeFirst();
  if (!r || r.check_result !== null || r.excavation_ids.length === 0 || (r.loads as unknown[]).length === 0) return;
  try {
    await checkStoredRevision(db, permitId, now);
  } catch (err) {
    if (!(err instanceof HttpError && err.status === 400)) throw err;
  }
}
