import { sql } from 'kysely';
import { canonical, checkInputFields, type CheckInputs, type ExcavationValues, type RecheckOutcome } from '@shared/schemas/excavations';
import { storedCheck, type PermitCheck, type PermitStatus, storedDecision } from '@shared/schemas/permits';
import { describeExcavationChange, judgeRecheck } from '@shared/permits/recheck';
import type { Deps } from '../../deps';
import { HttpError } from '../../http';
import { inTransaction } from '../tx';
import type { Actor } from './actors';
import { checkOfStored, keepCheck, type StoredCheck } from './check';
import { transition } from './machine';
import { notifyTransition } from './notify';
import { withCurrentRevision } from './read';

/** Permits re-checked when an excavation changes: awaiting review, approved, live or suspended. */
const RECHECKED: PermitStatus[] = ['submitted', 'approved', 'live', 'suspended'];

export type { RecheckOutcome };

/** Whether a change touches what the check of a load beside the excavation reads. */
function checkInputsChanged(before: ExcavationValues, after: ExcavationValues): boolean {
  return checkInputFields.some((k) => canonical(before[k]) !== canonical(after[k]));
}

/**
 * Re-checks every permit that stands on an excavation whose check inputs just changed, inside the
 * caller's transaction (`deps.db`, the one that wrote the change), so the change and its
 * consequences commit together or not at all. A permit stands on it when it names it, its last
 * check counted it, or its loads now reach it. Each is checked with its frozen machines and the
 * excavation as it is now, and the new check is kept on it:
 * - now failing, or needing more standoff than was approved (judgeRecheck): a live permit is
 *   suspended and an approved one goes back for review (their transitions, with the reason on the
 *   timeline and e-mailed to the supervisor who asked, the named operators and the coordinators);
 *   a suspended one stays suspended with the same people told; one awaiting review gets a line;
 * - still passing: the timeline says so with the new figures.
 * Any failure throws, and the caller's transaction undoes the excavation change with the rest.
 */
export async function recheckAfterExcavationChange(
  deps: Deps,
  change: { siteId: number; excavationId: number; before: ExcavationValues; after: ExcavationValues; by: string },
): Promise<RecheckOutcome[]> {
  if (!checkInputsChanged(change.before, change.after)) return [];
  return inTransaction(deps.db, async (trx) => {
    const inTrx = { ...deps, db: trx };
    const now = deps.now();
    const what = describeExcavationChange(change.after.reference, pickInputs(change.before), pickInputs(change.after));
    const actor: Actor = { kind: 'system', name: `Re-check after ${change.by} changed ${change.after.reference}` };
    const rows = await withCurrentRevision(trx)
      .select(['p.id', 'p.number', 'p.status', 'r.excavation_ids', 'r.check_result'])
      .where('p.site_id', '=', change.siteId)
      .where('p.status', 'in', RECHECKED)
      .orderBy('p.id')
      // Held until the change commits: nobody decides on these permits meanwhile.
      .forUpdate('p')
      .execute();
    const out: RecheckOutcome[] = [];
    for (const row of rows) {
      const previous = storedCheck(row.check_result);
      const named =
        row.excavation_ids.includes(change.excavationId) || !!previous?.excavations.some((e) => e.excavationId === change.excavationId);
      let stored: StoredCheck | null = null;
      let refusal: string | undefined;
      try {
        stored = await checkOfStored(trx, row.id, now);
      } catch (err) {
        // A load that now touches or overlaps an excavation: only this one changed, so it is the cause.
        if (!(err instanceof HttpError && err.status === 400)) throw err;
        refusal = err.message;
      }
      if (stored && !named && !stored.check.excavations.some((e) => e.excavationId === change.excavationId)) continue;
      const rev = await trx
        .selectFrom('permit_revisions as r')
        .innerJoin('permits as p', (j) => j.onRef('p.id', '=', 'r.permit_id').onRef('p.revision', '=', 'r.revision'))
        .select(['r.decision', 'r.description', 'r.window_start', 'r.window_end', 'p.site_id'])
        .where('p.id', '=', row.id)
        .executeTakeFirstOrThrow();
      const judged = judgeRecheck({ check: stored?.check ?? null, refusal, previous, decision: storedDecision(rev.decision) });
      if (stored) await keepCheck(trx, stored, now);
      const text = `${what}: ${judged.figures}`;
      if (!judged.worse) {
        await event(
          trx,
          row,
          actor,
          `${what}: still passes: ${judged.figures}`,
          { passes: true, check: stored && figuresOf(stored.check) },
          now,
        );
        out.push({ permitId: row.id, number: row.number, outcome: 'passes', text });
      } else if (row.status === 'live' || row.status === 'approved') {
        const action = row.status === 'live' ? 'suspend' : 'reconsider';
        await transition(inTrx, row.id, action, actor, { reason: text });
        out.push({ permitId: row.id, number: row.number, outcome: action === 'suspend' ? 'suspended' : 'sent-back', text });
      } else {
        await event(trx, row, actor, text, { passes: false, check: stored && figuresOf(stored.check) }, now);
        if (row.status === 'suspended') {
          const site = await trx.selectFrom('sites').select('name').where('id', '=', rev.site_id).executeTakeFirstOrThrow();
          await notifyTransition(inTrx, 'recheck', {
            permitId: row.id,
            number: row.number,
            siteName: site.name,
            description: rev.description,
            status: row.status,
            windowStart: new Date(rev.window_start),
            windowEnd: new Date(rev.window_end),
            actorName: actor.name,
            actorId: null,
            reason: text,
          });
        }
        out.push({ permitId: row.id, number: row.number, outcome: 'still-fails', text });
      }
    }
    return out;
  });
}

function pickInputs(v: ExcavationValues): CheckInputs {
  return Object.fromEntries(checkInputFields.map((k) => [k, v[k]])) as CheckInputs;
}

function figuresOf(c: PermitCheck) {
  return { utilisation: c.utilisation, passes: c.passes, computedStandoff: c.computedStandoff };
}

async function event(
  db: Deps['db'],
  p: { id: number },
  actor: Actor,
  comment: string,
  detail: Record<string, unknown>,
  now: Date,
): Promise<void> {
  await db
    .insertInto('permit_events')
    .values({
      permit_id: p.id,
      revision: sql<number>`(select revision from permits where id = ${p.id})`,
      at: now,
      actor_id: null,
      actor_name: actor.name,
      action: 'recheck',
      from_status: null,
      to_status: null,
      comment,
      detail: JSON.stringify(detail),
    })
    .execute();
}
