import type { FieldPermit } from '@shared/schemas/field';
import type { Kept } from '../api/kept';

/**
 * A shown copy older than this (ms) of a permit in force is "possibly out of date" (decided: 5 min;
 * the page asks the server every minute, so a copy this old means several tries failed, and a
 * suspension must not stay unseen for long). See docs/phone-offline.md, "Where an answer came from".
 */
export const STALE_AFTER_MS = 5 * 60_000;

/** States in which work may go on under a permit, or has just been stopped: a stale copy of these can mislead. */
const inForceStatuses: readonly FieldPermit['status'][] = ['approved', 'live', 'suspended'];

/**
 * How old the shown answer is (ms). A server answer counts from when it arrived, on the phone's own
 * clock (so a phone clock that is off does not raise a warning with signal); a kept copy counts from
 * the server's time on it (`asOf`).
 */
export function answerAge(shown: Kept<{ asOf: string }>, now: number): number {
  if (shown.source === 'server' && shown.triedAt !== null) return Math.max(0, now - shown.triedAt);
  return Math.max(0, now - Date.parse(shown.answer.asOf));
}

/** The copy shown is old enough, and about a permit in force, to warn that it may be out of date. */
export function possiblyOutOfDate(shown: Kept<{ asOf: string }>, statuses: readonly FieldPermit['status'][], now: number): boolean {
  return statuses.some((s) => inForceStatuses.includes(s)) && answerAge(shown, now) > STALE_AFTER_MS;
}

/** What the page says about where the shown answer came from. */
type Provenance = 'server' | 'asking' | 'no-signal';

export function provenance(shown: Kept<unknown>): Provenance {
  if (shown.source === 'server') return 'server';
  return shown.triedAt === null ? 'asking' : 'no-signal';
}

/** The last try to reach the server, for the refresh button's line. */
export interface LastTry {
  at: number;
  reached: boolean;
}
