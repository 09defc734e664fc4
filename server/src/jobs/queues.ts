import type PgBoss from 'pg-boss';
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

/**
 * A worker that takes one job at a time and fetches the next at once. pg-boss waits a polling
 * interval after every fetch, even when more jobs wait: with one job per fetch that held the mail to
 * two messages a second, and a backlog of forty (a busy minute of permit changes) took twenty
 * seconds to reach the last person. After each job the worker is told to fetch again at once, so a
 * backlog drains as fast as the far side takes it; an empty queue is polled every half second.
 */
export async function drainingWorker<T extends object>(boss: PgBoss, queue: string, handle: (data: T) => Promise<void>): Promise<void> {
  let worker: string | null = null;
  worker = await boss.work<T>(queue, { pollingIntervalSeconds: 0.5, batchSize: 1 }, async (jobs) => {
    for (const job of jobs) await handle(job.data);
    if (worker) boss.notifyWorker(worker);
  });
}
