import { describe, expect, it } from 'vitest';
import type { PermitStatus, PermitSummary } from '@shared/schemas/permits';
import { needsFirst } from './needsFirst';

let next = 1;
function permit(status: PermitStatus, windowStart: string, windowEnd: string, updatedAt = '2026-03-02T08:00:00.000Z'): PermitSummary {
  const id = next++;
  return {
    id,
    siteId: 1,
    siteName: 'Test site',
    number: `P-${id}`,
    kind: 'load',
    status,
    statusLabel: status,
    version: 1,
    revision: 1,
    description: `Permit ${id}`,
    windowStart,
    windowEnd,
    excavationIds: [1],
    requestedBy: { id: 1, name: 'Sana Whitlock' },
    utilisation: null,
    passes: null,
    updatedAt,
  };
}

// Monday 2 March 2026, 10:00 in London (UTC+0 in winter).
const now = new Date('2026-03-02T10:00:00.000Z');
const zone = 'Europe/London';

describe('what needs a supervisor first', () => {
  it('puts returned requests first, then drafts, then permits working today, and leaves the rest out', () => {
    const oldDraft = permit('draft', '2026-03-05T07:00:00.000Z', '2026-03-05T17:00:00.000Z', '2026-02-20T08:00:00.000Z');
    const newDraft = permit('draft', '2026-03-06T07:00:00.000Z', '2026-03-06T17:00:00.000Z', '2026-03-01T08:00:00.000Z');
    const returned = permit('returned', '2026-03-04T07:00:00.000Z', '2026-03-04T17:00:00.000Z');
    const liveNow = permit('live', '2026-03-02T09:00:00.000Z', '2026-03-02T17:00:00.000Z');
    const approvedLater = permit('approved', '2026-03-02T13:00:00.000Z', '2026-03-02T18:00:00.000Z');
    const suspendedSinceYesterday = permit('suspended', '2026-03-01T07:00:00.000Z', '2026-03-03T17:00:00.000Z');
    const approvedTomorrow = permit('approved', '2026-03-03T07:00:00.000Z', '2026-03-03T17:00:00.000Z');
    // Ended at midnight: its window does not reach into today.
    const endedAtMidnight = permit('live', '2026-03-01T07:00:00.000Z', '2026-03-02T00:00:00.000Z');
    const submitted = permit('submitted', '2026-03-02T07:00:00.000Z', '2026-03-02T17:00:00.000Z');
    const handedBack = permit('handed_back', '2026-03-02T07:00:00.000Z', '2026-03-02T09:00:00.000Z');

    const groups = needsFirst(
      [
        oldDraft,
        handedBack,
        approvedTomorrow,
        liveNow,
        submitted,
        newDraft,
        endedAtMidnight,
        approvedLater,
        returned,
        suspendedSinceYesterday,
      ],
      now,
      zone,
    );
    expect(groups.map((g) => [g.need, g.permits.map((p) => p.id)])).toEqual([
      ['returned', [returned.id]],
      ['draft', [newDraft.id, oldDraft.id]],
      ['today', [suspendedSinceYesterday.id, liveNow.id, approvedLater.id]],
    ]);
  });

  it('reads "today" on the site clock, not the device clock', () => {
    // 23:30 UTC on 2 March is already 3 March in Sydney (UTC+11).
    const late = new Date('2026-03-02T23:30:00.000Z');
    const tomorrowInSydney = permit('approved', '2026-03-02T22:00:00.000Z', '2026-03-03T06:00:00.000Z');
    const yesterdayInSydney = permit('live', '2026-03-02T00:00:00.000Z', '2026-03-02T06:00:00.000Z');
    const groups = needsFirst([tomorrowInSydney, yesterdayInSydney], late, 'Australia/Sydney');
    expect(groups).toEqual([{ need: 'today', permits: [tomorrowInSydney] }]);
  });

  it('is empty when nothing needs them', () => {
    expect(needsFirst([permit('submitted', '2026-03-02T07:00:00.000Z', '2026-03-02T17:00:00.000Z')], now, zone)).toEqual([]);
  });
});
