import type { Db } from '@db/database';
import { statusLabels, type PermitAction, type PermitStatus } from '@shared/schemas/permits';
import type { Deps } from '../../deps';
import { notice } from '../../mail/mailer';
import { formatSiteTime } from '@shared/time/shifts';
import { formatLength, localizeWords, type UnitSystem } from '@shared/units';
import { withCurrentRevision } from './read';

/** Who must hear of a change: the person who asked for the permit, the site's coordinators, the operators it names. */
type Audience = 'requester' | 'coordinators' | 'operators';

/** Who is told of each transition: the people who must act next, or stop. */
/** A notice that is not a transition: the window-closing reminder, a re-check that changes no status. */
export type NoticeKind = PermitAction | 'reminder' | 'recheck';

const audiences: Record<NoticeKind, Audience[]> = {
  submit: ['coordinators'],
  approve: ['requester', 'operators'],
  return: ['requester'],
  decline: ['requester'],
  start: ['requester', 'operators'],
  suspend: ['requester', 'operators', 'coordinators'],
  resume: ['requester', 'operators'],
  hand_back: ['coordinators', 'operators'],
  lapse: ['requester', 'operators', 'coordinators'],
  revise: ['coordinators', 'operators'],
  withdraw: ['coordinators', 'operators'],
  reconsider: ['requester', 'operators', 'coordinators'],
  reminder: ['requester', 'operators'],
  recheck: ['requester', 'operators', 'coordinators'],
};

/** What each audience is asked to do after each transition. */
export const asks: Partial<Record<NoticeKind, Partial<Record<Audience, string>>>> = {
  submit: { coordinators: 'Please review the check and decide.' },
  approve: {
    requester: 'Brief the operators named on the permit; it goes live when its window opens and each of them has confirmed the briefing.',
    operators: 'Read the permit and its exclusion zone, then confirm that you have been briefed.',
  },
  return: { requester: 'Please change the request as the comments ask and send it for review again.' },
  decline: { requester: 'The load must not be placed as requested.' },
  start: {
    requester: 'Work under the permit may go ahead within its terms.',
    operators: 'Work may go ahead: keep out of the exclusion zone.',
  },
  suspend: {
    requester: 'Stop work under this permit now.',
    operators: 'Stop work under this permit now and move clear of the excavation.',
    coordinators: 'For your information.',
  },
  resume: {
    requester: 'Work may go ahead again within the permit\u2019s terms.',
    operators: 'Work may go ahead again: keep out of the exclusion zone.',
  },
  hand_back: { coordinators: 'The area has been handed back.', operators: 'The permit is closed: no more work under it.' },
  lapse: {
    requester: 'Its window has closed: ask for a new permit if the work is not finished.',
    operators: 'Its window has closed: no more work under it.',
    coordinators: 'For your information.',
  },
  revise: {
    coordinators: 'A new revision is being prepared and will come to you for review.',
    operators: 'The approved terms no longer apply: stop work under it until the new revision is approved.',
  },
  withdraw: { coordinators: 'No decision is needed.', operators: 'No work may be done under it.' },
  reminder: {
    requester: 'Its window closes in an hour: hand it back when the area is clear, or ask for a new permit.',
    operators: 'Its window closes in an hour.',
  },
  reconsider: {
    requester: 'Do not start work under it: it needs a new decision on the excavation as it is now.',
    operators: 'Do not start work under it until it is approved again.',
    coordinators: 'Please review the new check and decide again.',
  },
  recheck: {
    requester: 'It stays suspended: do not resume work under it.',
    operators: 'It stays suspended: keep clear of the excavation.',
    coordinators: 'It fails on the excavation as it is now: do not resume it as it stands.',
  },
};

/** The people of each audience for a permit who get its e-mail (inactive people left out, the actor left out), with their own units or null. */
async function recipients(
  db: Db,
  permitId: number,
  audience: Audience,
  exceptUserId: number | null,
): Promise<{ email: string; units: UnitSystem | null }[]> {
  const rows = await audienceMembers(db, permitId, audience);
  return rows.filter((r) => r.id !== exceptUserId);
}

