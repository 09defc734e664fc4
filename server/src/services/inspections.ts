import { sql } from 'kysely';
import type { Db } from '@db/database';
import {
  GRACE_MINUTES,
  checklist,
  type ExcavationInspectionState,
  type Inspection,
  type InspectionData,
  type InspectionState,
  type InspectionStatesAnswer,
  type Outcome,
  type Consequences,
  storedChecklist,
  storedConsequences,
} from '@shared/schemas/inspections';
import type { UnitSystem } from '@shared/units';
import { DEFAULT_SHIFTS, currentShift, formatSiteTime, type ShiftDef, type ShiftSpan } from '@shared/time/shifts';
import { notice } from '../mail/mailer';
import type { Deps } from '../deps';
import { badRequest, conflict, notFound } from '../http';
import { audit } from './audit';
import { checkUploadType, storeUpload } from './uploads';
import { inspectionActor } from './permits/actors';
import { transition } from './permits/machine';
import { withCurrentRevision } from './permits/read';
import { inTransaction, withSavepoint } from './tx';
import { decodeCursor, pageOf } from './cursor';

// Shifts, inspection records, and where each open excavation stands this shift. The route module
// (routes/inspections.ts) is thin; the scheduled e-mail is in jobs/inspections.ts and the weekly PDF
// in services/inspection-report.ts.

/* ---------------------------------------------------------------- shifts */

/** The site's shifts in start order (one day shift at 07:00 when none are set). */
async function siteShifts(db: Db, siteId: number): Promise<ShiftDef[]> {
  const rows = await db
    .selectFrom('site_shifts')
    .select(['name', 'start_time'])
    .where('site_id', '=', siteId)
    .orderBy('start_time')
    .execute();
  return shiftsOf(rows);
}

const shiftsOf = (rows: { name: string; start_time: string }[] | null): ShiftDef[] =>
  rows?.length ? rows.map((r) => ({ name: r.name, start: r.start_time })) : [...DEFAULT_SHIFTS];

/** Replaces the site's shifts (one transaction, audited). */
export async function setSiteShifts(db: Db, siteId: number, shifts: ShiftDef[], actorId: number): Promise<ShiftDef[]> {
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('site_shifts').where('site_id', '=', siteId).execute();
    await trx
      .insertInto('site_shifts')
      .values(shifts.map((s) => ({ site_id: siteId, name: s.name, start_time: s.start })))
      .execute();
    await audit(trx, { actorId, siteId, entity: 'site', entityId: siteId, action: 'shifts-set', detail: { shifts } });
  });
  return siteShifts(db, siteId);
}

export interface SiteClock {
  siteId: number;
  siteName: string;
  timeZone: string;
  shifts: ShiftDef[];
  shift: ShiftSpan;
  /** When an uninspected excavation becomes overdue this shift. */
  overdueFrom: Date;
}

/** The site's time zone, shifts and current shift at `now`. */
export async function siteClock(db: Db, siteId: number, now: Date): Promise<SiteClock> {
  // The site with its shifts, in one query (as siteShifts reads them).
  const site = await db
    .selectFrom('sites')
    .select([
      'id',
      'name',
      'timezone',
      sql<{ name: string; start_time: string }[] | null>`(select json_agg(json_build_object('name', h.name, 'start_time', h.start_time)
        order by h.start_time) from site_shifts h where h.site_id = sites.id)`.as('shifts'),
    ])
    .where('id', '=', siteId)
    .executeTakeFirst();
  if (!site) throw notFound('That site');
  const shifts = shiftsOf(site.shifts);
  const shift = currentShift(shifts, site.timezone, now);
  return {
    siteId,
    siteName: site.name,
    timeZone: site.timezone,
    shifts,
    shift,
    overdueFrom: new Date(shift.start.getTime() + GRACE_MINUTES * 60_000),
  };
}

/* ---------------------------------------------------------------- state */

/**
 * Where one open excavation stands: red (`unsafe`) while its latest inspection says not safe, else
 * `ok` with a safe inspection since the shift started, else `due` inside the grace time and
 * `overdue` after it.
 */
