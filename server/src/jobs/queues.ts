import type { Deps } from '../deps';

/**
 * Makes (or brings up to date) a queue with these settings and puts it on a cron schedule.
 * pg-boss 10 reads `expireInSeconds` (not `expireInMinutes`) when it stores a queue, and
 * `createQueue` leaves an existing queue as it was: `updateQueue` applies the settings to both.
 */
export async function scheduledQueue(
  deps: Pick<Deps, 'boss'>,
  queue: string,
  cron: string | null,
  options: { retryLimit: number; retryDelay?: number; retryBackoff?: boolean; expireInSeconds: number },
): Promise<void> {
  await deps.boss.createQueue(queue, { name: queue, ...options });
  await deps.boss.updateQueue(queue, { name: queue, ...options });
  if (cron) await deps.boss.schedule(queue, cron);
}
