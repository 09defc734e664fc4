/**
 * Changes to the excavation register: add, change, remove, import and the design drawing. Each runs
 * in one transaction with its audit entry; a change to the check inputs re-checks the permits that
 * stand on the excavation in the same transaction (services/permits/recheck.ts).
 */
import { canonical, excavationInputSchema, IMPORT_MODE_LABEL, importModeLabels, storedAuditDetail } from '@shared/schemas/excavations';
import type { ExcavationUpdate, ExcavationValues, ImportMode, ImportReport } from '@shared/schemas/excavations';
import type { Db } from '@db/database';
import type { Deps } from '../deps';
import { badRequest, conflict, HttpError, notFound, parseOr400, refuseFields } from '../http';
import { audit } from './audit';
import {
  columnsOf,
  loadExcavations,
  placementProblems,
  projectionOf,
  readImport,
  rowValues,
  storeAnswers,
  storedShapes,
} from './excavations';
import { listNumbers, permitsReferring } from './permit-references';
import { isForeignKeyViolation, isUniqueViolation } from './pg-errors';
import { recheckAfterExcavationChange, type RecheckOutcome } from './permits/recheck';

type Actor = { id: number; name: string };
type Site = { id: number; name: string; latitude: number; longitude: number };

/** Fields whose change the audit log must show with who and when (depth and the support). */
const SUPPORT_FIELDS = ['depth', 'supportType', 'designSurcharge', 'ratedPressure', 'restraint', 'pressureState', 'wallFriction'] as const;

export async function siteOrigin(db: Db, siteId: number): Promise<Site> {
  const site = await db.selectFrom('sites').select(['id', 'name', 'latitude', 'longitude']).where('id', '=', siteId).executeTakeFirst();
  if (!site) throw notFound('That site');
  return site;
}

export async function oneOrNotFound(db: Db, siteId: number, id: number) {
  const [e] = await loadExcavations(db, siteId, [id]);
  if (!e) throw notFound('That excavation');
  return e;
}

/** 400 naming each field when the excavation cannot be placed on this site. */
function checkPlacement(values: ExcavationValues, site: { latitude: number; longitude: number }): void {
  refuseFields(placementProblems(values, projectionOf(site)));
}

const referenceTaken = (reference: string) =>
  new HttpError(400, 'invalid', `Reference ${reference} is already used on this site.`, { reference: 'is already used on this site' });

/** Field → { from, to } for every field whose value differs. */
function changesBetween(before: ExcavationValues, after: ExcavationValues): Record<string, { from: unknown; to: unknown }> {
  const out: Record<string, { from: unknown; to: unknown }> = {};
  for (const k of Object.keys(after) as (keyof ExcavationValues)[]) {
    if (canonical(before[k]) !== canonical(after[k])) out[k] = { from: before[k], to: after[k] };
  }
  return out;
}

/** Adds an excavation (checked on the site, its shapes drawn first); answers its id. */
export async function createExcavation(deps: Deps, siteId: number, values: ExcavationValues, by: Actor): Promise<number> {
  const site = await siteOrigin(deps.db, siteId);
  checkPlacement(values, site);
  const [shapes] = await storedShapes(deps.geometry, [values], site);
  return deps.db
    .transaction()
    .execute(async (trx) => {
      const r = await trx
        .insertInto('excavations')
        .values({ ...columnsOf(values), ...shapes, site_id: site.id, created_by: by.id })
        .returning('id')
        .executeTakeFirstOrThrow();
      await storeAnswers(trx, [r.id]);
      await audit(trx, { actorId: by.id, siteId: site.id, entity: 'excavation', entityId: r.id, action: 'created', detail: { values } });
      return r.id;
    })
    .catch((e) => {
      throw isUniqueViolation(e) ? referenceTaken(values.reference) : e;
    });
}

/**
 * Changes an excavation: the given fields over the stored ones, with the version read (409 when
 * stale), checked whole and on the site; depth and support changes audited as such; the permits
 * that stand on it re-checked in the same transaction. Answers their outcomes (none when nothing changed).
 */
