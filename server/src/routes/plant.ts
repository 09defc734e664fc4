import { z } from 'zod';
import { idSchema } from '@shared/schemas/common';
import {
  onePlantItemAnswer,
  plantItemSchema,
  plantItemUpdateSchema,
  plantLibraryAnswer,
  storedElements,
  type PlantItem,
  type PlantItemValues,
} from '@shared/schemas/plant';
import type { Db, PlantItemsTable } from '@db/database';
import type { Selectable } from 'kysely';
import { Api, conflict, forbidden, HttpError, notFound, type SessionUser } from '../http';
import { audit } from '../services/audit';
import { ownedPath, type Scope } from '../services/organisation';
import { listNumbers, permitsReferring } from '../services/permit-references';
import { isUniqueViolation, isForeignKeyViolation } from '../services/pg-errors';

type PlantRow = Selectable<PlantItemsTable>;

function plantOut(r: PlantRow): PlantItem {
  return {
    id: r.id,
    name: r.name,
    category: r.category,
    operatingMass: r.operating_mass,
    elements: storedElements(r.elements),
    designFactor: r.design_factor,
    notes: r.notes,
    version: r.version,
    updatedAt: new Date(r.updated_at).toISOString(),
  };
}

/** An organisation's plant library (or the machines `ids` names of it), lightest first within each category. */
async function loadPlant(db: Db, scope: Scope, ids?: number[]): Promise<PlantItem[]> {
  let q = db
    .selectFrom('plant_items')
    .selectAll()
    .where('organisation_id', '=', scope.organisationId)
    .orderBy('category')
    .orderBy('operating_mass')
    .orderBy('name');
  if (ids) {
    if (ids.length === 0) return [];
    q = q.where('id', 'in', ids);
  }
  return (await q.execute()).map(plantOut);
}

/**
 * An organisation's plant library is kept by its administrators and temporary works coordinators
 * (of any of its sites: a member is always of the site's organisation).
 * Runs before the body is read, so a refused call answers 403 whatever it carries.
 */
function plantEditorsOnly(db: Db) {
  return async ({ user }: { user: SessionUser }): Promise<void> => {
    if (user.isAdmin) return;
    const m = await db
      .selectFrom('site_members')
      .select('site_id')
      .where('user_id', '=', user.id)
      .where('role', '=', 'coordinator')
      .executeTakeFirst();
    if (!m) throw forbidden('Only administrators and temporary works coordinators may change the plant library.');
  };
}

function plantColumns(body: PlantItemValues) {
  return {
    name: body.name,
    category: body.category,
    operating_mass: body.operatingMass,
    elements: JSON.stringify(body.elements),
    design_factor: body.designFactor,
    notes: body.notes,
  };
}

const nameTaken = (name: string) =>
  new HttpError(400, 'invalid', `A machine called "${name}" is already in the library.`, { name: 'is already in the library' });

const params = z.object({ id: idSchema });

