import bcrypt from 'bcryptjs';
import { sql } from 'kysely';
import type { Db } from '@db/database';
import type { Stored } from '@shared/schemas/stored';
import {
  permitActions,
  statusLabels,
  transitionRules,
  type PermitAction,
  type PermitCheck,
  type PermitDecision,
  type PermitStatus,
  storedCheck,
  storedLoads,
  storedDig,
  storedDecision,
  type PlacedLoad,
  type DigDetails,
} from '@shared/schemas/permits';
import type { Deps } from '../../deps';
import { badRequest, conflict, forbidden, HttpError, notFound } from '../../http';
import { audit } from '../audit';
import { DECISIONS, isAuthorOf, roleOf, scheduleActor, type Actor } from './actors';
import { checkStoredRevision } from './check';
import { unsafeExcavations } from '../unsafe-excavations';
import { notifyTransition } from './notify';
import { pushTransition } from './push';
import { currentRevisionRow, withCurrentRevision } from './read';
import { inTransaction } from '../tx';
import { unitsOf } from '../units';
import { formatLength } from '@shared/units';

interface TransitionOptions {
  /** The version the actor was looking at; required for people, optional for Brink itself. */
  version?: number;
  reason?: string;
  standoff?: number;
  conditions?: string[];
  password?: string;
  /** What caused a change Brink makes by itself, kept on the timeline event (e.g. `{ inspection: { id, excavationReference } }`). */
  cause?: Record<string, unknown>;
}

interface TransitionOutcome {
  permitId: number;
  from: PermitStatus;
  to: PermitStatus;
  version: number;
  revision: number;
  /** Who was e-mailed. */
  notified: string[];
}

/** A 409 that says what the permit is now, so the client can show it. */
export class StaleError extends HttpError {
  constructor(
    message: string,
    readonly current: { status: PermitStatus; version: number },
  ) {
    super(409, 'conflict', message, { version: `now ${current.version} (${statusLabels[current.status]})` });
  }
}

/** A wrong password under a decision: 400 naming the field; the route counts it (attempt limit). */
export class WrongPasswordError extends HttpError {
  constructor() {
    super(400, 'invalid', 'The decision was not signed: the password is not yours.', {
      password: 'is not the one you sign in with: type it again',
    });
  }
}

type PermitRow = {
  id: number;
  site_id: number;
  number: string;
  status: PermitStatus;
  version: number;
  revision: number;
  requested_by: number;
};

/**
 * Who may take `action` on the permit: its site role (403 naming who may), and for a decision
 * (approve, return, decline) not one of its authors (403). Run by the route before the body is
 * validated (`action` is then untrusted: an unknown one passes only for a role that can take some
 * action, and the body's validation names it) and again inside the transition, under the lock.
 */
export async function assertMayAct(
  db: Db,
  p: { id: number; site_id: number; number: string },
  action: unknown,
  actor: Actor,
): Promise<void> {
  const role = await roleOf(db, actor, p.site_id);
  if (!role) throw forbidden('You are not a member of this permit\u2019s site.');
  const known = (permitActions as readonly unknown[]).includes(action) ? (action as PermitAction) : null;
  if (!known) {
    if (!permitActions.some((a) => transitionRules[a].by.includes(role)))
      throw forbidden(`Your role on this site (${role}) does not move permits on.`);
    return;
  }
  const rule = transitionRules[known];
  if (!rule.by.includes(role)) {
    throw forbidden(
      rule.by.includes('system') && rule.by.length === 1
        ? `Brink does this itself (${rule.label.toLowerCase()}); nobody can do it by hand.`
        : `Only a ${rule.by.filter((r) => r !== 'system').join(' or ')} may ${rule.label.toLowerCase()} a permit.`,
    );
  }
  if (actor.kind === 'user' && DECISIONS.includes(known) && (await isAuthorOf(db, p.id, actor.id))) {
    throw forbidden(
      `You requested or changed permit ${p.number}, so you cannot decide on it (${rule.label.toLowerCase()}): another coordinator must.`,
    );
  }
}

