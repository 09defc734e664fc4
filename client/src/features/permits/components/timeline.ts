import type { PermitDecision, PermitEvent } from '@shared/schemas/permits';
import { wallClock } from '@shared/time/shifts';
import { figuresIn, type Figures } from '@shared/units';

/** "07:00": the time of day on the site's clock. */
export function clockTime(iso: string, timeZone: string): string {
  const w = wallClock(new Date(iso), timeZone);
  return `${String(w.hour).padStart(2, '0')}:${String(w.minute).padStart(2, '0')}`;
}

function record(v: unknown): Record<string, unknown> | null {
  return v !== null && typeof v === 'object' ? (v as Record<string, unknown>) : null;
}

/** What a person did, after their name: "sent it for review". */
const doneBy: Record<string, string> = {
  create: 'asked for the permit',
  edit: 'changed the request',
  comment: 'commented',
  briefed: 'confirmed the briefing',
  submit: 'sent it for review',
  return: 'returned it for changes',
  decline: 'declined it',
  suspend: 'suspended work',
  resume: 'resumed work',
  hand_back: 'handed it back',
  withdraw: 'withdrew it',
  start: 'started it',
  lapse: 'let it lapse',
  reconsider: 'sent it back for review',
};

/** What let a permit go live (the start event's `startedBy`). */
const startedBy: Record<string, string> = {
  window: 'window opened',
  approval: 'approved within its window',
  briefing: 'every operator briefed',
};

/**
 * One line of a permit's timeline in plain words, on the site's clock: "Sana Whitlock sent it for
 * review", "Went live at 07:00 (window opened)", "Suspended: inspection 7 of TR-UX1 found it not safe".
 * Changes Brink made by itself (no person) say what happened, not who.
 */
export function timelineLine(e: PermitEvent, timeZone: string, figures: Figures = figuresIn('metric')): string {
  const who = e.actor.name;
  const byBrink = e.actor.id === null;
  const d = e.detail;
  const at = clockTime(e.at, timeZone);
  switch (e.action) {
    case 'approve': {
      const decision = record(d.decision) as Partial<PermitDecision> | null;
      const standoff =
        typeof decision?.standoff === 'number'
          ? ` with a standoff of ${figures.length(decision.standoff, { rounding: 'up' })}`
          : ' as placed on the plan';
      return `${who} approved it${standoff}`;
    }
    case 'start':
      if (!byBrink) break;
      return `Went live at ${at}${typeof d.startedBy === 'string' && d.startedBy in startedBy ? ` (${startedBy[d.startedBy]})` : ''}`;
    case 'lapse':
      if (!byBrink) break;
      return `Lapsed at ${at} (window closed)`;
    case 'suspend': {
      const inspection = record(d.inspection);
      if (inspection && typeof inspection.id === 'number')
        return `Suspended: inspection ${inspection.id} of ${String(inspection.excavationReference)} found it not safe`;
      if (byBrink) return `Suspended: ${lowerFirst(who)}`;
      break;
    }
    case 'reconsider':
      if (byBrink) return `Sent back for review: ${lowerFirst(who)}`;
      break;
    case 'recheck':
      return `${who}: ${d.passes === false ? 'the check fails' : 'it still passes'}`;
    case 'revise':
      return `${who} opened revision ${e.revision} to change it`;
    case 'concern':
      return `${who} reported a concern${typeof d.excavationReference === 'string' ? ` about ${d.excavationReference}` : ''}`;
  }
  return `${who} ${doneBy[e.action] ?? e.action.replace(/_/g, ' ')}`;
}

function lowerFirst(s: string): string {
  return s.charAt(0).toLowerCase() + s.slice(1);
}
