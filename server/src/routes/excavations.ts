import { z } from 'zod';
import type { Request, RequestHandler } from 'express';
import { idSchema } from '@shared/schemas/common';
import { oneOf } from '@shared/schemas/messages';
import {
  canonical,
  changedExcavationAnswer,
  excavationsAnswer,
  historyAnswer,
  importAnswer,
  oneExcavationAnswer,
  designFieldsIn,
  excavationInputSchema,
  excavationUpdateSchema,
  IMPORT_MODE_LABEL,
  importModeLabels,
  importModes,
  type ExcavationValues,
  type ImportReport,
} from '@shared/schemas/excavations';
import type { Db } from '@db/database';
import { Api, badRequest, conflict, HttpError, notFound, parseOr400, siteAccessOf, siteFromParam, type SiteAccess } from '../http';
import { audit } from '../services/audit';
import { listNumbers, permitsReferring } from '../services/permit-references';
import {
  columnsOf,
  loadExcavations,
  placementProblems,
  projectionOf,
  readImport,
  rowValues,
  storedShapes,
  toFeatureCollection,
} from '../services/excavations';
import { isForeignKeyViolation, isUniqueViolation } from '../services/pg-errors';
import { filesOf, limits, MB, receiveFiles, storeUpload } from '../services/uploads';
import { recheckAfterExcavationChange, type RecheckOutcome } from '../services/permits/recheck';

/** Every member of the site reads the register (and administrators). */
export const siteReaders = { kind: 'site', roles: 'any', admin: true, siteId: siteFromParam } satisfies SiteAccess;
/** Supervisors and coordinators (and administrators) change it. */
export const siteWriters = { kind: 'site', roles: ['supervisor', 'coordinator'], admin: true, siteId: siteFromParam } satisfies SiteAccess;

/** GeoJSON import files are read whole into memory: 10 MB is thousands of excavations. */
export const IMPORT_LIMIT = 10 * MB;

const siteParams = z.object({ siteId: idSchema });
const oneParams = z.object({ siteId: idSchema, id: idSchema });

/** Whether the caller is a supervisor (and not an administrator): they record what is on the ground, not the design. */
function isSupervisor(req: Request): boolean {
  return !req.user?.isAdmin && siteAccessOf(req)?.role === 'supervisor';
}

/** 403 naming the design fields a supervisor sent (`prefix` for import features: `features[2].`). */
function designDataRefused(fields: string[]): HttpError {
  const names = fields.map((f) => f.replace(/^features\[\d+\]\./, ''));
  return new HttpError(
    403,
    'forbidden',
    `Only a coordinator or an administrator sets an excavation's design data (${[...new Set(names)].join(', ')}). Supervisors record what is on the ground: outline, depth as dug, state, name and notes.`,
    Object.fromEntries(fields.map((f) => [f, 'is set by a coordinator or an administrator'])),
  );
}

/** Refuses design fields from a supervisor before the body is validated (the role decides first). */
const designByCoordinators: RequestHandler = (req, _res, next) => {
  if (isSupervisor(req)) {
    const sent = designFieldsIn(req.body);
    if (sent.length) throw designDataRefused(sent);
  }
  next();
};

/** The design fields that the features of an import file set, as `features[i].field` (none when it is not readable: validation says why). */
function designFieldsInImport(text: string): string[] {
  try {
    const doc = JSON.parse(text.replace(/^\uFEFF/, '')) as { features?: unknown };
    if (!Array.isArray(doc?.features)) return [];
    return doc.features.flatMap((f: unknown, i: number) =>
      designFieldsIn((f as { properties?: unknown } | null)?.properties).map((k) => `features[${i}].${k}`),
    );
  } catch {
    return [];
  }
}

/** Fields whose change the audit log must show with who and when (depth and the support). */
const SUPPORT_FIELDS = ['depth', 'supportType', 'designSurcharge', 'ratedPressure', 'restraint', 'pressureState', 'wallFriction'] as const;

async function siteOrigin(db: Db, siteId: number) {
  const site = await db.selectFrom('sites').select(['id', 'name', 'latitude', 'longitude']).where('id', '=', siteId).executeTakeFirst();
  if (!site) throw notFound('That site');
  return site;
}

