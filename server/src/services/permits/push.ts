import type { Deps } from '../../deps';
import { asks, audienceMembers, headline, type NoticeKind } from './notify';

/** The changes an operator is told of at once on their phone (besides the e-mail). */
const pushedToOperators: NoticeKind[] = ['start', 'suspend', 'resume', 'lapse'];

/**
 * Queues the push notifications of one transition through `deps.db` (the transition's own
 * transaction): the operators the permit names, on each device where they turned notifications on,
 * when it goes live, is suspended, is resumed or lapses. The notification opens the permit on the
 * phone view. Returns how many devices.
 */
export async function pushTransition(
  deps: Pick<Deps, 'db' | 'pusher'>,
  action: NoticeKind,
  f: { permitId: number; number: string; actorId: number | null },
): Promise<number> {
  if (!pushedToOperators.includes(action)) return 0;
  const operators = (await audienceMembers(deps.db, f.permitId, 'operators')).filter((u) => u.id !== f.actorId);
  return deps.pusher.notify(
    deps.db,
    operators.map((u) => u.id),
    {
      title: `Permit ${f.number} ${headline[action]}`,
      body: asks[action]?.operators ?? '',
      path: `/field/permits/${f.permitId}`,
      tag: `permit-${f.permitId}`,
    },
  );
}

/** Queues the notification of a concern to the supervisor who asked for the permit, in the concern's transaction. */
export async function pushConcern(
  deps: Pick<Deps, 'db' | 'pusher'>,
  f: { permitId: number; number: string; reporterId: number; reporterName: string; excavationReference: string },
): Promise<number> {
  const requester = (await audienceMembers(deps.db, f.permitId, 'requester')).filter((u) => u.id !== f.reporterId);
  return deps.pusher.notify(
    deps.db,
    requester.map((u) => u.id),
    {
      title: `Concern on permit ${f.number}`,
      body: `${f.reporterName} reported a concern about excavation ${f.excavationReference}. Decide whether work must stop.`,
      path: `/permits/${f.permitId}`,
      tag: `concern-${f.permitId}`,
    },
  );
}
