import { organisationOfSite, ownIds } from '../organisation';
import { sql } from 'kysely';
import type { Db } from '@db/database';
import {
  editableStatuses,
  statusLabels,
  type PermitCreate,
  type PermitStatus,
  type PermitUpdate,
  type PlacedLoad,
  storedLoads,
} from '@shared/schemas/permits';
import type { Deps } from '../../deps';
import { badRequest, conflict, notFound, refuseFields } from '../../http';
import { audit } from '../audit';
import { checkStoredRevision } from './check';
import { StaleError } from './machine';
import { currentRevisionRow } from './read';

/**
 * Checks that what a request names belongs to its site: excavations of the site (not backfilled),
 * operators who hold the operator role there, plant items of the library. 400 naming each field.
 */
async function assertReferences(
  db: Db,
  siteId: number,
  c: { excavationIds?: number[]; operatorIds?: number[]; loads?: PlacedLoad[] },
): Promise<void> {
  const fields: Record<string, string> = {};
  if (c.excavationIds?.length) {
    const rows = await db
      .selectFrom('excavations')
      .select(['id', 'state'])
      .where('site_id', '=', siteId)
      .where('id', 'in', c.excavationIds)
      .execute();
    c.excavationIds.forEach((id, i) => {
      const row = rows.find((r) => r.id === id);
      if (!row) fields[`excavationIds[${i}]`] = 'is not an excavation of this site';
      else if (row.state === 'backfilled') fields[`excavationIds[${i}]`] = 'is backfilled';
    });
    if (new Set(c.excavationIds).size !== c.excavationIds.length) fields.excavationIds = 'names an excavation twice';
  }
  if (c.operatorIds?.length) {
    const rows = await db
      .selectFrom('site_members')
      .innerJoin('users', 'users.id', 'site_members.user_id')
      .select('user_id')
      .where('site_id', '=', siteId)
      .where('role', '=', 'operator')
      .where('users.active', '=', true)
      .where('user_id', 'in', c.operatorIds)
      .execute();
    c.operatorIds.forEach((id, i) => {
      if (!rows.some((r) => r.user_id === id)) fields[`operatorIds[${i}]`] = 'is not a plant operator on this site';
    });
  }
  const plantIds = (c.loads ?? []).flatMap((l) => (l.kind === 'plant' ? [l.plantItemId] : []));
  if (plantIds.length) {
    // Only the site's organisation's library: a machine of another organisation is as if absent.
    const scope = await organisationOfSite(db, siteId);
    const own = scope ? await ownIds(db, scope, 'plant_items', plantIds) : new Set<number>();
    (c.loads ?? []).forEach((l, i) => {
      if (l.kind === 'plant' && !own.has(l.plantItemId)) fields[`loads[${i}].plantItemId`] = 'is not in the plant library';
    });
  }
  refuseFields(fields);
}

async function setOperators(db: Db, revisionId: number, operatorIds: number[]): Promise<void> {
  await db
    .deleteFrom('permit_operators')
    .where('revision_id', '=', revisionId)
    .where('user_id', 'not in', operatorIds.length ? operatorIds : [0])
    .execute();
  for (const userId of operatorIds) {
    await db
      .insertInto('permit_operators')
      .values({ revision_id: revisionId, user_id: userId })
      .onConflict((oc) => oc.doNothing())
      .execute();
  }
}

/**
 * A new draft permit requested by a supervisor. Its number is the site's next (P-0001, P-0002, …).
 * When it names excavations and loads, the check is run at once (a load touching an excavation is
 * refused, nothing is saved).
 */