export async function updateExcavation(
  deps: Deps,
  siteId: number,
  id: number,
  body: ExcavationUpdate,
  by: Actor,
): Promise<RecheckOutcome[]> {
  const site = await siteOrigin(deps.db, siteId);
  return deps.db
    .transaction()
    .execute(async (trx) => {
      const old = await trx
        .selectFrom('excavations')
        .selectAll()
        .where('id', '=', id)
        .where('site_id', '=', site.id)
        .forUpdate()
        .executeTakeFirst();
      if (!old) throw notFound('That excavation');
      if (old.version !== body.version) {
        throw conflict(
          `Someone changed ${old.reference} since you opened it (version ${old.version}, yours ${body.version}); reload it and make your change again.`,
        );
      }
      const before = rowValues(old);
      const { version: _v, ...changes } = body;
      const given = Object.fromEntries(Object.entries(changes).filter(([, v]) => v !== undefined));
      // A pit has no width: turning a trench into a pit drops it unless one is given.
      const merged = { ...before, ...(given.kind === 'pit' && !('width' in given) ? { width: null } : {}), ...given };
      const after = parseOr400(excavationInputSchema, merged, 'request');
      checkPlacement(after, site);
      const diff = changesBetween(before, after);
      if (Object.keys(diff).length === 0) return [];
      const redraw = ['geometry', 'kind', 'width', 'depth'].some((k) => k in diff);
      const shapes = redraw ? (await storedShapes(deps.geometry, [after], site))[0] : {};
      await trx
        .updateTable('excavations')
        .set({ ...columnsOf(after), ...shapes, version: old.version + 1, updated_at: deps.now() })
        .where('id', '=', old.id)
        .execute();
      await storeAnswers(trx, [old.id]);
      // The change and its consequences (suspensions, reviews, notices) commit together.
      const outcomes = await recheckAfterExcavationChange(
        { ...deps, db: trx },
        { siteId: site.id, excavationId: old.id, before, after, by: by.name },
      );
      const supportChanged = SUPPORT_FIELDS.filter((f) => f in diff);
      await audit(trx, {
        actorId: by.id,
        siteId: site.id,
        entity: 'excavation',
        entityId: old.id,
        action: supportChanged.length ? 'depth-or-support-changed' : 'updated',
        detail: {
          reference: after.reference,
          changes: diff,
          version: old.version + 1,
          ...(outcomes.length ? { rechecked: outcomes } : {}),
        },
      });
      return outcomes;
    })
    .catch((e) => {
      throw isUniqueViolation(e) ? referenceTaken(String(body.reference)) : e;
    });
}

/** Removes an excavation no permit names (409 otherwise: set it to backfilled); its values stay in the audit log. */
export async function removeExcavation(db: Db, siteId: number, id: number, by: Actor): Promise<void> {
  await db
    .transaction()
    .execute(async (trx) => {
      // Found on this site first: one of a site the caller cannot see answers 404 like a missing
      // one, and the 409 below names only this site's permits.
      const mine = await trx
        .selectFrom('excavations')
        .select('id')
        .where('id', '=', id)
        .where('site_id', '=', siteId)
        .forUpdate()
        .executeTakeFirst();
      if (!mine) throw notFound('That excavation');
      const named = await permitsReferring(trx, { excavationId: id, siteId });
      if (named.length)
        throw conflict(`That excavation is named on permit ${listNumbers(named)}; set it to backfilled instead of removing it.`);
      const old = await trx.deleteFrom('excavations').where('id', '=', id).where('site_id', '=', siteId).returningAll().executeTakeFirst();
      if (!old) throw notFound('That excavation');
      await audit(trx, {
        actorId: by.id,
        siteId,
        entity: 'excavation',
        entityId: old.id,
        action: 'deleted',
        detail: { values: rowValues(old) },
      });
    })
    .catch((e) => {
      throw isForeignKeyViolation(e)
        ? conflict('That excavation is named on permits or inspections; set it to backfilled instead of removing it.')
        : e;
    });
}

/** Who changed an excavation and when, newest first (at most 200 entries). */
export async function excavationHistory(db: Db, siteId: number, id: number) {
  await oneOrNotFound(db, siteId, id);
  const rows = await db
    .selectFrom('audit_log')
    .leftJoin('users', 'users.id', 'audit_log.actor_id')
    .select(['audit_log.id', 'audit_log.at', 'audit_log.action', 'audit_log.detail', 'users.name as by'])
    .where('audit_log.entity', '=', 'excavation')
    .where('audit_log.entity_id', '=', String(id))
    .where('audit_log.site_id', '=', siteId)
    .orderBy('audit_log.id', 'desc')
    .limit(200)
    .execute();
  return rows.map((r) => ({
    id: r.id,
    at: new Date(r.at).toISOString(),
    by: r.by ?? 'unknown',
    action: r.action,
    changes: storedAuditDetail(r.detail).changes ?? null,
  }));
}

/** An import: what was made and changed, or (nothing imported) every refused feature and how many the file held. */
type ImportOutcome = { ok: true; report: ImportReport } | { ok: false; report: ImportReport; total: number };