/** The active people of one audience of a permit. */
export async function audienceMembers(
  db: Db,
  permitId: number,
  audience: Audience,
): Promise<{ id: number; email: string; units: UnitSystem | null }[]> {
  let q;
  if (audience === 'requester') {
    q = db
      .selectFrom('permits as p')
      .innerJoin('users as u', 'u.id', 'p.requested_by')
      .select(['u.email', 'u.id', 'u.units'])
      .where('p.id', '=', permitId)
      .where('u.active', '=', true);
  } else if (audience === 'coordinators') {
    q = db
      .selectFrom('permits as p')
      .innerJoin('site_members as m', 'm.site_id', 'p.site_id')
      .innerJoin('users as u', 'u.id', 'm.user_id')
      .select(['u.email', 'u.id', 'u.units'])
      .where('p.id', '=', permitId)
      .where('m.role', '=', 'coordinator')
      .where('u.active', '=', true);
  } else {
    q = withCurrentRevision(db)
      .innerJoin('permit_operators as o', 'o.revision_id', 'r.id')
      .innerJoin('users as u', 'u.id', 'o.user_id')
      .select(['u.email', 'u.id', 'u.units'])
      .where('p.id', '=', permitId)
      .where('u.active', '=', true);
  }
  return q.execute();
}

interface NoticeFacts {
  permitId: number;
  number: string;
  siteName: string;
  description: string;
  status: PermitStatus;
  windowStart: Date;
  windowEnd: Date;
  actorName: string;
  actorId: number | null;
  reason?: string;
  standoff?: number | null;
  conditions?: string[];
}

export const headline: Record<NoticeKind, string> = {
  submit: 'awaits your review',
  approve: 'is approved',
  return: 'is returned for changes',
  decline: 'is declined',
  start: 'is live',
  suspend: 'is suspended',
  resume: 'is live again',
  hand_back: 'is handed back',
  lapse: 'has lapsed',
  revise: 'is being revised',
  withdraw: 'is withdrawn',
  reconsider: 'goes back for review',
  reminder: 'closes in an hour',
  recheck: 'fails after its excavation changed',
};

/**
 * Queues the e-mails of one transition through `deps.db` (the transition's own transaction): one
 * message per address, each with the link its audience uses (operators get the field view,
 * everybody else the permit page). Returns the addresses.
 */
export async function notifyTransition(
  deps: Pick<Deps, 'db' | 'config' | 'mailer'>,
  action: NoticeKind,
  f: NoticeFacts,
): Promise<string[]> {
  const sent: string[] = [];
  const base = deps.config.publicUrl;
  const already = new Set<string>();
  const { timezone, units: siteUnits } = await deps.db
    .selectFrom('permits as p')
    .innerJoin('sites as s', 's.id', 'p.site_id')
    .select(['s.timezone', 's.units'])
    .where('p.id', '=', f.permitId)
    .executeTakeFirstOrThrow();
  // A reason Brink wrote (a re-check, a failed inspection) is in SI: each reader gets it in their units.
  // A person's own words are theirs, and stay as typed.
  const reasonIn = (units: UnitSystem) => (f.reason && f.actorId === null ? localizeWords(f.reason, units) : f.reason);
  for (const audience of audiences[action]) {
    const people: { email: string; units: UnitSystem | null }[] = [];
    for (const p of await recipients(deps.db, f.permitId, audience, action === 'reminder' ? null : f.actorId)) {
      if (already.has(p.email)) continue;
      already.add(p.email);
      people.push(p);
    }
    const url = audience === 'operators' ? `${base}/field/permits/${f.permitId}` : `${base}/permits/${f.permitId}`;
    const messageIn = (units: UnitSystem) => {
      const reason = reasonIn(units);
      const lines = [
        `Permit ${f.number} on ${f.siteName} ${headline[action]}${action === 'reminder' ? '' : ` (${f.actorName})`}.`,
        ...(f.description ? [`Work: ${f.description}`] : []),
        `Window: ${formatSiteTime(f.windowStart, timezone)} to ${formatSiteTime(f.windowEnd, timezone, { zone: true })}. Status now: ${statusLabels[f.status]}.`,
        ...(reason ? [`${action === 'return' ? 'Comments' : 'Reason'}: ${reason}`] : []),
        ...(f.standoff != null
          ? [`Standoff: keep every load at least ${formatLength(f.standoff, units, { rounding: 'up' })} from the excavation edge.`]
          : []),
        ...(f.conditions?.length ? [`Conditions: ${f.conditions.map((c, i) => `(${i + 1}) ${c}`).join(' ')}`] : []),
        ...(asks[action]?.[audience] ? [asks[action]![audience]!] : []),
      ];
      return notice({
        subject: `Permit ${f.number} at ${f.siteName} ${headline[action]}`,
        lines,
        link: { label: `Open permit ${f.number}`, url },
        units,
      });
    };
    const readers = people.map((p) => ({ email: p.email, units: p.units ?? siteUnits }));
    sent.push(...(await deps.mailer.sendEach(deps.db, readers, messageIn)));
  }
  return sent;
}
