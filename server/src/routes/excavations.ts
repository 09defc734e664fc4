import { z } from 'zod';
import type { Request, RequestHandler } from 'express';
import { idSchema } from '@shared/schemas/common';
import { oneOf } from '@shared/schemas/messages';
import {
  changedExcavationAnswer,
  excavationListQuerySchema,
  excavationsAnswer,
  historyAnswer,
  importAnswer,
  oneExcavationAnswer,
  designFieldsIn,
  excavationInputSchema,
  excavationUpdateSchema,
  importModeLabels,
  importModes,
} from '@shared/schemas/excavations';
import { Api, badRequest, HttpError, parseOr400, siteAccessOf, siteFromParam, type SiteAccess } from '../http';
import {
  createExcavation,
  excavationHistory,
  importExcavations,
  oneOrNotFound,
  removeExcavation,
  setDrawing,
  siteOrigin,
  updateExcavation,
} from '../services/excavation-changes';
import { loadExcavationPage, loadExcavations, toFeatureCollection } from '../services/excavations';
import { filesOf, limits, MB, receiveFiles, storeUpload } from '../services/uploads';
import { reasonsIn, unitsOf } from '../services/units';

/** Every member of the site reads the register (and administrators). */
export const siteReaders = { kind: 'site', roles: 'any', admin: true, siteId: siteFromParam } satisfies SiteAccess;
/** Supervisors and coordinators (and administrators) change it. */
export const siteWriters = { kind: 'site', roles: ['supervisor', 'coordinator'], admin: true, siteId: siteFromParam } satisfies SiteAccess;

/** GeoJSON import files are read whole into memory: 10 MB is thousands of excavations. */
const IMPORT_LIMIT = 10 * MB;

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
      summary: "The site's excavations with their supports, soil, outline and influence zone, by reference, a page at a time (`next`)",
      tag: 'Excavations',
      access: siteReaders,
      params: siteParams,
      query: excavationListQuerySchema,
    },
    // The guard has found the site, of the reader's organisation, and their access to it.
    async ({ params, query }) => loadExcavationPage(db, params.siteId, query),
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
    async ({ params, body, user, res, deps }) => {
      const id = await createExcavation(deps, params.siteId, body, user);
      res.status(201).json({ excavation: await oneOrNotFound(db, params.siteId, id) });
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
      const rechecked = await updateExcavation(deps, params.siteId, params.id, body, user);
      return { excavation: await oneOrNotFound(db, params.siteId, params.id), rechecked };
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
      await removeExcavation(db, params.siteId, params.id, user);
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
    async ({ params }) => ({ entries: await excavationHistory(db, params.siteId, params.id) }),
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
    async ({ req, res, params, user, deps }) => {
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
      const outcome = await importExcavations(deps, site.id, text, mode, user);
      if (!outcome.ok) {
        const { total } = outcome;
        // The reasons in the reader's units (a width limit in feet for a US reader).
        const units = await unitsOf(deps.db, user.id, site.id);
        const report = { ...outcome.report, refused: outcome.report.refused.map((r) => ({ ...r, reasons: reasonsIn(r.reasons, units) })) };
        const n = report.refused.length;
        res.status(400).json({
          error: {
            code: 'invalid',
            message: `Nothing was imported: ${n} of ${total} features ${n === 1 ? 'was' : 'were'} refused.`,
            fields: Object.fromEntries(
              report.refused.flatMap((r) => Object.entries(r.reasons).map(([k, v]) => [`features[${r.index}].${k}`, v])),
            ),
          },
          report,
        });
        return;
      }
      return { report: outcome.report };
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
