import { stateLabels } from '@shared/schemas/inspections';
import { formatSiteTime } from '@shared/time/shifts';
import type { Deps } from '../deps';
import { notice } from '../mail/mailer';
import { inspectionStates, needingInspection, reconcileUnsafe, siteLeads, type Reconciled } from '../services/inspections';
import { scheduledQueue } from './queues';

/** How often the schedule looks for overdue inspections (pg-boss cron, minutes resolution). */
const OVERDUE_CRON = '*/2 * * * *';

interface OverdueRun {
  siteId: number;
  shiftStart: string;
  excavations: string[];
  /** Who was e-mailed (empty when nothing was sent this run). */
  sentTo: string[];
}

/**
 * Once the grace time after a shift start has passed (GRACE_MINUTES), e-mails each site's
 * supervisors and coordinators the open excavations without a safe inspection this shift.
 * Idempotent: at most one e-mail per site per shift. The inspection_reminders row claims the
 * (site, shift) before the e-mail is queued; if queuing fails the claim rolls back and the next
 * run tries again. A site with nothing overdue gets no
 * e-mail, and is looked at again on the next run in case an excavation opens later in the shift.
 * Uses `deps.now()`, so tests call it with their own clock.
 */
export async function checkOverdueInspections(deps: Deps, opts: { siteIds?: number[] } = {}): Promise<OverdueRun[]> {
  const now = deps.now();
  let q = deps.db.selectFrom('sites').select('id').orderBy('id');
  if (opts.siteIds) q = q.where('id', 'in', opts.siteIds.length ? opts.siteIds : [0]);
  const runs: OverdueRun[] = [];
  for (const { id: siteId } of await q.execute()) {
    const { clock, excavations } = await inspectionStates(deps.db, siteId, now);
    if (now.getTime() < clock.overdueFrom.getTime()) continue;
    const late = needingInspection(excavations);
    const run: OverdueRun = { siteId, shiftStart: clock.shift.start.toISOString(), excavations: late.map((e) => e.reference), sentTo: [] };
    runs.push(run);
    if (!late.length) continue;
    const already = await deps.db
      .selectFrom('inspection_reminders')
      .select('site_id')
      .where('site_id', '=', siteId)
      .where('shift_start', '=', clock.shift.start)
      .executeTakeFirst();
    if (already) continue;
    await deps.db.transaction().execute(async (trx) => {
      const claimed = await trx
        .insertInto('inspection_reminders')
        .values({
          site_id: siteId,
          shift_start: clock.shift.start,
          sent_at: now,
          excavation_ids: JSON.stringify(late.map((e) => e.excavationId)),
        })
        .onConflict((oc) => oc.doNothing())
        .returning('site_id')
        .executeTakeFirst();
      if (!claimed) return;
      const tz = clock.timeZone;
      run.sentTo = await deps.mailer.sendEach(trx, await siteLeads(trx, siteId), (units) =>
        notice({
          subject: `Inspections overdue at ${clock.siteName}: ${late.map((e) => e.reference).join(', ')}`,
          lines: [
            `The ${clock.shift.name.toLowerCase()} at ${clock.siteName} started at ${formatSiteTime(clock.shift.start, tz)} (${tz}). ` +
              `These open excavations have no safe inspection this shift:`,
            ...late.map(
              (e) =>
                `${e.reference} ${e.name}: ${stateLabels[e.state].toLowerCase()}` +
                (e.lastInspection
                  ? `; last inspected ${formatSiteTime(new Date(e.lastInspection.at), tz)} by ${e.lastInspection.inspector}`
                  : '; never inspected'),
            ),
            'Nobody works in or beside them until a competent person has inspected them and found them safe.',
          ],
          link: { label: 'Open the inspection list', url: `${deps.config.publicUrl}/sites/${siteId}/inspections` },
          units,
        }),
      );
    });
  }
  return runs;
}

/** Starts the schedule (from server/src/index.ts; tests call checkOverdueInspections directly). */
export async function startInspectionJobs(deps: Deps, prefix = 'brink'): Promise<void> {
  const queue = `${prefix}.inspections-overdue`;
  await scheduledQueue(deps, queue, OVERDUE_CRON, { retryLimit: 2, expireInSeconds: 300 });
  await deps.boss.work(queue, { pollingIntervalSeconds: 10 }, async () => {
    await checkOverdueInspections(deps);
  });
  // Self-healing: live permits beside an excavation whose latest inspection was not safe are
  // suspended; whatever it finds is logged.
  const heal = `${prefix}.reconcile-unsafe`;
  await scheduledQueue(deps, heal, RECONCILE_CRON, { retryLimit: 2, expireInSeconds: 300 });
  await deps.boss.work(heal, { pollingIntervalSeconds: 10 }, async () => {
    await runReconciliation(deps);
  });
  await runReconciliation(deps);
}

/** How often the reconciliation of not-safe excavations runs (pg-boss cron, minutes resolution). */
const RECONCILE_CRON = '* * * * *';

/** One reconciliation pass, its findings logged. */
export async function runReconciliation(deps: Deps, opts: { siteIds?: number[] } = {}): Promise<Reconciled[]> {
  const found = await reconcileUnsafe(deps, opts);
  for (const f of found) {
    console.warn(
      `[reconcile] inspection ${f.inspectionId} found ${f.excavation} not safe but permits were still live: suspended ${f.suspended.join(', ') || 'none'}` +
        (f.notSuspended.length ? `; could not suspend ${f.notSuspended.join(', ')}` : ''),
    );
  }
  return found;
}