/**
 * Moves a permit along the status machine (shared/schemas/permits.ts `transitionRules`) in one
 * transaction: checks the actor's role and that a decision is not its author's (403, `assertMayAct`), the version (409) and the current status (409),
 * the action's own rules (400 naming the field), records the decision, the timeline event and the
 * audit entry, and queues the e-mails to the people who must act next, all in one transaction.
 * Given `deps.db` that is already a transaction (`{ ...deps, db: trx }`), it runs inside it, so a
 * consequence (a suspension after a failed inspection) commits with its cause.
 *
 * Brink itself acts through a system actor: the schedule (`start`, `lapse`) or a failed inspection
 * (`suspend` with a reason), e.g.
 * `transition(deps, id, 'suspend', inspectionActor('Inspection of T1 failed'), { reason })`.
 */
export async function transition(
  deps: Deps,
  permitId: number,
  action: PermitAction,
  actor: Actor,
  opts: TransitionOptions = {},
): Promise<TransitionOutcome> {
  const rule = transitionRules[action];
  const now = deps.now();

  return inTransaction(deps.db, async (trx) => {
    const p: PermitRow | undefined = await trx
      .selectFrom('permits')
      .select(['id', 'site_id', 'number', 'status', 'version', 'revision', 'requested_by'])
      .where('id', '=', permitId)
      .forUpdate()
      .executeTakeFirst();
    if (!p) throw notFound('That permit');

    await assertMayAct(trx, p, action, actor);
    if (rule.reason && !opts.reason?.trim())
      throw badRequest(`A reason is required to ${rule.label.toLowerCase()}.`, { reason: 'is required' });
    if (actor.kind === 'user' && opts.version === undefined) throw badRequest('The version is required.', { version: 'is required' });
    if (opts.version !== undefined && opts.version !== p.version) {
      throw new StaleError(
        `Permit ${p.number} has changed since you opened it: it is now ${statusLabels[p.status]} (version ${p.version}). Look again before you act.`,
        { status: p.status, version: p.version },
      );
    }
    if (!rule.from.includes(p.status)) {
      throw new StaleError(`A permit that is ${statusLabels[p.status]} cannot be sent to "${rule.label}".`, {
        status: p.status,
        version: p.version,
      });
    }

    const rev = await currentRevisionRow(trx, p);
    const windowStart = new Date(rev.window_start);
    const windowEnd = new Date(rev.window_end);
    const detail: Record<string, unknown> = { ...opts.cause };
    let newRevision = p.revision;
    let actorName = actor.name;

    if (rule.signed) {
      if (actor.kind !== 'user') throw forbidden('A decision needs a person.');
      const u = await trx.selectFrom('users').select(['password_hash', 'name']).where('id', '=', actor.id).executeTakeFirstOrThrow();
      if (!u.password_hash || !(await bcrypt.compare(opts.password ?? '', u.password_hash))) {
        throw new WrongPasswordError();
      }
      actorName = u.name;
    }

    switch (action) {
      case 'submit': {
        await assertComplete(trx, p, rev, now);
        // Sent for review: the machines its loads name are frozen with it (the library may change later).
        const check = await checkStoredRevision(trx, p.id, now, { freeze: true });
        assertAllNamed(check);
        detail.check = summaryOf(check);
        break;
      }
      case 'approve': {
        // The check is run again now: other permits may have been approved since the request.
        const check = await checkStoredRevision(trx, p.id, now);
        assertAllNamed(check);
        const computed = check.computedStandoff;
        const reason = opts.reason?.trim() ?? '';
        // The computed standoff is each load's alone; the cumulative check (with every other permit
        // counted) must also pass as the loads are placed. Either falling short needs a recorded reason.
        const fields: Record<string, string> = {};
        if (!check.passes && !reason) fields.reason = 'is required to approve loads that fail the cumulative check';
        // Figures in the acting person's units: the computed standoff rounded up, theirs down, so a
        // shortfall never reads as none.
        const units = await unitsOf(trx, actor.kind === 'user' ? actor.id : null, p.site_id);
        const least = computed === null ? '' : formatLength(computed, units, { rounding: 'up' });
        if (opts.standoff !== undefined && (computed === null || opts.standoff < computed) && !reason) {
          fields.standoff =
            computed === null ? 'no computed standoff exists: give a reason' : `must be at least ${least}, or give a reason`;
        }
        if (Object.keys(fields).length) {
          const why = [
            ...(fields.reason ? ['the cumulative check fails as the loads are placed'] : []),
            ...(fields.standoff
              ? [
                  computed === null
                    ? 'no standoff lets the support carry these loads'
                    : `the standoff ${formatLength(opts.standoff!, units, { rounding: 'down' })} is less than the computed ${least}`,
                ]
              : []),
          ];
          throw badRequest(
            `Approval needs a recorded reason: ${why.join('; ')}. Give a reason, or return the request so the loads are moved.`,
            fields,
          );
        }
        const decision = decisionOf('approve', actor, actorName, now, {
          reason,
          standoff: opts.standoff ?? null,
          computed,
          conditions: opts.conditions ?? [],
        });
        await trx
          .updateTable('permit_revisions')
          .set({ decision: JSON.stringify(decision), updated_at: now })
          .where('id', '=', rev.id)
          .execute();
        Object.assign(detail, { decision, check: summaryOf(check) });
        break;
      }
      case 'return':
      case 'decline': {
        const check = storedCheck(rev.check_result);
        const decision = decisionOf(action, actor, actorName, now, {
          reason: opts.reason!.trim(),
          standoff: null,
          computed: check?.computedStandoff ?? null,
          conditions: [],
        });
        await trx
          .updateTable('permit_revisions')
          .set({ decision: JSON.stringify(decision), updated_at: now })
          .where('id', '=', rev.id)
          .execute();
        detail.decision = decision;
        break;
      }
      case 'start': {
        if (now < windowStart || now >= windowEnd) throw conflict(`Permit ${p.number} can go live only within its window.`);
        const waiting = await trx
          .selectFrom('permit_operators')
          .select('user_id')
          .where('revision_id', '=', rev.id)
          .where('briefed_at', 'is', null)
          .execute();
        if (waiting.length) throw conflict(`Permit ${p.number} waits for ${waiting.length} operator(s) to confirm the briefing.`);
        await assertNoneUnsafe(trx, p.number, rev.excavation_ids, now);
        // What let it go live, for the timeline: the last of its window opening, its approval and the last briefing.
        const lastBriefing = await trx
          .selectFrom('permit_operators')
          .select((eb) => eb.fn.max('briefed_at').as('at'))
          .where('revision_id', '=', rev.id)
          .executeTakeFirst();
        const approvedAt = storedDecision(rev.decision)?.at;
        const times = {
          window: windowStart.getTime(),
          approval: approvedAt ? Date.parse(approvedAt) : 0,
          briefing: lastBriefing?.at ? new Date(lastBriefing.at).getTime() : 0,
        };
        detail.startedBy = (['briefing', 'approval', 'window'] as const).reduce((a, b) => (times[b] > times[a] ? b : a));
        break;
      }
      case 'resume': {
        if (now >= windowEnd) throw conflict(`Permit ${p.number}'s window has closed: it cannot resume.`);
        if (now < windowStart) throw conflict(`Permit ${p.number}'s window has not opened yet.`);
        await assertNoneUnsafe(trx, p.number, rev.excavation_ids, now);
        break;
      }
      case 'reconsider': {
        // The approval no longer holds for the excavation as it is: it stays on the timeline, and the
        // coordinator decides again on the new check.
        detail.previousDecision = rev.decision;
        await trx.updateTable('permit_revisions').set({ decision: null, updated_at: now }).where('id', '=', rev.id).execute();
        break;
      }
      case 'lapse': {
        if (now < windowEnd) throw conflict(`Permit ${p.number}'s window is still open.`);
        break;
      }
      case 'revise': {
        newRevision = p.revision + 1;
        const copy = await trx
          .insertInto('permit_revisions')
          .values({
            permit_id: p.id,
            revision: newRevision,
            description: rev.description,
            window_start: rev.window_start,
            window_end: rev.window_end,
            excavation_ids: rev.excavation_ids,
            method: rev.method,
            loads: JSON.stringify(rev.loads),
            dig: rev.dig === null ? null : JSON.stringify(rev.dig),
            created_by: actor.kind === 'user' ? actor.id : null,
            created_at: now,
            updated_at: now,
          })
          .returning('id')
          .executeTakeFirstOrThrow();
        // The same operators, to be briefed again on the new terms.
        await sql`insert into permit_operators (revision_id, user_id)
                  select ${copy.id}, user_id from permit_operators where revision_id = ${rev.id}`.execute(trx);
        detail.previousRevision = p.revision;
        break;
      }
    }

    const to = rule.to;
    const updated = await trx
      .updateTable('permits')
      .set({
        status: to,
        version: p.version + 1,
        revision: newRevision,
        updated_at: now,
        ...(action === 'revise' ? { reminder_sent_at: null } : {}),
      })
      .where('id', '=', p.id)
      .where('version', '=', p.version)
      .returning(['version'])
      .executeTakeFirst();
    if (!updated)
      throw new StaleError(`Permit ${p.number} has just been changed by someone else. Look again before you act.`, {
        status: p.status,
        version: p.version,
      });

    await trx
      .insertInto('permit_events')
      .values({
        permit_id: p.id,
        revision: newRevision,
        at: now,
        actor_id: actor.kind === 'user' ? actor.id : null,
        actor_name: actorName,
        action,
        from_status: p.status,
        to_status: to,
        comment: opts.reason?.trim() ?? '',
        detail: JSON.stringify(detail),
      })
      .execute();
    await audit(trx, {
      actorId: actor.kind === 'user' ? actor.id : null,
      siteId: p.site_id,
      entity: 'permit',
      entityId: p.id,
      action,
      detail: {
        number: p.number,
        from: p.status,
        to,
        revision: newRevision,
        by: actorName,
        ...(opts.reason ? { reason: opts.reason } : {}),
        ...(detail.decision ? { decision: detail.decision } : {}),
      },
    });
    const site = await trx.selectFrom('sites').select('name').where('id', '=', p.site_id).executeTakeFirstOrThrow();
    const outcome: TransitionOutcome = {
      permitId: p.id,
      from: p.status,
      to,
      version: updated.version,
      revision: newRevision,
      notified: [],
    };
    // The notices are queued in this transaction: they exist if and only if the transition does.
    const inTrx = { ...deps, db: trx };
    // A draft withdrawn before it was ever sent for review concerned nobody but its author: no notice.
    const neverSent =
      action === 'withdraw' &&
      p.status === 'draft' &&
      !(await trx.selectFrom('permit_events').select('id').where('permit_id', '=', p.id).where('action', '=', 'submit').executeTakeFirst());
    if (!neverSent)
      outcome.notified = await notifyTransition(inTrx, action, {
        permitId: p.id,
        number: p.number,
        siteName: site.name,
        description: rev.description,
        status: to,
        windowStart,
        windowEnd,
        actorName,
        actorId: actor.kind === 'user' ? actor.id : null,
        reason: opts.reason?.trim(),
        standoff: action === 'approve' ? (opts.standoff ?? null) : null,
        conditions: action === 'approve' ? opts.conditions : undefined,
      });
    await pushTransition(inTrx, action, { permitId: p.id, number: p.number, actorId: actor.kind === 'user' ? actor.id : null });
    // Approved inside an open window with every operator briefed (or none named): live at once,
    // in the same transaction.
    if (action === 'approve') await advancePermit(inTrx, permitId);
    return outcome;
  });
}

