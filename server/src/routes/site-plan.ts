import { z } from 'zod';
import { idSchema } from '@shared/schemas/common';
import {
  planAnswer,
  planBoundsSchema,
  planOpacitySchema,
  planUpdateSchema,
  SITE_RADIUS,
  type PlanBounds,
  type SitePlan,
} from '@shared/schemas/excavations';
import type { Db } from '@db/database';
import { Api, badRequest, notFound, parseOr400 } from '../http';
import { audit } from '../services/audit';
import { projectionOf } from '../services/excavations';
import { filesOf, limits, receiveFiles, storeUpload } from '../services/uploads';
import { siteReaders, siteWriters } from './excavations';

const siteParams = z.object({ siteId: idSchema });

async function planOf(db: Db, siteId: number): Promise<SitePlan | null> {
  const site = await db
    .selectFrom('sites')
    .leftJoin('uploads', 'uploads.id', 'sites.plan_upload_id')
    .select(['sites.id', 'sites.plan_upload_id', 'sites.plan_bounds', 'sites.plan_opacity', 'uploads.original_name'])
    .where('sites.id', '=', siteId)
    .executeTakeFirst();
  if (!site) throw notFound('That site');
  if (!site.plan_upload_id || !site.plan_bounds) return null;
  return { uploadId: site.plan_upload_id, name: site.original_name ?? 'site plan', bounds: site.plan_bounds, opacity: site.plan_opacity };
}

/** The plan's middle must lie within SITE_RADIUS of the origin, so it cannot be pinned to the wrong place by a slip of a digit. */
async function checkNearSite(db: Db, siteId: number, b: PlanBounds): Promise<void> {
  const site = await db.selectFrom('sites').select(['latitude', 'longitude']).where('id', '=', siteId).executeTakeFirstOrThrow();
  const [x, y] = projectionOf(site).toLocal([(b.west + b.east) / 2, (b.south + b.north) / 2]);
  if (Math.hypot(x, y) > SITE_RADIUS) {
    throw badRequest(
      `The plan's corners put it ${(Math.hypot(x, y) / 1000).toFixed(1)} km from the site origin; it must lie within ${SITE_RADIUS / 1000} km.`,
      {
        bounds: `must lie within ${SITE_RADIUS / 1000} km of the site origin`,
      },
    );
  }
}

/** What a change to the site's plan sets (what is left out stays as it is; null takes it off). */
interface PlanChange {
  uploadId?: number | null;
  bounds?: PlanBounds | null;
  opacity?: number;
}

/** Changes the site's plan and writes the audit line for it, both or neither. */
async function changePlan(db: Db, siteId: number, actorId: number, change: PlanChange, action: string, detail: Record<string, unknown>) {
  await db.transaction().execute(async (trx) => {
    await trx
      .updateTable('sites')
      .set({
        ...(change.uploadId !== undefined ? { plan_upload_id: change.uploadId } : {}),
        ...(change.bounds !== undefined ? { plan_bounds: change.bounds && JSON.stringify(change.bounds) } : {}),
        ...(change.opacity !== undefined ? { plan_opacity: change.opacity } : {}),
      })
      .where('id', '=', siteId)
      .execute();
    await audit(trx, { actorId, siteId, entity: 'site', entityId: siteId, action, detail });
  });
}

/** The site plan image pinned to the map by its south-west and north-east corners. */
export function registerSitePlanRoutes(api: Api): void {
  const { db } = api.deps;

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/plan',
      response: planAnswer,
      summary: 'The site plan image, its corners and opacity (null when none)',
      tag: 'Site map',
      access: siteReaders,
      params: siteParams,
    },
    async ({ params }) => ({ plan: await planOf(db, params.siteId) }),
  );

  api.route(
    {
      method: 'put',
      path: '/api/sites/:siteId/plan',
      response: planAnswer,
      summary:
        'Upload the site plan image (multipart `file`: PNG or JPEG up to 10 MB, judged by content) with its corners `south`, `west`, `north`, `east` and `opacity`',
      tag: 'Site map',
      access: siteWriters,
      params: siteParams,
      before: [receiveFiles(['file'], limits.image)],
      files: ['file'],
    },
    async ({ req, params, user, deps }) => {
      const text = (req.body ?? {}) as Record<string, string | undefined>;
      const num = (k: string) => (text[k] === undefined || text[k] === '' ? undefined : Number(text[k]));
      const bounds = parseOr400(
        planBoundsSchema,
        { south: num('south'), west: num('west'), north: num('north'), east: num('east') },
        'plan corners',
      );
      const opacity =
        num('opacity') === undefined
          ? 0.7
          : parseOr400(z.object({ opacity: planOpacitySchema }), { opacity: num('opacity') }, 'request').opacity;
      await checkNearSite(db, params.siteId, bounds);
      const [file] = filesOf(req, 'file');
      if (!file) throw badRequest('Please choose the site plan image (PNG or JPEG).', { file: 'is required' });
      const stored = await storeUpload(deps, file, {
        field: 'file',
        accept: 'image',
        purpose: 'site-plan',
        siteId: params.siteId,
        userId: user.id,
      });
      await changePlan(db, params.siteId, user.id, { uploadId: stored.id, bounds, opacity }, 'plan-uploaded', {
        name: stored.originalName,
        size: stored.size,
        bounds,
        opacity,
      });
      return { plan: await planOf(db, params.siteId) };
    },
  );

  api.route(
    {
      method: 'patch',
      path: '/api/sites/:siteId/plan',
      response: planAnswer,
      summary: "Move the site plan's corners or change its opacity",
      tag: 'Site map',
      access: siteWriters,
      params: siteParams,
      body: planUpdateSchema,
    },
    async ({ params, body, user }) => {
      const plan = await planOf(db, params.siteId);
      if (!plan) throw notFound('The site plan');
      if (!body.bounds && body.opacity === undefined) return { plan };
      if (body.bounds) await checkNearSite(db, params.siteId, body.bounds);
      await changePlan(db, params.siteId, user.id, { bounds: body.bounds, opacity: body.opacity }, 'plan-changed', {
        before: { bounds: plan.bounds, opacity: plan.opacity },
        after: body,
      });
      return { plan: await planOf(db, params.siteId) };
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/api/sites/:siteId/plan',
      responses: { 204: 'Taken off the map' },
      summary: 'Take the site plan image off the map',
      tag: 'Site map',
      access: siteWriters,
      params: siteParams,
    },
    async ({ params, user }) => {
      const plan = await planOf(db, params.siteId);
      if (!plan) return;
      await changePlan(db, params.siteId, user.id, { uploadId: null, bounds: null }, 'plan-removed', { name: plan.name });
    },
  );
}
