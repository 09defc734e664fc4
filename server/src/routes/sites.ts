import { z } from 'zod';
import { idSchema } from '@shared/schemas/common';
import { oneSiteAnswer, siteSchema, sitesAnswer, siteUnitsSchema, siteUpdateSchema, type Site } from '@shared/schemas/sites';
import { DEFAULT_CLEARANCE } from '@shared/schemas/calcUnits';
import type { UnitSystem } from '@shared/units';
import type { Db } from '@db/database';
import { Api, notFound, siteFromParam } from '../http';
import { audit } from '../services/audit';
import { ownedPath } from '../services/organisation';

type SiteRow = {
  id: number;
  name: string;
  latitude: number;
  longitude: number;
  timezone: string;
  minimum_clearance: number;
  default_method: string;
  units: UnitSystem;
  created_at: Date;
};

function siteOut(r: SiteRow): Site {
  return {
    id: r.id,
    name: r.name,
    latitude: r.latitude,
    longitude: r.longitude,
    timezone: r.timezone,
    minimumClearance: r.minimum_clearance,
    defaultMethod: r.default_method as Site['defaultMethod'],
    units: r.units,
    createdAt: new Date(r.created_at).toISOString(),
  };
}

async function getSite(db: Db, id: number): Promise<Site | null> {
  const r = await db.selectFrom('sites').selectAll().where('id', '=', id).executeTakeFirst();
  return r ? siteOut(r) : null;
}

const siteParams = z.object({ siteId: idSchema });

/**
 * A change of a site's units moves a minimum clearance still at the other system's default (0.6 m,
 * or OSHA's 2 ft) to the new system's; a clearance set otherwise stays (docs/calculation.md, "Units").
 */
function clearanceForUnits(units: UnitSystem, current: number): number {
  const other: UnitSystem = units === 'us' ? 'metric' : 'us';
  return Math.abs(current - DEFAULT_CLEARANCE[other]) < 1e-9 ? DEFAULT_CLEARANCE[units] : current;
}

export function registerSiteRoutes(api: Api): void {
  const { db } = api.deps;

  api.route(
    {
      method: 'get',
      path: '/api/sites',
      response: sitesAnswer,
      summary: "The sites I am a member of (all my organisation's sites for an administrator)",
      tag: 'Sites',
      access: { kind: 'signedIn' },
    },
    async ({ user }) => {
      let q = db.selectFrom('sites').selectAll('sites').where('sites.organisation_id', '=', user.organisationId).orderBy('sites.name');
      if (!user.isAdmin) q = q.innerJoin('site_members', 'site_members.site_id', 'sites.id').where('site_members.user_id', '=', user.id);
      return { sites: (await q.execute()).map(siteOut) };
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId',
      response: oneSiteAnswer,
      summary: 'One site',
      tag: 'Sites',
      access: { kind: 'site', roles: 'any', admin: true, siteId: siteFromParam },
      params: siteParams,
    },
    async ({ params }) => {
      const site = await getSite(db, params.siteId);
      if (!site) throw notFound('That site');
      return { site };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/sites',
      response: oneSiteAnswer,
      summary: 'Create a site',
      tag: 'Sites',
      access: { kind: 'admin' },
      body: siteSchema,
      responses: { 201: 'Created' },
    },
    async ({ body, user, res }) => {
      const site = await db.transaction().execute(async (trx) => {
        const r = await trx
          .insertInto('sites')
          .values({
            organisation_id: user.organisationId,
            name: body.name,
            latitude: body.latitude,
            longitude: body.longitude,
            timezone: body.timezone,
            minimum_clearance: body.minimumClearance ?? DEFAULT_CLEARANCE[body.units],
            default_method: body.defaultMethod,
            units: body.units,
          })
          .returningAll()
          .executeTakeFirstOrThrow();
        await audit(trx, { actorId: user.id, siteId: r.id, entity: 'site', entityId: r.id, action: 'created', detail: body });
        return r;
      });
      res.status(201).json({ site: siteOut(site) });
    },
  );

  api.route(
    {
      method: 'patch',
      path: '/api/sites/:siteId',
      response: oneSiteAnswer,
      summary: 'Change a site',
      tag: 'Sites',
      access: { kind: 'admin' },
      params: siteParams,
      beforeBody: ownedPath(['siteId', 'sites', 'That site']),
      body: siteUpdateSchema,
    },
    async ({ params, body, user }) => {
      const before = body.units !== undefined && body.minimumClearance === undefined ? await getSite(db, params.siteId) : null;
      const set = {
        ...(body.units !== undefined ? { units: body.units } : {}),
        ...(before && body.units ? { minimum_clearance: clearanceForUnits(body.units, before.minimumClearance) } : {}),
        ...(body.name !== undefined ? { name: body.name } : {}),
        ...(body.latitude !== undefined ? { latitude: body.latitude } : {}),
        ...(body.longitude !== undefined ? { longitude: body.longitude } : {}),
        ...(body.timezone !== undefined ? { timezone: body.timezone } : {}),
        ...(body.minimumClearance !== undefined ? { minimum_clearance: body.minimumClearance } : {}),
        ...(body.defaultMethod !== undefined ? { default_method: body.defaultMethod } : {}),
      };
      const site = await db.transaction().execute(async (trx) => {
        const r = Object.keys(set).length
          ? await trx.updateTable('sites').set(set).where('id', '=', params.siteId).returningAll().executeTakeFirst()
          : await trx.selectFrom('sites').selectAll().where('id', '=', params.siteId).executeTakeFirst();
        if (!r) throw notFound('That site');
        await audit(trx, { actorId: user.id, siteId: r.id, entity: 'site', entityId: r.id, action: 'updated', detail: body });
        return r;
      });
      return { site: siteOut(site) };
    },
  );

  api.route(
    {
      method: 'put',
      path: '/api/sites/:siteId/units',
      response: oneSiteAnswer,
      summary: "Set a site's default units (metric or US customary) for its people who have not chosen their own",
      tag: 'Sites',
      access: { kind: 'site', roles: ['coordinator'], admin: true, siteId: siteFromParam },
      params: siteParams,
      body: siteUnitsSchema,
    },
    async ({ params, body, user }) => {
      const site = await db.transaction().execute(async (trx) => {
        const now = await trx
          .selectFrom('sites')
          .select('minimum_clearance')
          .where('id', '=', params.siteId)
          .forUpdate()
          .executeTakeFirst();
        if (!now) throw notFound('That site');
        const r = await trx
          .updateTable('sites')
          .set({ units: body.units, minimum_clearance: clearanceForUnits(body.units, now.minimum_clearance) })
          .where('id', '=', params.siteId)
          .returningAll()
          .executeTakeFirstOrThrow();
        await audit(trx, { actorId: user.id, siteId: r.id, entity: 'site', entityId: r.id, action: 'units-set', detail: body });
        return r;
      });
      return { site: siteOut(site) };
    },
  );
}