/**
 * Imports a GeoJSON FeatureCollection: `add` refuses a reference already on the site, `replace`
 * changes it (re-checking its permits). Every feature is checked first; if any is refused nothing
 * is imported. A file that cannot be read answers 400 naming `file`.
 */
export async function importExcavations(deps: Deps, siteId: number, text: string, mode: ImportMode, by: Actor): Promise<ImportOutcome> {
  const { db } = deps;
  const site = await siteOrigin(db, siteId);
  const plan = await readImport(text, projectionOf(site));
  if (plan.fileError) throw badRequest(`The file ${plan.fileError}.`, { file: plan.fileError });

  const existing = new Map(
    (await db.selectFrom('excavations').select(['id', 'reference']).where('site_id', '=', site.id).execute()).map((r) => [
      r.reference,
      r.id,
    ]),
  );
  const refused = [...plan.refused];
  if (mode === 'add') {
    for (const f of plan.features) {
      if (existing.has(f.values.reference)) {
        refused.push({
          index: f.index,
          reference: f.values.reference,
          reasons: {
            reference: `is already used on this site: to update it, choose "${importModeLabels.replace}" under "${IMPORT_MODE_LABEL}"`,
          },
        });
      }
    }
  }
  if (refused.length) {
    refused.sort((a, b) => a.index - b.index);
    return { ok: false, report: { imported: [], refused }, total: plan.features.length + plan.refused.length };
  }

  // Drawn in the geometry workers before the transaction opens, so no row is locked meanwhile.
  const shapes = await storedShapes(
    deps.geometry,
    plan.features.map((f) => f.values),
    site,
  );
  const report: ImportReport = await db
    .transaction()
    .execute(async (trx) => {
      const imported: ImportReport['imported'] = [];
      for (const [n, { index, values }] of plan.features.entries()) {
        const oldId = existing.get(values.reference);
        if (oldId === undefined) {
          const r = await trx
            .insertInto('excavations')
            .values({ ...columnsOf(values), ...shapes[n], site_id: site.id, created_by: by.id })
            .returning('id')
            .executeTakeFirstOrThrow();
          await audit(trx, {
            actorId: by.id,
            siteId: site.id,
            entity: 'excavation',
            entityId: r.id,
            action: 'imported',
            detail: { values },
          });
          imported.push({ index, reference: values.reference, id: r.id, action: 'created' });
        } else {
          const old = await trx.selectFrom('excavations').selectAll().where('id', '=', oldId).forUpdate().executeTakeFirstOrThrow();
          const before = rowValues(old);
          await trx
            .updateTable('excavations')
            .set({ ...columnsOf(values), ...shapes[n], version: old.version + 1, updated_at: deps.now() })
            .where('id', '=', oldId)
            .execute();
          const outcomes = await recheckAfterExcavationChange(
            { ...deps, db: trx },
            { siteId: site.id, excavationId: oldId, before, after: values, by: by.name },
          );
          await audit(trx, {
            actorId: by.id,
            siteId: site.id,
            entity: 'excavation',
            entityId: oldId,
            action: 'import-replaced',
            detail: {
              reference: values.reference,
              changes: changesBetween(before, values),
              version: old.version + 1,
              ...(outcomes.length ? { rechecked: outcomes } : {}),
            },
          });
          imported.push({ index, reference: values.reference, id: oldId, action: 'updated' });
        }
      }
      await storeAnswers(
        trx,
        imported.map((i) => i.id),
      );
      return { imported, refused: [] };
    })
    .catch((e) => {
      throw isUniqueViolation(e)
        ? conflict('Someone added an excavation with one of these references meanwhile; nothing was imported. Try again.')
        : e;
    });
  return { ok: true, report };
}

/** Attaches (an upload's id) or detaches (null) the design drawing, with its audit entry. */
export async function setDrawing(
  db: Db,
  o: { siteId: number; id: number; uploadId: number | null; actorId: number; now: Date; detail: Record<string, unknown> },
): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const r = await trx
      .updateTable('excavations')
      .set((eb) => ({ drawing_upload_id: o.uploadId, version: eb('version', '+', 1), updated_at: o.now }))
      .where('id', '=', o.id)
      .where('site_id', '=', o.siteId)
      .returning('reference')
      .executeTakeFirst();
    if (!r) throw notFound('That excavation');
    await storeAnswers(trx, [o.id]);
    await audit(trx, {
      actorId: o.actorId,
      siteId: o.siteId,
      entity: 'excavation',
      entityId: o.id,
      action: o.uploadId ? 'drawing-attached' : 'drawing-removed',
      detail: { reference: r.reference, ...o.detail },
    });
  });
}
