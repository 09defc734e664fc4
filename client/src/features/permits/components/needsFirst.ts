import type { PermitSummary } from '@shared/schemas/permits';
import { wallClock } from '@shared/time/shifts';

/** Why a supervisor's own permit comes first on the dashboard, most pressing first. */
const needs = ['returned', 'draft', 'today'] as const;
type Need = (typeof needs)[number];

export const needTitles: Record<Need, string> = {
  returned: 'Returned for changes',
  draft: 'Drafts not yet sent',
  today: 'Working today',
};

export const needHints: Record<Need, string> = {
  returned: 'The coordinator asked for changes: change the request and send it again.',
  draft: 'Finish them and send them for review.',
  today: 'Live, suspended or approved with a window open today: brief the operators, hand back when done.',
};

function siteDate(at: Date, timeZone: string): string {
  const w = wallClock(at, timeZone);
  return `${w.year}-${String(w.month).padStart(2, '0')}-${String(w.day).padStart(2, '0')}`;
}

/**
 * A supervisor's own permits grouped by what they need, most pressing first: returned for changes
 * (latest first), drafts (latest first), then those working today on the site's clock (live,
 * suspended, or approved with a window that covers part of today; by when the window opens).
 * Anything else needs nothing from them now and is left out.
 */
export function needsFirst(list: PermitSummary[], now: Date, timeZone: string): { need: Need; permits: PermitSummary[] }[] {
  const today = siteDate(now, timeZone);
  const byUpdate = (a: PermitSummary, b: PermitSummary) => b.updatedAt.localeCompare(a.updatedAt) || b.id - a.id;
  const workingToday = (p: PermitSummary) =>
    (p.status === 'live' || p.status === 'suspended' || p.status === 'approved') &&
    siteDate(new Date(p.windowStart), timeZone) <= today &&
    siteDate(new Date(new Date(p.windowEnd).getTime() - 1), timeZone) >= today;
  const groups: Record<Need, PermitSummary[]> = {
    returned: list.filter((p) => p.status === 'returned').sort(byUpdate),
    draft: list.filter((p) => p.status === 'draft').sort(byUpdate),
    today: list.filter(workingToday).sort((a, b) => a.windowStart.localeCompare(b.windowStart) || a.id - b.id),
  };
  return needs.filter((n) => groups[n].length).map((need) => ({ need, permits: groups[need] }));
}