function decideState(f: {
  latestOutcome: Outcome | null;
  lastSafeAt: Date | null;
  shiftStart: Date;
  overdueFrom: Date;
  now: Date;
}): InspectionState {
  if (f.latestOutcome === 'not-safe') return 'unsafe';
  if (f.lastSafeAt && f.lastSafeAt.getTime() >= f.shiftStart.getTime()) return 'ok';
  return f.now.getTime() < f.overdueFrom.getTime() ? 'due' : 'overdue';
}

/**
 * The inspection state of every open excavation of a site at `now` (or of the named ones). The map,
 * the register and the dashboards read this through GET /api/sites/:siteId/inspections/states.
 */
export async function inspectionStates(
  db: Db,
  siteId: number,
  now: Date,
  opts: { excavationIds?: number[] } = {},
): Promise<InspectionStatesAnswer & { clock: SiteClock }> {
  if (opts.excavationIds?.length === 0) {
    const clock = await siteClock(db, siteId, now);
    return { clock, shift: shiftOut(clock), excavations: [] };
  }
  // One query: each open excavation with its latest inspection (and who made it) and its latest safe
  // one, each found by the (excavation, time) index, newest first.
  let q = db
    .selectFrom('excavations as e')
    .leftJoinLateral(
      (eb) =>
        eb
          .selectFrom('inspections as i')
          .innerJoin('users as u', 'u.id', 'i.inspector_id')
          .select(['i.id', 'i.inspected_at', 'i.outcome', 'u.name as inspector'])
          .whereRef('i.excavation_id', '=', 'e.id')
          .where('i.inspected_at', '<=', now)
          .orderBy('i.inspected_at', 'desc')
          .orderBy('i.id', 'desc')
          .limit(1)
          .as('l'),
      (j) => j.onTrue(),
    )
    .leftJoinLateral(
      (eb) =>
        eb
          .selectFrom('inspections as s')
          .select(sql<Date | null>`max(s.inspected_at)`.as('at'))
          .whereRef('s.excavation_id', '=', 'e.id')
          .where('s.outcome', '=', 'safe')
          .where('s.inspected_at', '<=', now)
          .as('s'),
      (j) => j.onTrue(),
    )
    .select(['e.id', 'e.reference', 'e.name', 'l.id as last_id', 'l.inspected_at', 'l.outcome', 'l.inspector', 's.at as last_safe_at'])
    .where('e.site_id', '=', siteId)
    .where('e.state', '=', 'open')
    .orderBy('e.reference');
  if (opts.excavationIds) q = q.where('e.id', 'in', opts.excavationIds);
  // The site's clock is read beside the excavations, not before them: neither needs the other.
  const [clock, rows] = await Promise.all([siteClock(db, siteId, now), q.execute()]);
  const excavations: ExcavationInspectionState[] = rows.map((e) => {
    const lastSafeAt = e.last_safe_at ? new Date(e.last_safe_at) : null;
    const last =
      e.last_id !== null && e.inspected_at !== null && e.outcome !== null && e.inspector !== null
        ? { id: e.last_id, at: new Date(e.inspected_at).toISOString(), outcome: e.outcome, inspector: e.inspector }
        : null;
    return {
      excavationId: e.id,
      reference: e.reference,
      name: e.name,
      state: decideState({
        latestOutcome: last?.outcome ?? null,
        lastSafeAt,
        shiftStart: clock.shift.start,
        overdueFrom: clock.overdueFrom,
        now,
      }),
      lastInspection: last,
      lastSafeAt: lastSafeAt?.toISOString() ?? null,
    };
  });
  return { clock, shift: shiftOut(clock), excavations };
}

export function shiftOut(c: SiteClock): InspectionStatesAnswer['shift'] {
  return {
    name: c.shift.name,
    start: c.shift.start.toISOString(),
    end: c.shift.end.toISOString(),
    overdueFrom: c.overdueFrom.toISOString(),
  };
}

/** The open excavations still waiting for a safe inspection this shift (due, overdue or not safe). */
export function needingInspection(list: ExcavationInspectionState[]): ExcavationInspectionState[] {
  return list.filter((e) => e.state !== 'ok');
}

