import type { Db } from '@db/database';
import type { ActorRole, PermitAction } from '@shared/schemas/permits';

/**
 * Who changes a permit: a signed-in person (whose role on the permit's site is read afresh), or
 * Brink itself: the schedule (Live, Lapsed) or a failed inspection (Suspend), named for the
 * timeline.
 */
export type Actor = { kind: 'user'; id: number; name: string } | { kind: 'system'; name: string };

export const scheduleActor: Actor = { kind: 'system', name: 'Brink schedule' };

/** A system actor for a failed inspection, e.g. `inspectionActor('Shift inspection of T1 failed')`. */
export function inspectionActor(what: string): Actor {
  return { kind: 'system', name: what };
}

export function userActor(user: { id: number; name: string }): Actor {
  return { kind: 'user', id: user.id, name: user.name };
}

/** The actor's role on a site: 'system' for Brink, the membership's role, or null for a non-member. */
export async function roleOf(db: Db, actor: Actor, siteId: number): Promise<ActorRole | null> {
  if (actor.kind === 'system') return 'system';
  const m = await db
    .selectFrom('site_members')
    .select('role')
    .where('site_id', '=', siteId)
    .where('user_id', '=', actor.id)
    .executeTakeFirst();
  return m?.role ?? null;
}

/** The decisions on a request; nobody takes one on a permit they requested or changed. */
export const DECISIONS: readonly PermitAction[] = ['approve', 'return', 'decline'];
/** Timeline actions that make a person an author of a permit (any revision of it). */
const AUTHORING = ['create', 'edit', 'revise', 'submit'];

/**
 * Whether the person requested the permit or changed any revision of it: asked for it, created or
 * edited a revision, revised it or sent it for review. Read from the records, so it holds whatever
 * role the person has now.
 */
export async function isAuthorOf(db: Db, permitId: number, userId: number): Promise<boolean> {
  const row = await db
    .selectFrom('permits as p')
    .select((eb) => [
      eb
        .or([
          eb('p.requested_by', '=', userId),
          eb.exists(
            eb.selectFrom('permit_revisions as r').select('r.id').whereRef('r.permit_id', '=', 'p.id').where('r.created_by', '=', userId),
          ),
          eb.exists(
            eb
              .selectFrom('permit_events as e')
              .select('e.id')
              .whereRef('e.permit_id', '=', 'p.id')
              .where('e.actor_id', '=', userId)
              .where('e.action', 'in', AUTHORING),
          ),
        ])
        .as('author'),
    ])
    .where('p.id', '=', permitId)
    .executeTakeFirst();
  return Boolean(row?.author);
}
