import type { Db } from '@db/database';
import type { ActorRole } from '@shared/schemas/permits';

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