/* ---------------------------------------------------------------- records */

interface ExcavationRow {
  id: number;
  site_id: number;
  reference: string;
  name: string;
  state: 'planned' | 'open' | 'backfilled';
}

export async function loadExcavation(db: Db, id: number): Promise<ExcavationRow> {
  const e = await db
    .selectFrom('excavations')
    .select(['id', 'site_id', 'reference', 'name', 'state'])
    .where('id', '=', id)
    .executeTakeFirst();
  if (!e) throw notFound('That excavation');
  return e;
}

/** How far back an inspection may be dated when it is recorded late. */
const BACKDATE_HOURS = 12;

/**
 * Checks and stores an inspection with its photos and returns it, with its consequences
 * (`applyConsequences`: suspended permits, queued e-mails) in the same transaction: a crash leaves
 * either all of it or none. Sending the same `clientRef` again returns the inspection already
 * stored (`created: false`) and the consequences it caused then.
 */
export async function recordInspection(
  deps: Deps,
  args: { excavationId: number; inspectorId: number; data: InspectionData; photos: Express.Multer.File[] },
): Promise<{ inspection: Inspection; created: boolean; consequences: Consequences }> {
  const { db } = deps;
  const { data } = args;
  if (data.clientRef) {
    const seen = await db
      .selectFrom('inspections')
      .select(['id', 'excavation_id'])
      .where('client_ref', '=', data.clientRef)
      .executeTakeFirst();
    if (seen) {
      if (seen.excavation_id !== args.excavationId)
        throw badRequest('That form was already sent for another excavation.', { clientRef: 'belongs to another excavation' });
      const inspection = (await loadInspections(db, { ids: [seen.id] }))[0];
      return {
        inspection,
        created: false,
        consequences: await withStillSuspended(db, inspection, await recordedConsequences(db, seen.id)),
      };
    }
  }
  const exc = await loadExcavation(db, args.excavationId);
  if (exc.state !== 'open') throw conflict(`Only open excavations are inspected; ${exc.reference} is ${exc.state}.`);

  const now = deps.now();
  const at = data.inspectedAt ? new Date(data.inspectedAt) : now;
  if (at.getTime() > now.getTime() + 5 * 60_000)
    throw badRequest('The inspection time is in the future.', { inspectedAt: 'is in the future' });
  if (at.getTime() < now.getTime() - BACKDATE_HOURS * 3600_000) {
    throw badRequest(`The inspection time is more than ${BACKDATE_HOURS} hours ago.`, {
      inspectedAt: `may be at most ${BACKDATE_HOURS} hours ago`,
    });
  }
  const previous = await db
    .selectFrom('inspections')
    .select(sql<Date | null>`max(inspected_at)`.as('at'))
    .where('excavation_id', '=', exc.id)
    .executeTakeFirst();
  if (previous?.at && at.getTime() < new Date(previous.at).getTime()) {
    throw badRequest('The inspection time is before the latest inspection of this excavation.', {
      inspectedAt: 'is before the latest inspection of this excavation',
    });
  }
  // Judge every photo's type before storing any, so that a bad one leaves nothing behind.
  for (const [i, f] of args.photos.entries()) await checkUploadType(f, `photos[${i}]`, 'image');

  const clock = await siteClock(db, exc.site_id, at);
  const stored = await db.transaction().execute(async (trx) => {
    // The same form sent twice at once: the second waits here and finds the first.
    if (data.clientRef) await sql`select pg_advisory_xact_lock(hashtext(${data.clientRef}))`.execute(trx);
    const twin = data.clientRef
      ? await trx.selectFrom('inspections').select('id').where('client_ref', '=', data.clientRef).executeTakeFirst()
      : undefined;
    if (twin) return { id: twin.id, created: false, consequences: await recordedConsequences(trx, twin.id) };
    const row = await trx
      .insertInto('inspections')
      .values({
        excavation_id: exc.id,
        site_id: exc.site_id,
        inspector_id: args.inspectorId,
        inspected_at: at,
        recorded_at: now,
        shift_name: clock.shift.name,
        shift_start: clock.shift.start,
        reason: data.reason,
        reason_detail: data.reasonDetail,
        checklist: JSON.stringify(data.checklist),
        outcome: data.outcome,
        remarks: data.remarks,
        client_ref: data.clientRef ?? null,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    for (const [i, f] of args.photos.entries()) {
      const up = await storeUpload(deps, f, {
        field: `photos[${i}]`,
        accept: 'image',
        purpose: 'inspection-photo',
        siteId: exc.site_id,
        userId: args.inspectorId,
        db: trx,
      });
      await trx.insertInto('inspection_photos').values({ inspection_id: row.id, upload_id: up.id, position: i }).execute();
    }
    await audit(trx, {
      actorId: args.inspectorId,
      siteId: exc.site_id,
      entity: 'excavation',
      entityId: exc.id,
      action: 'inspected',
      detail: { inspectionId: row.id, outcome: data.outcome, reason: data.reason, failed: failedItems(data.checklist).map((f) => f.key) },
    });
    const inspection = (await loadInspections(trx, { ids: [row.id] }))[0];
    const consequences = await applyConsequences({ ...deps, db: trx }, inspection);
    return { id: row.id, created: true, consequences };
  });
  const inspection = (await loadInspections(db, { ids: [stored.id] }))[0];
  return { inspection, created: stored.created, consequences: await withStillSuspended(db, inspection, stored.consequences) };
}

/**
 * A safe inspection does not resume anything: the permits on the excavation that stand suspended
 * stay so until a coordinator resumes them. They are named with the answer, so the page can say so.
 */
async function withStillSuspended(db: Db, inspection: Inspection, consequences: Consequences): Promise<Consequences> {
  if (inspection.outcome !== 'safe') return consequences;
  const rows = await permitsOnExcavation(db, { id: inspection.excavationId, site_id: inspection.siteId }, 'suspended');
  return { ...consequences, stillSuspended: rows.map((r) => ({ id: r.id, reference: r.number })) };
}

/** The permits of one status whose current revision names the excavation, in number order. */
function permitsOnExcavation(db: Db, exc: { id: number; site_id: number }, status: 'live' | 'suspended') {
  return withCurrentRevision(db)
    .select(['p.id', 'p.number'])
    .where('p.status', '=', status)
    .where('p.site_id', '=', exc.site_id)
    .where(sql<boolean>`${exc.id}::int = any(r.excavation_ids)`)
    .orderBy('p.id')
    .execute();
}

/** The consequences an inspection caused, as recorded beside it (none for a safe one). */
async function recordedConsequences(db: Db, inspectionId: number): Promise<Consequences> {
  const row = await db
    .selectFrom('inspections as i')
    .leftJoin('inspection_consequences as c', 'c.inspection_id', 'i.id')
    .select(['c.consequences', 'i.outcome'])
    .where('i.id', '=', inspectionId)
    .executeTakeFirstOrThrow();
  return storedConsequences(row.consequences) ?? { suspended: [], notSuspended: [], notified: [] };
}

/** The checklist items answered "fail", with their labels and notes, in checklist order. */
export function failedItems(answers: Record<string, { answer: string; note: string }>): { key: string; label: string; note: string }[] {
  return checklist.filter((c) => answers[c.key]?.answer === 'fail').map((c) => ({ key: c.key, label: c.label, note: answers[c.key].note }));
}

/** Inspections, newest first, by id or by excavation / site and time span. */
export async function loadInspections(
  db: Db,
  f: { ids?: number[]; excavationId?: number; siteId?: number; from?: Date; to?: Date; limit?: number },
): Promise<Inspection[]> {
  let q = db
    .selectFrom('inspections')
    .innerJoin('users', 'users.id', 'inspections.inspector_id')
    .selectAll('inspections')
    .select('users.name as inspector_name')
    .orderBy('inspections.inspected_at', 'desc')
    .orderBy('inspections.id', 'desc');
  if (f.ids) q = q.where('inspections.id', 'in', f.ids.length ? f.ids : [0]);
  if (f.excavationId !== undefined) q = q.where('inspections.excavation_id', '=', f.excavationId);
  if (f.siteId !== undefined) q = q.where('inspections.site_id', '=', f.siteId);
  if (f.from) q = q.where('inspections.inspected_at', '>=', f.from);
  if (f.to) q = q.where('inspections.inspected_at', '<', f.to);
  if (f.limit) q = q.limit(f.limit);
  const rows = await q.execute();
  if (!rows.length) return [];
  const ids = rows.map((r) => r.id);
  const photos = await db
    .selectFrom('inspection_photos')
    .innerJoin('uploads', 'uploads.id', 'inspection_photos.upload_id')
    .select(['inspection_photos.inspection_id', 'uploads.id', 'uploads.original_name'])
    .where('inspection_photos.inspection_id', 'in', ids)
    .orderBy('inspection_photos.position')
    .execute();
  const suspended = await suspensionsOf(db, ids);
  return rows.map((r) => ({
    id: r.id,
    excavationId: r.excavation_id,
    siteId: r.site_id,
    inspector: { id: r.inspector_id, name: r.inspector_name },
    inspectedAt: new Date(r.inspected_at).toISOString(),
    recordedAt: new Date(r.recorded_at).toISOString(),
    shift: { name: r.shift_name, start: new Date(r.shift_start).toISOString() },
    reason: r.reason,
    reasonDetail: r.reason_detail,
    checklist: storedChecklist(r.checklist),
    outcome: r.outcome,
    remarks: r.remarks,
    photos: photos.filter((p) => p.inspection_id === r.id).map((p) => ({ id: p.id, url: `/api/uploads/${p.id}`, name: p.original_name })),
    suspendedPermits: suspended.filter((s) => s.inspectionId === r.id).map(({ id, reference }) => ({ id, reference })),
  }));
}

/**
 * A page of an excavation's inspections, newest first (then by id), and the cursor of the next
 * page (index inspections_excavation_time_id, migration 0016).
 */
export async function loadInspectionPage(
  db: Db,
  excavationId: number,
  q: { limit: number; cursor?: string },
): Promise<{ inspections: Inspection[]; next: string | null }> {
  const scope = `inspections:${excavationId}`;
  let query = db
    .selectFrom('inspections')
    .select(['id', sql<string>`inspected_at::text`.as('sort_key')])
    .where('excavation_id', '=', excavationId);
  if (q.cursor) {
    const [at, id] = decodeCursor(q.cursor, scope, 'timestamptz');
    query = query.where(sql<boolean>`(inspected_at, id) < (cast(${at} as timestamptz), ${id})`);
  }
  const rows = await query
    .orderBy('inspected_at', 'desc')
    .orderBy('id', 'desc')
    .limit(q.limit + 1)
    .execute();
  const { page, next } = pageOf(rows, q.limit, (r) => r.sort_key, scope);
  return { inspections: await loadInspections(db, { ids: page.map((r) => r.id) }), next };
}

async function suspensionsOf(db: Db, inspectionIds: number[]): Promise<{ inspectionId: number; id: number; reference: string }[]> {
  const rows = await db
    .selectFrom('inspection_suspensions as s')
    .innerJoin('permits as p', 'p.id', 's.permit_id')
    .select(['s.inspection_id', 'p.id', 'p.number'])
    .where('s.inspection_id', 'in', inspectionIds)
    .orderBy('p.id')
    .execute();
  return rows.map((r) => ({ inspectionId: r.inspection_id, id: r.id, reference: r.number }));
}

/** The site's supervisors and coordinators (active), who hear of failed and overdue inspections. */
export async function siteLeads(db: Db, siteId: number): Promise<{ id: number; email: string; name: string; units: UnitSystem }[]> {
  return (
    db
      .selectFrom('site_members')
      .innerJoin('users', 'users.id', 'site_members.user_id')
      .innerJoin('sites', 'sites.id', 'site_members.site_id')
      .select(['users.id', 'users.email', 'users.name'])
      // The units each reads in: their own, else the site's (as unitsOf).
      .select((eb) => eb.fn.coalesce('users.units', 'sites.units').as('units'))
      .where('site_members.site_id', '=', siteId)
      .where('site_members.role', 'in', ['supervisor', 'coordinator'])
      .where('users.active', '=', true)
      .orderBy('users.email')
      .execute()
  );
}

/* ---------------------------------------------------------------- consequences */

/**
 * What follows a recorded inspection. "Not safe": every live permit on the excavation is suspended
 * through the permits' own transition (same e-mails as a coordinator's suspension, the inspection
 * as the reason), and the site's supervisors and coordinators are e-mailed. A safe inspection
 * changes no permit: resuming stays the coordinator's decision. It runs in the caller's transaction
 * (the one that stores the inspection), each suspension in a savepoint: a permit that could not be
 * suspended is listed in `notSuspended` (and in the e-mail) so that people act by hand.
 */
async function applyConsequences(deps: Deps, inspection: Inspection): Promise<Consequences> {
  if (inspection.outcome !== 'not-safe') return { suspended: [], notSuspended: [], notified: [] };
  return inTransaction(deps.db, async (trx) => {
    const inTrx = { ...deps, db: trx };
    const out: Consequences = { suspended: [], notSuspended: [], notified: [] };
    const exc = await loadExcavation(trx, inspection.excavationId);
    const reason = `Inspection ${inspection.id} of ${exc.reference} ${exc.name} found it not safe: ${inspection.remarks}`;
    const result = await suspendLivePermits(inTrx, exc, inspection.id, reason);
    out.suspended = result.suspended;
    out.notSuspended = result.notSuspended;
    if (out.suspended.length) {
      await trx
        .insertInto('inspection_suspensions')
        .values(out.suspended.map((p) => ({ inspection_id: inspection.id, permit_id: p.id })))
        .onConflict((oc) => oc.doNothing())
        .execute();
    }
    out.notified = await mailFailedInspection(inTrx, exc, inspection, out);
    // Kept with the inspection, added to what an earlier pass (the reconciliation) recorded.
    const before = await recordedConsequences(trx, inspection.id);
    const all: Consequences = {
      suspended: [...before.suspended, ...out.suspended],
      notSuspended: out.notSuspended,
      notified: [...new Set([...before.notified, ...out.notified])],
    };
    await trx
      .insertInto('inspection_consequences')
      .values({ inspection_id: inspection.id, consequences: JSON.stringify(all) })
      .onConflict((oc) => oc.column('inspection_id').doUpdateSet({ consequences: JSON.stringify(all), updated_at: deps.now() }))
      .execute();
    return all;
  });
}

export interface Reconciled {
  inspectionId: number;
  excavation: string;
  suspended: string[];
  notSuspended: string[];
}

/**
 * Self-healing: finds every excavation whose latest inspection found it not safe and that still has
 * live permits (a suspension lost to a crash before consequences shared the inspection's
 * transaction, or a permit that went live at the same moment), and applies that inspection's
 * consequences again: the permits are suspended with the usual notices. Run by a pg-boss schedule
 * (server/src/jobs/inspections.ts); returns what it found, which the job logs.
 */
export async function reconcileUnsafe(deps: Deps, opts: { siteIds?: number[] } = {}): Promise<Reconciled[]> {
  const now = deps.now();
  let latest = deps.db
    .selectFrom('inspections as i')
    .distinctOn('i.excavation_id')
    .select(['i.id', 'i.excavation_id', 'i.outcome'])
    .where('i.inspected_at', '<=', now)
    .orderBy('i.excavation_id')
    .orderBy('i.inspected_at', 'desc')
    .orderBy('i.id', 'desc');
  if (opts.siteIds) latest = latest.where('i.site_id', 'in', opts.siteIds.length ? opts.siteIds : [0]);
  const stale = await deps.db
    .selectFrom(latest.as('l'))
    .innerJoin('excavations as e', 'e.id', 'l.excavation_id')
    .select(['l.id', 'e.reference'])
    .where('l.outcome', '=', 'not-safe')
    .where(({ exists }) =>
      exists(
        withCurrentRevision(deps.db)
          .select('p.id')
          .where('p.status', '=', 'live')
          .where(sql<boolean>`p.site_id = e.site_id and e.id = any(r.excavation_ids)`),
      ),
    )
    .orderBy('l.id')
    .execute();
  const out: Reconciled[] = [];
  for (const row of stale) {
    const c = await deps.db.transaction().execute(async (trx) => {
      // One pass at a time per inspection, whichever server runs it.
      await trx.selectFrom('inspections').select('id').where('id', '=', row.id).forUpdate().execute();
      const inspection = (await loadInspections(trx, { ids: [row.id] }))[0];
      const before = (await recordedConsequences(trx, row.id)).suspended.length;
      const all = await applyConsequences({ ...deps, db: trx }, inspection);
      return { ...all, suspended: all.suspended.slice(before) };
    });
    out.push({
      inspectionId: row.id,
      excavation: row.reference,
      suspended: c.suspended.map((p) => p.reference),
      notSuspended: c.notSuspended.map((p) => p.reference),
    });
  }
  return out;
}

async function mailFailedInspection(deps: Deps, exc: ExcavationRow, inspection: Inspection, c: Consequences): Promise<string[]> {
  const clock = await siteClock(deps.db, exc.site_id, new Date(inspection.inspectedAt));
  const failed = failedItems(inspection.checklist);
  return deps.mailer.sendEach(deps.db, await siteLeads(deps.db, exc.site_id), (units) =>
    notice({
      subject: `Not safe: ${exc.reference} ${exc.name} failed its inspection`,
      lines: [
        `${inspection.inspector.name} inspected ${exc.reference} ${exc.name} at ${formatSiteTimeIn(clock, inspection.inspectedAt)} and found it NOT SAFE. Work in and beside it must stop.`,
        `What must be put right: ${inspection.remarks}`,
        ...(failed.length ? [`Failed checks: ${failed.map((f) => `${f.label} (${f.note})`).join('; ')}.`] : []),
        c.suspended.length
          ? `Brink suspended the live permits on it: ${c.suspended.map((p) => p.reference).join(', ')}. A coordinator resumes them when it is safe again.`
          : 'There were no live permits on it to suspend.',
        ...(c.notSuspended.length
          ? [`Brink could NOT suspend ${c.notSuspended.map((p) => `${p.reference} (${p.why})`).join(', ')}: suspend these by hand now.`]
          : []),
        'It shows red on the map until a later inspection finds it safe.',
      ],
      link: { label: 'See the inspection', url: `${deps.config.publicUrl}/sites/${exc.site_id}/excavations/${exc.id}/inspections` },
      units,
    }),
  );
}

function formatSiteTimeIn(clock: SiteClock, iso: string): string {
  return `${formatSiteTime(new Date(iso), clock.timeZone)} (${clock.timeZone})`;
}

/**
 * Suspends every live permit on the excavation through the permits' own transition (their e-mails,
 * timeline and audit), Brink acting for the inspection. A permit that stopped being live meanwhile
 * (handed back, lapsed, or suspended by someone else) needs nothing; any other failure is reported.
 */
async function suspendLivePermits(
  deps: Deps,
  exc: ExcavationRow,
  inspectionId: number,
  reason: string,
): Promise<{ suspended: Consequences['suspended']; notSuspended: Consequences['notSuspended'] }> {
  const live = await permitsOnExcavation(deps.db, exc, 'live');
  const actor = inspectionActor(`Inspection ${inspectionId} of ${exc.reference}: not safe`);
  const out: Awaited<ReturnType<typeof suspendLivePermits>> = { suspended: [], notSuspended: [] };
  for (const p of live) {
    try {
      await withSavepoint(deps.db, () =>
        transition(deps, p.id, 'suspend', actor, {
          reason,
          cause: { inspection: { id: inspectionId, excavationReference: exc.reference } },
        }),
      );
      out.suspended.push({ id: p.id, reference: p.number });
    } catch (err) {
      const now = await deps.db.selectFrom('permits').select('status').where('id', '=', p.id).executeTakeFirst();
      if (now && now.status !== 'live') continue;
      console.error(`[inspections] permit ${p.number} could not be suspended:`, (err as Error).message);
      out.notSuspended.push({ id: p.id, reference: p.number, why: (err as Error).message });
    }
  }
  return out;
}