/** 400 naming each field when the excavation cannot be placed on this site. */
function checkPlacement(values: ExcavationValues, site: { latitude: number; longitude: number }): void {
  const fields = placementProblems(values, projectionOf(site));
  if (Object.keys(fields).length) {
    throw badRequest(
      `Please correct the request: ${Object.entries(fields)
        .map(([k, v]) => `${k} ${v}`)
        .join('; ')}`,
      fields,
    );
  }
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

async function oneOrNotFound(db: Db, siteId: number, id: number) {
  const [e] = await loadExcavations(db, siteId, [id]);
  if (!e) throw notFound('That excavation');
  return e;
}

function safeFileName(s: string): string {
  return (
    s
      .replace(/[^A-Za-z0-9 _-]+/g, '')
      .trim()
      .replace(/\s+/g, '-')
      .toLowerCase() || 'site'
  );
}

export function registerExcavationRoutes(api: Api): void {
  const { db } = api.deps;

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/excavations',
      response: excavationsAnswer,
      summary: "The site's excavations with their supports, soil, outline and influence zone",
      tag: 'Excavations',
      access: siteReaders,
      params: siteParams,
    },
    async ({ params }) => {
      await siteOrigin(db, params.siteId);
      return { excavations: await loadExcavations(db, params.siteId) };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/sites/:siteId/excavations',
      response: oneExcavationAnswer,
      summary:
        'Add an excavation (supervisors, coordinators); the geometry is checked (valid, not crossing itself, within 5 km of the site)',
      tag: 'Excavations',
      access: siteWriters,
      params: siteParams,
      body: excavationInputSchema,
      before: [designByCoordinators],
      responses: { 201: 'Created' },
    },
    async ({ params, body, user, res }) => {
      const site = await siteOrigin(db, params.siteId);
      checkPlacement(body, site);
      const [shapes] = await storedShapes(api.deps.geometry, [body], site);
      const id = await db
        .transaction()
        .execute(async (trx) => {
          const r = await trx
            .insertInto('excavations')
            .values({ ...columnsOf(body), ...shapes, site_id: site.id, created_by: user.id })
            .returning('id')
            .executeTakeFirstOrThrow();
          await audit(trx, {
            actorId: user.id,
            siteId: site.id,
            entity: 'excavation',
            entityId: r.id,
            action: 'created',
            detail: { values: body },
          });
          return r.id;
        })
        .catch((e) => {
          throw isUniqueViolation(e) ? referenceTaken(body.reference) : e;
        });
      res.status(201).json({ excavation: await oneOrNotFound(db, site.id, id) });
    },
  );

  api.route(
    {
      method: 'patch',
      path: '/api/sites/:siteId/excavations/:id',
      response: changedExcavationAnswer,
      summary:
        'Change an excavation: any fields with the version you read (409 when stale; design data by coordinators only, 403 naming the fields); changes to depth and support are audited, and a change to the check inputs re-checks every permit that stands on it in the same transaction',
      tag: 'Excavations',
      access: siteWriters,
      params: oneParams,
      body: excavationUpdateSchema,
      before: [designByCoordinators],
    },
    async ({ params, body, user, deps }) => {
      const site = await siteOrigin(db, params.siteId);
      const rechecked: RecheckOutcome[] = await db
        .transaction()
        .execute(async (trx) => {
          const old = await trx
            .selectFrom('excavations')
            .selectAll()
            .where('id', '=', params.id)
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
          // The permits that stand on it are re-checked in this transaction: the change and its
          // consequences (suspensions, reviews, notices) commit together.
          const outcomes = await recheckAfterExcavationChange(
            { ...deps, db: trx },
            { siteId: site.id, excavationId: old.id, before, after, by: user.name },
          );
          const supportChanged = SUPPORT_FIELDS.filter((f) => f in diff);
          await audit(trx, {
            actorId: user.id,
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
      return { excavation: await oneOrNotFound(db, site.id, params.id), rechecked };
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/api/sites/:siteId/excavations/:id',
      responses: { 204: 'Removed' },
      summary: 'Remove an excavation from the register (its record stays in the audit log)',
      tag: 'Excavations',
      access: siteWriters,
      params: oneParams,
    },
    async ({ params, user }) => {
      await db
        .transaction()
        .execute(async (trx) => {
          // The excavation is found on this site first: one of a site the caller cannot see answers
          // 404 like a missing one, and the 409 below names only this site's permits.
          const mine = await trx
            .selectFrom('excavations')
            .select('id')
            .where('id', '=', params.id)
            .where('site_id', '=', params.siteId)
            .forUpdate()
            .executeTakeFirst();
          if (!mine) throw notFound('That excavation');
          const named = await permitsReferring(trx, { excavationId: params.id, siteId: params.siteId });
          if (named.length)
            throw conflict(`That excavation is named on permit ${listNumbers(named)}; set it to backfilled instead of removing it.`);
          const old = await trx
            .deleteFrom('excavations')
            .where('id', '=', params.id)
            .where('site_id', '=', params.siteId)
            .returningAll()
            .executeTakeFirst();
          if (!old) throw notFound('That excavation');
          await audit(trx, {
            actorId: user.id,
            siteId: params.siteId,
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
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/excavations/:id/history',
      response: historyAnswer,
      summary: 'Who changed an excavation and when, newest first (depth, support and every other field)',
      tag: 'Excavations',
      access: siteReaders,
      params: oneParams,
    },
    async ({ params }) => {
      await oneOrNotFound(db, params.siteId, params.id);
      const rows = await db
        .selectFrom('audit_log')
        .leftJoin('users', 'users.id', 'audit_log.actor_id')
        .select(['audit_log.id', 'audit_log.at', 'audit_log.action', 'audit_log.detail', 'users.name as by'])
        .where('audit_log.entity', '=', 'excavation')
        .where('audit_log.entity_id', '=', String(params.id))
        .where('audit_log.site_id', '=', params.siteId)
        .orderBy('audit_log.id', 'desc')
        .limit(200)
        .execute();
      return {
        entries: rows.map((r) => ({
          id: r.id,
          at: new Date(r.at).toISOString(),
          by: r.by ?? 'unknown',
          action: r.action,
          changes: (r.detail as { changes?: Record<string, { from: unknown; to: unknown }> }).changes ?? null,
        })),
      };
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/excavations.geojson',
      summary: "The site's excavations as a GeoJSON FeatureCollection (RFC 7946) with their properties",
      tag: 'Excavations',
      access: siteReaders,
      params: siteParams,
      produces: 'application/geo+json',
    },
    async ({ params, res }) => {
      const site = await siteOrigin(db, params.siteId);
      const fc = toFeatureCollection(await loadExcavations(db, site.id));
      res.setHeader('Content-Type', 'application/geo+json; charset=utf-8');
      res.setHeader('Content-Disposition', `attachment; filename="${safeFileName(site.name)}-excavations.geojson"`);
      res.send(JSON.stringify(fc, null, 1));
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/sites/:siteId/excavations/import',
      response: importAnswer,
      summary:
        'Import excavations from a GeoJSON FeatureCollection (multipart `file`; `mode` add or replace). Every feature is checked; if any is refused nothing is imported, and the report says why',
      tag: 'Excavations',
      access: siteWriters,
      params: siteParams,
      before: [receiveFiles(['file'], IMPORT_LIMIT)],
      files: ['file'],
    },
    async ({ req, res, params, user }) => {
      const site = await siteOrigin(db, params.siteId);
      const { mode } = parseOr400(
        z.object({ mode: z.enum(importModes, { error: oneOf(importModeLabels) }).default('add') }),
        req.body ?? {},
        'request',
      );
      const [file] = filesOf(req, 'file');
      if (!file) throw badRequest('Please choose a GeoJSON file.', { file: 'is required' });
      const text = file.buffer.toString('utf8');
      if (isSupervisor(req)) {
        const sent = designFieldsInImport(text);
        if (sent.length) throw designDataRefused(sent);
      }
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
        const total = plan.features.length + plan.refused.length;
        const fields = Object.fromEntries(
          refused.flatMap((r) => Object.entries(r.reasons).map(([k, v]) => [`features[${r.index}].${k}`, v])),
        );
        const report: ImportReport = { imported: [], refused };
        res.status(400).json({
          error: {
            code: 'invalid',
            message: `Nothing was imported: ${refused.length} of ${total} features ${refused.length === 1 ? 'was' : 'were'} refused.`,
            fields,
          },
          report,
        });
        return;
      }

      // Drawn in the geometry workers before the transaction opens, so no row is locked meanwhile.
      const shapes = await storedShapes(
        api.deps.geometry,
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
                .values({ ...columnsOf(values), ...shapes[n], site_id: site.id, created_by: user.id })
                .returning('id')
                .executeTakeFirstOrThrow();
              await audit(trx, {
                actorId: user.id,
                siteId: site.id,
                entity: 'excavation',
                entityId: r.id,
                action: 'imported',
                detail: { values },
              });
              imported.push({ index, reference: values.reference, id: r.id, action: 'created' });
            } else {
              const old = await trx.selectFrom('excavations').selectAll().where('id', '=', oldId).forUpdate().executeTakeFirstOrThrow();
              const diff = changesBetween(rowValues(old), values);
              await trx
                .updateTable('excavations')
                .set({ ...columnsOf(values), ...shapes[n], version: old.version + 1, updated_at: api.deps.now() })
                .where('id', '=', oldId)
                .execute();
              const outcomes = await recheckAfterExcavationChange(
                { ...api.deps, db: trx },
                { siteId: site.id, excavationId: oldId, before: rowValues(old), after: values, by: user.name },
              );
              await audit(trx, {
                actorId: user.id,
                siteId: site.id,
                entity: 'excavation',
                entityId: oldId,
                action: 'import-replaced',
                detail: {
                  reference: values.reference,
                  changes: diff,
                  version: old.version + 1,
                  ...(outcomes.length ? { rechecked: outcomes } : {}),
                },
              });
              imported.push({ index, reference: values.reference, id: oldId, action: 'updated' });
            }
          }
          return { imported, refused: [] };
        })
        .catch((e) => {
          throw isUniqueViolation(e)
            ? conflict('Someone added an excavation with one of these references meanwhile; nothing was imported. Try again.')
            : e;
        });
      return { report };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/sites/:siteId/excavations/:id/drawing',
      response: oneExcavationAnswer,
      summary: 'Attach the design drawing of an excavation (multipart `file`, a PDF up to 20 MB, judged by its content)',
      tag: 'Excavations',
      access: siteWriters,
      params: oneParams,
      before: [receiveFiles(['file'], limits.pdf)],
      files: ['file'],
    },
    async ({ req, params, user, deps }) => {
      const before = await oneOrNotFound(db, params.siteId, params.id);
      const [file] = filesOf(req, 'file');
      if (!file) throw badRequest('Please choose the drawing (a PDF).', { file: 'is required' });
      const stored = await storeUpload(deps, file, {
        field: 'file',
        accept: 'pdf',
        purpose: 'drawing',
        siteId: params.siteId,
        userId: user.id,
      });
      await setDrawing(db, {
        siteId: params.siteId,
        id: before.id,
        uploadId: stored.id,
        actorId: user.id,
        now: deps.now(),
        detail: { name: stored.originalName, size: stored.size, replaced: before.drawing?.name ?? null },
      });
      return { excavation: await oneOrNotFound(db, params.siteId, params.id) };
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/api/sites/:siteId/excavations/:id/drawing',
      response: oneExcavationAnswer,
      summary: 'Detach the design drawing of an excavation (the file stays in the audit trail)',
      tag: 'Excavations',
      access: siteWriters,
      params: oneParams,
    },
    async ({ params, user, deps }) => {
      const before = await oneOrNotFound(db, params.siteId, params.id);
      if (!before.drawing) return { excavation: before };
      await setDrawing(db, {
        siteId: params.siteId,
        id: before.id,
        uploadId: null,
        actorId: user.id,
        now: deps.now(),
        detail: { removed: before.drawing.name },
      });
      return { excavation: await oneOrNotFound(db, params.siteId, params.id) };
    },
  );
}

async function setDrawing(
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