export async function createPermit(deps: Deps, user: { id: number; name: string }, body: PermitCreate): Promise<number> {
  const now = deps.now();
  return deps.db.transaction().execute(async (trx) => {
    const site = await trx
      .selectFrom('sites')
      .select(['id', 'default_method'])
      .where('id', '=', body.siteId)
      .forUpdate()
      .executeTakeFirst();
    if (!site) throw badRequest('That site does not exist.', { siteId: 'is not a site' });
    await assertReferences(trx, site.id, body);
    const last = await trx
      .selectFrom('permits')
      .select(sql<number>`coalesce(max(seq), 0)`.as('seq'))
      .where('site_id', '=', site.id)
      .executeTakeFirstOrThrow();
    const seq = Number(last.seq) + 1;
    const number = `P-${String(seq).padStart(4, '0')}`;
    const permit = await trx
      .insertInto('permits')
      .values({ site_id: site.id, seq, number, kind: body.kind, requested_by: user.id, created_at: now, updated_at: now })
      .returning('id')
      .executeTakeFirstOrThrow();
    const rev = await trx
      .insertInto('permit_revisions')
      .values({
        permit_id: permit.id,
        revision: 1,
        description: body.description,
        window_start: body.windowStart,
        window_end: body.windowEnd,
        excavation_ids: body.excavationIds,
        method: body.method ?? (site.default_method as 'dispersion-45' | 'elastic'),
        loads: JSON.stringify(body.loads),
        dig: body.dig ? JSON.stringify(body.dig) : null,
        created_by: user.id,
        created_at: now,
        updated_at: now,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await setOperators(trx, rev.id, body.operatorIds);
    if (body.excavationIds.length && body.loads.length) await checkStoredRevision(trx, permit.id, now);
    await trx
      .insertInto('permit_events')
      .values({
        permit_id: permit.id,
        revision: 1,
        at: now,
        actor_id: user.id,
        actor_name: user.name,
        action: 'create',
        from_status: null,
        to_status: 'draft',
        detail: JSON.stringify({ number }),
      })
      .execute();
    await audit(trx, {
      actorId: user.id,
      siteId: site.id,
      entity: 'permit',
      entityId: permit.id,
      action: 'created',
      detail: { number, kind: body.kind },
    });
    return permit.id;
  });
}

/**
 * Changes a draft or returned permit (a frozen one answers 409: make a new revision). The version
 * must match. The check is run again on the new content; when it refuses the content (a load
 * touching an excavation), nothing is changed.
 */
export async function updatePermit(deps: Deps, user: { id: number; name: string }, permitId: number, body: PermitUpdate): Promise<void> {
  const now = deps.now();
  await deps.db.transaction().execute(async (trx) => {
    const p = await trx
      .selectFrom('permits')
      .select(['id', 'site_id', 'number', 'status', 'version', 'revision'])
      .where('id', '=', permitId)
      .forUpdate()
      .executeTakeFirst();
    if (!p) throw notFound('That permit');
    if (body.version !== p.version) {
      throw new StaleError(
        `Permit ${p.number} has changed since you opened it (now version ${p.version}, ${statusLabels[p.status]}). Reload it before you change it.`,
        {
          status: p.status,
          version: p.version,
        },
      );
    }
    if (!editableStatuses.includes(p.status as PermitStatus)) {
      throw conflict(`Permit ${p.number} is ${statusLabels[p.status]}: its content is frozen. Make a new revision to change it.`);
    }
    await assertReferences(trx, p.site_id, body);
    const rev = await currentRevisionRow(trx, p);
    const start = body.windowStart ? new Date(body.windowStart) : new Date(rev.window_start);
    const end = body.windowEnd ? new Date(body.windowEnd) : new Date(rev.window_end);
    if (end <= start) throw badRequest('The window must end after it starts.', { windowEnd: 'must be after the start of the window' });
    const set = {
      ...(body.description !== undefined ? { description: body.description } : {}),
      ...(body.windowStart !== undefined ? { window_start: body.windowStart } : {}),
      ...(body.windowEnd !== undefined ? { window_end: body.windowEnd } : {}),
      ...(body.excavationIds !== undefined ? { excavation_ids: body.excavationIds } : {}),
      ...(body.loads !== undefined ? { loads: JSON.stringify(body.loads) } : {}),
      ...(body.dig !== undefined ? { dig: body.dig === null ? null : JSON.stringify(body.dig) } : {}),
      ...(body.method !== undefined ? { method: body.method } : {}),
    };
    await trx
      .updateTable('permit_revisions')
      .set({ ...set, updated_at: now })
      .where('id', '=', rev.id)
      .execute();
    if (body.operatorIds) await setOperators(trx, rev.id, body.operatorIds);
    const after = await trx
      .selectFrom('permit_revisions')
      .select(['excavation_ids', 'loads'])
      .where('id', '=', rev.id)
      .executeTakeFirstOrThrow();
    if (after.excavation_ids.length && storedLoads(after.loads).length) await checkStoredRevision(trx, p.id, now);
    else await trx.updateTable('permit_revisions').set({ check_result: null, checked_at: null }).where('id', '=', rev.id).execute();
    await trx
      .updateTable('permits')
      .set({ version: p.version + 1, updated_at: now })
      .where('id', '=', p.id)
      .execute();
    const changed = Object.keys(body).filter((k) => k !== 'version');
    await trx
      .insertInto('permit_events')
      .values({
        permit_id: p.id,
        revision: p.revision,
        at: now,
        actor_id: user.id,
        actor_name: user.name,
        action: 'edit',
        from_status: null,
        to_status: null,
        detail: JSON.stringify({ changed }),
      })
      .execute();
    await audit(trx, {
      actorId: user.id,
      siteId: p.site_id,
      entity: 'permit',
      entityId: p.id,
      action: 'updated',
      detail: { number: p.number, changed },
    });
  });
}

/** A comment on the permit's timeline. */
export async function addComment(deps: Deps, user: { id: number; name: string }, permitId: number, text: string): Promise<void> {
  const p = await deps.db.selectFrom('permits').select(['id', 'revision', 'site_id']).where('id', '=', permitId).executeTakeFirst();
  if (!p) throw notFound('That permit');
  await deps.db
    .insertInto('permit_events')
    .values({
      permit_id: p.id,
      revision: p.revision,
      at: deps.now(),
      actor_id: user.id,
      actor_name: user.name,
      action: 'comment',
      from_status: null,
      to_status: null,
      comment: text,
    })
    .execute();
}