function decisionOf(
  action: PermitDecision['action'],
  actor: Actor,
  name: string,
  now: Date,
  d: { reason: string; standoff: number | null; computed: number | null; conditions: string[] },
): PermitDecision {
  const at = now.toISOString();
  return {
    action,
    by: { id: actor.kind === 'user' ? actor.id : 0, name },
    at,
    reason: d.reason,
    standoff: d.standoff,
    computedStandoff: d.computed,
    conditions: d.conditions,
    signature: `Signed by ${name} with their password at ${at.replace('T', ' ').slice(0, 19)} UTC`,
  };
}

/** The part of a check the timeline keeps with a transition. */
function summaryOf(c: PermitCheck) {
  return {
    utilisation: c.utilisation,
    passes: c.passes,
    computedStandoff: c.computedStandoff,
    excavations: c.excavations.map((e) => ({
      reference: e.reference,
      utilisation: e.result.utilisation,
      counted: e.counted.map((o) => o.number),
    })),
  };
}

/** A permit does not go live or resume beside an excavation whose latest inspection found it not safe. */
async function assertNoneUnsafe(db: Db, number: string, excavationIds: number[], now: Date): Promise<void> {
  const unsafe = await unsafeExcavations(db, excavationIds, now);
  if (unsafe.length) {
    throw conflict(
      `Permit ${number} cannot go live: ${unsafe.join(', ')} was found not safe at its last inspection. A safe inspection comes first.`,
    );
  }
}