export function registerPlantRoutes(api: Api): void {
  const { db } = api.deps;
  const editors = plantEditorsOnly(db);
  const ownMachine = ownedPath(['id', 'plant_items', 'That machine']);
  /** An editor, then a machine of their organisation's library (404 otherwise), before the body is read. */
  const editorOfOwn = async (ctx: Parameters<typeof ownMachine>[0] & { user: SessionUser }) => {
    await editors(ctx);
    await ownMachine(ctx);
  };

  api.route(
    {
      method: 'get',
      path: '/api/plant',
      response: plantLibraryAnswer,
      summary: "My organisation's plant library (every signed-in person reads it)",
      tag: 'Plant',
      access: { kind: 'signedIn' },
    },
    async ({ user }) => ({ plant: await loadPlant(db, user) }),
  );

  api.route(
    {
      method: 'post',
      path: '/api/plant',
      response: onePlantItemAnswer,
      summary: 'Add a machine to the plant library (administrators and coordinators)',
      tag: 'Plant',
      access: { kind: 'signedIn' },
      beforeBody: editors,
      body: plantItemSchema,
      responses: { 201: 'Created' },
    },
    async ({ body, user, res }) => {
      const row = await db
        .transaction()
        .execute(async (trx) => {
          const r = await trx
            .insertInto('plant_items')
            .values({ ...plantColumns(body), organisation_id: user.organisationId })
            .returningAll()
            .executeTakeFirstOrThrow();
          await audit(trx, {
            actorId: user.id,
            entity: 'plant',
            entityId: r.id,
            action: 'created',
            detail: { name: body.name, operatingMass: body.operatingMass },
          });
          return r;
        })
        .catch((e) => {
          throw isUniqueViolation(e) ? nameTaken(body.name) : e;
        });
      res.status(201).json({ item: plantOut(row) });
    },
  );

  api.route(
    {
      method: 'patch',
      path: '/api/plant/:id',
      response: onePlantItemAnswer,
      summary: 'Change a machine (the whole item with the version it was read at; 409 when stale)',
      tag: 'Plant',
      access: { kind: 'signedIn' },
      beforeBody: editorOfOwn,
      params,
      body: plantItemUpdateSchema,
    },
    async ({ params, body, user, deps }) => {
      const row = await db
        .transaction()
        .execute(async (trx) => {
          const old = await trx
            .selectFrom('plant_items')
            .selectAll()
            .where('id', '=', params.id)
            .where('organisation_id', '=', user.organisationId)
            .forUpdate()
            .executeTakeFirst();
          if (!old) throw notFound('That machine');
          if (old.version !== body.version)
            throw conflict(
              `Someone changed ${old.name} since you opened it (version ${old.version}, yours ${body.version}); reload it and make your change again.`,
            );
          const r = await trx
            .updateTable('plant_items')
            .set({
              ...plantColumns(body),
              version: old.version + 1,
              updated_at: deps.now(),
            })
            .where('id', '=', params.id)
            .returningAll()
            .executeTakeFirstOrThrow();
          await audit(trx, {
            actorId: user.id,
            entity: 'plant',
            entityId: r.id,
            action: 'updated',
            detail: {
              before: {
                name: old.name,
                operatingMass: old.operating_mass,
                elements: storedElements(old.elements),
                designFactor: old.design_factor,
              },
              after: { name: body.name, operatingMass: body.operatingMass, elements: body.elements, designFactor: body.designFactor },
            },
          });
          return r;
        })
        .catch((e) => {
          throw isUniqueViolation(e) ? nameTaken(body.name) : e;
        });
      return { item: plantOut(row) };
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/api/plant/:id',
      responses: { 204: 'Removed' },
      summary: 'Remove a machine from the plant library',
      tag: 'Plant',
      access: { kind: 'signedIn' },
      beforeBody: editorOfOwn,
      params,
    },
    async ({ params, user }) => {
      await db
        .transaction()
        .execute(async (trx) => {
          const named = await permitsReferring(trx, { plantItemId: params.id, visibleTo: user });
          if (named.length) throw conflict(`That machine is placed on permit ${listNumbers(named)}, so it stays in the library.`);
          // Permits of sites the caller cannot see keep it too, unnamed.
          if ((await permitsReferring(trx, { plantItemId: params.id })).length)
            throw conflict('That machine is placed on permits of other sites, so it stays in the library.');
          const old = await trx.deleteFrom('plant_items').where('id', '=', params.id).returning(['id', 'name']).executeTakeFirst();
          if (!old) throw notFound('That machine');
          await audit(trx, { actorId: user.id, entity: 'plant', entityId: old.id, action: 'deleted', detail: { name: old.name } });
        })
        .catch((e) => {
          throw isForeignKeyViolation(e) ? conflict('That machine is named on permits, so it stays in the library.') : e;
        });
    },
  );
}
