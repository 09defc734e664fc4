import type { Deps } from '../../deps';
import { withCurrentRevision } from './read';
import { scheduleActor } from './actors';
import { advancePermit } from './machine';
import { notifyTransition } from './notify';

/** Before the window closes, by this much, the requester and operators are reminded (ms). */
const REMINDER_BEFORE_MS = 3600_000;

interface ScheduleOutcome {
  started: number[];
  lapsed: number[];
  reminded: number[];
}

/**
 * One pass of the permit schedule at `deps.now()` (the pg-boss job runs it every minute; tests
 * call it with their own clock, limited to their own permits): start due permits, lapse closed
 * ones, and send the reminder an hour before a live or suspended permit's window closes (once per
 * window).
 */
export async function runPermitSchedule(deps: Deps, scope: { permitIds?: number[] } = {}): Promise<ScheduleOutcome> {
  const only = scope.permitIds;
  if (only && only.length === 0) return { started: [], lapsed: [], reminded: [] };
  const now = deps.now();
  const out: ScheduleOutcome = { started: [], lapsed: [], reminded: [] };
  const due = await withCurrentRevision(deps.db)
    .select(['p.id', 'p.status'])
    .where((eb) =>
      eb.or([
        eb.and([eb('p.status', 'in', ['approved', 'live', 'suspended']), eb('r.window_end', '<=', now)]),
        eb.and([eb('p.status', '=', 'approved'), eb('r.window_start', '<=', now)]),
      ]),
    )
    .$if(!!only, (q) => q.where('p.id', 'in', only!))
    .orderBy('p.id')
    .execute();
  for (const p of due) {
    const did = await advancePermit(deps, p.id);
    if (did) out[did].push(p.id);
  }

  const soon = await withCurrentRevision(deps.db)
    .innerJoin('sites as s', 's.id', 'p.site_id')
    .select(['p.id', 'p.number', 'p.status', 's.name as site_name', 'r.description', 'r.window_start', 'r.window_end'])
    .where('p.status', 'in', ['live', 'suspended'])
    .where('p.reminder_sent_at', 'is', null)
    .where('r.window_end', '>', now)
    .where('r.window_end', '<=', new Date(now.getTime() + REMINDER_BEFORE_MS))
    .$if(!!only, (q) => q.where('p.id', 'in', only!))
    .execute();
  for (const p of soon) {
    // Claim the reminder and queue it in one transaction, so two workers never both send it and a
    // crash never claims it without sending.
    const claimed = await deps.db.transaction().execute(async (trx) => {
      const row = await trx
        .updateTable('permits')
        .set({ reminder_sent_at: now })
        .where('id', '=', p.id)
        .where('reminder_sent_at', 'is', null)
        .returning('id')
        .executeTakeFirst();
      if (!row) return false;
      await notifyTransition({ ...deps, db: trx }, 'reminder', {
        permitId: p.id,
        number: p.number,
        siteName: p.site_name,
        description: p.description,
        status: p.status,
        windowStart: new Date(p.window_start),
        windowEnd: new Date(p.window_end),
        actorName: scheduleActor.name,
        actorId: null,
      });
      return true;
    });
    if (!claimed) continue;
    out.reminded.push(p.id);
  }
  return out;
}