/**
 * Every open excavation that a load reaches must be named on the permit, so that inspections,
 * other permits' checks and the phone's zones (all keyed on the named excavations) see it.
 */
function assertAllNamed(check: PermitCheck): void {
  const unnamed = check.excavations.filter((e) => e.named === false).map((e) => e.reference);
  if (unnamed.length) {
    throw badRequest(
      `A load stands within the influence zone of ${unnamed.join(', ')}: name ${unnamed.length === 1 ? 'it' : 'them'} on the permit.`,
      {
        excavationIds: `also name ${unnamed.join(', ')}`,
      },
    );
  }
}

/** What a request must hold before it goes for review; 400 naming each missing field. */
async function assertComplete(
  trx: Db,
  p: PermitRow & { kind?: string },
  rev: { window_end: Date; excavation_ids: number[]; loads: Stored<PlacedLoad[]>; dig: Stored<DigDetails> | null },
  now: Date,
): Promise<void> {
  const permit = await trx.selectFrom('permits').select('kind').where('id', '=', p.id).executeTakeFirstOrThrow();
  const fields: Record<string, string> = {};
  if (rev.excavation_ids.length === 0) fields.excavationIds = 'name at least one excavation';
  if (new Date(rev.window_end) <= now) fields.windowEnd = 'the window has already closed';
  if (permit.kind === 'load' && storedLoads(rev.loads).length === 0) fields.loads = 'place at least one load';
  if (permit.kind === 'dig') {
    const dig = storedDig(rev.dig);
    if (!dig) fields.dig = 'give the depth, the support method and the buried-services checks';
    else {
      for (const [k, c] of Object.entries(dig.servicesChecks)) {
        if (c.state === 'pending')
          fields[`dig.servicesChecks.${k}`] = 'must be done (or, for trial holes, said not to be needed) before review';
      }
    }
  }
  if (Object.keys(fields).length) {
    throw badRequest(
      `The request is not ready for review: ${Object.entries(fields)
        .map(([k, v]) => `${k}: ${v}`)
        .join('; ')}.`,
      fields,
    );
  }
}

