import type { BriefingAnswer } from '@shared/schemas/permits';
import type { Deps } from '../../deps';
import { withCurrentRevision } from './read';
import { conflict, forbidden, notFound } from '../../http';
import { audit } from '../audit';
import { advancePermit } from './machine';

/**
 * An operator named on the permit's current revision confirms that they have been briefed on it.
 * With `revision`, only that revision (a stale confirmation answers 409). Idempotent: a second
 * confirmation keeps the first time. When it is the last confirmation and the
 * window is open, the permit goes Live at once.
 */
export async function confirmBriefing(
  deps: Deps,
  permitId: number,
  user: { id: number; name: string },
  opts: { revision?: number } = {},
): Promise<BriefingAnswer['briefing']> {
  const now = deps.now();
  const row = await withCurrentRevision(deps.db)
    .select(['p.id', 'p.number', 'p.site_id', 'p.status', 'p.revision', 'r.id as revision_id'])
    .where('p.id', '=', permitId)
    .executeTakeFirst();
  if (!row) throw notFound('That permit');
  // A confirmation made (perhaps offline) on an earlier revision does not brief the operator on this one.
  if (opts.revision !== undefined && opts.revision !== row.revision) {
    throw conflict(
      `Permit ${row.number} has changed since that briefing (now revision ${row.revision}): read it again and confirm the new briefing.`,
    );
  }
  /** The operator's line on the current revision (none: not named on it). */
  const myLine = () =>
    deps.db
      .selectFrom('permit_operators')
      .select('briefed_at')
      .where('revision_id', '=', row.revision_id)
      .where('user_id', '=', user.id)
      .executeTakeFirst();
  const mine = await myLine();
  if (!mine) throw forbidden(`You are not named as an operator on permit ${row.number}.`);
  if (mine.briefed_at) return { briefedAt: new Date(mine.briefed_at).toISOString(), status: row.status };
  if (!['approved', 'live', 'suspended'].includes(row.status))
    throw conflict(`Permit ${row.number} is not approved yet: the briefing comes after approval.`);
  await deps.db.transaction().execute(async (trx) => {
    // One briefing at a time per permit, so the last operator's confirmation sees all the others'
    // and the permit goes live in the same transaction.
    await trx.selectFrom('permits').select('id').where('id', '=', row.id).forUpdate().execute();
    const set = await trx
      .updateTable('permit_operators')
      .set({ briefed_at: now })
      .where('revision_id', '=', row.revision_id)
      .where('user_id', '=', user.id)
      .where('briefed_at', 'is', null)
      .returning('user_id')
      .executeTakeFirst();
    if (!set) return;
    await trx
      .insertInto('permit_events')
      .values({
        permit_id: row.id,
        revision: row.revision,
        at: now,
        actor_id: user.id,
        actor_name: user.name,
        action: 'briefed',
        from_status: null,
        to_status: null,
        comment: '',
        detail: JSON.stringify({}),
      })
      .execute();
    await audit(trx, {
      actorId: user.id,
      siteId: row.site_id,
      entity: 'permit',
      entityId: row.id,
      action: 'briefed',
      detail: { number: row.number, revision: row.revision },
    });
    await advancePermit({ ...deps, db: trx }, row.id);
  });
  const after = await deps.db.selectFrom('permits').select('status').where('id', '=', row.id).executeTakeFirstOrThrow();
  const briefedAt = (await myLine())?.briefed_at;
  if (!briefedAt) throw new Error(`the briefing of permit ${row.number} was not recorded`);
  return { briefedAt: new Date(briefedAt).toISOString(), status: after.status };
}
