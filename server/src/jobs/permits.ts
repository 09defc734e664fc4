import type { Deps } from '../deps';
import { runPermitSchedule } from '../services/permits/schedule';
import { scheduledQueue } from './queues';

export { runPermitSchedule } from '../services/permits/schedule';

/**
 * Starts the permit schedule on pg-boss: every minute, approved permits whose window has opened
 * (and whose operators are briefed) go Live, closed windows Lapse, and reminders go out an hour
 * before a window closes. The logic is `runPermitSchedule(deps)`, a function of `deps.now()`.
 */
export async function startPermitJobs(deps: Deps, prefix = 'brink'): Promise<void> {
  const queue = `${prefix}.permit-schedule`;
  await scheduledQueue(deps, queue, '* * * * *', { retryLimit: 0, expireInSeconds: 300 });
  await deps.boss.work(queue, { pollingIntervalSeconds: 5 }, async () => {
    const out = await runPermitSchedule(deps);
    const n = out.started.length + out.lapsed.length + out.reminded.length;
    if (n)
      console.log(
        `[permits] started ${out.started.join(',') || '-'}; lapsed ${out.lapsed.join(',') || '-'}; reminded ${out.reminded.join(',') || '-'}`,
      );
  });
  // Catch up at once after a restart rather than waiting for the first minute.
  await runPermitSchedule(deps);
}