/** Another change won the race (or the permit is no longer due): not an error for the schedule. */
function lostRace(err: unknown): boolean {
  return err instanceof HttpError && (err.status === 409 || err.status === 404);
}

/**
 * What the clock does to one permit at `deps.now()`: an approved permit whose window is open and
 * whose operators have all confirmed the briefing goes Live; an approved, live or suspended permit
 * whose window has closed Lapses. Returns what it did.
 */
export async function advancePermit(deps: Deps, permitId: number): Promise<'started' | 'lapsed' | null> {
  const now = deps.now();
  const row = await withCurrentRevision(deps.db)
    .select(['p.id', 'p.status', 'p.version', 'r.id as revision_id', 'r.window_start', 'r.window_end'])
    .where('p.id', '=', permitId)
    .executeTakeFirst();
  if (!row) return null;
  try {
    if (['approved', 'live', 'suspended'].includes(row.status) && now >= new Date(row.window_end)) {
      await transition(deps, row.id, 'lapse', scheduleActor, { version: row.version });
      return 'lapsed';
    }
    if (row.status === 'approved' && now >= new Date(row.window_start) && now < new Date(row.window_end)) {
      const waiting = await deps.db
        .selectFrom('permit_operators')
        .select('user_id')
        .where('revision_id', '=', row.revision_id)
        .where('briefed_at', 'is', null)
        .execute();
      if (waiting.length === 0) {
        await transition(deps, row.id, 'start', scheduleActor, { version: row.version });
        return 'started';
      }
    }
  } catch (err) {
    if (!lostRace(err)) throw err;
  }
  return null;
}
