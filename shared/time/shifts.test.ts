import { describe, expect, it } from 'vitest';
import {
  currentShift,
  isoWeekAt,
  isoWeekOfDate,
  isoWeekRange,
  offsetMinutes,
  shiftsBetween,
  siteTimestamp,
  zonedInstant,
  formatSiteTime,
} from './shifts';

// Clock changes used below, from the published rules (not from this code):
// - UK: summer time from 01:00 UTC on the last Sunday of March to 01:00 UTC on the last Sunday of
//   October (Summer Time Order 2002; EU Directive 2000/84/EC). 2026: 29 March and 25 October.
// - US Eastern: 02:00 local on the second Sunday of March to 02:00 local on the first Sunday of
//   November (Energy Policy Act 2005). 2026: 8 March and 1 November.
// ISO weeks: ISO 8601 (week 1 holds the year's first Thursday; weeks start on Monday).

const day = [{ name: 'Day shift', start: '07:00' }];
const twoShifts = [
  { name: 'Night shift', start: '19:00' },
  { name: 'Day shift', start: '07:00' },
];

describe('zoned wall-clock times', () => {
  it('finds the UTC instant of 07:00 in London in winter and in summer', () => {
    expect(zonedInstant(2026, 1, 15, 7, 0, 'Europe/London').toISOString()).toBe('2026-01-15T07:00:00.000Z');
    expect(zonedInstant(2026, 7, 15, 7, 0, 'Europe/London').toISOString()).toBe('2026-07-15T06:00:00.000Z');
    expect(offsetMinutes(new Date('2026-07-15T12:00:00Z'), 'Europe/London')).toBe(60);
    expect(offsetMinutes(new Date('2026-07-15T12:00:00Z'), 'America/New_York')).toBe(-240);
  });

  it('moves a time that does not exist (clocks go forward) past the jump', () => {
    // 01:30 on 29 March 2026 never shows on a London clock: 01:00 GMT becomes 02:00 BST.
    expect(zonedInstant(2026, 3, 29, 1, 30, 'Europe/London').toISOString()).toBe('2026-03-29T01:30:00.000Z');
    // 02:30 on 8 March 2026 never shows in New York: 02:00 EST becomes 03:00 EDT.
    expect(zonedInstant(2026, 3, 8, 2, 30, 'America/New_York').toISOString()).toBe('2026-03-08T07:30:00.000Z');
  });

  it('takes the first of a time that happens twice (clocks go back)', () => {
    // 01:30 on 25 October 2026 happens at 00:30 UTC (BST) and again at 01:30 UTC (GMT).
    expect(zonedInstant(2026, 10, 25, 1, 30, 'Europe/London').toISOString()).toBe('2026-10-25T00:30:00.000Z');
  });

  it('writes site timestamps on the local clock', () => {
    expect(siteTimestamp(new Date('2026-07-15T06:00:00Z'), 'Europe/London')).toBe('2026-07-15 07:00');
  });
});

describe('the current shift', () => {
  it("is today's day shift after 07:00 and yesterday's before it", () => {
    const s = currentShift(day, 'Europe/London', new Date('2026-02-10T09:00:00Z'));
    expect(s.start.toISOString()).toBe('2026-02-10T07:00:00.000Z');
    expect(s.end.toISOString()).toBe('2026-02-11T07:00:00.000Z');
    expect(s.date).toBe('2026-02-10');
    const early = currentShift(day, 'Europe/London', new Date('2026-02-10T06:59:00Z'));
    expect(early.start.toISOString()).toBe('2026-02-09T07:00:00.000Z');
  });

  it('starts at 07:00 on the local clock across the spring change (a 23-hour shift)', () => {
    const sat = currentShift(day, 'Europe/London', new Date('2026-03-28T12:00:00Z'));
    expect(sat.start.toISOString()).toBe('2026-03-28T07:00:00.000Z');
    expect(sat.end.toISOString()).toBe('2026-03-29T06:00:00.000Z'); // 07:00 BST
    expect((sat.end.getTime() - sat.start.getTime()) / 3600_000).toBe(23);
  });

  it('starts at 07:00 on the local clock across the autumn change (a 25-hour shift)', () => {
    const sat = currentShift(day, 'Europe/London', new Date('2026-10-24T12:00:00Z'));
    expect(sat.start.toISOString()).toBe('2026-10-24T06:00:00.000Z');
    expect(sat.end.toISOString()).toBe('2026-10-25T07:00:00.000Z');
    expect((sat.end.getTime() - sat.start.getTime()) / 3600_000).toBe(25);
  });

  it('picks between a day and a night shift whatever order they were given in', () => {
    const tz = 'America/New_York';
    const night = currentShift(twoShifts, tz, new Date('2026-06-02T03:00:00Z')); // 23:00 EDT on 1 June
    expect(night.name).toBe('Night shift');
    expect(night.start.toISOString()).toBe('2026-06-01T23:00:00.000Z');
    expect(night.end.toISOString()).toBe('2026-06-02T11:00:00.000Z');
    const dayShift = currentShift(twoShifts, tz, new Date('2026-06-02T12:00:00Z'));
    expect(dayShift.name).toBe('Day shift');
    expect(dayShift.start.toISOString()).toBe('2026-06-02T11:00:00.000Z');
  });

  it('lists the shifts of a span in order', () => {
    const list = shiftsBetween(twoShifts, 'Europe/London', new Date('2026-01-05T00:00:00Z'), new Date('2026-01-07T00:00:00Z'));
    expect(list.map((s) => `${s.date} ${s.name}`)).toEqual([
      '2026-01-05 Day shift',
      '2026-01-05 Night shift',
      '2026-01-06 Day shift',
      '2026-01-06 Night shift',
    ]);
    expect(list[3].end.toISOString()).toBe('2026-01-07T07:00:00.000Z');
  });
});

describe('ISO weeks', () => {
  it('numbers weeks as ISO 8601 does around the turn of the year', () => {
    expect(isoWeekOfDate(2026, 1, 1)).toBe('2026-W01'); // a Thursday
    expect(isoWeekOfDate(2024, 12, 30)).toBe('2025-W01');
    expect(isoWeekOfDate(2021, 1, 3)).toBe('2020-W53');
    expect(isoWeekAt(new Date('2026-03-29T23:30:00Z'), 'Europe/London')).toBe('2026-W14'); // 00:30 BST Monday 30 March
  });

  it('bounds a week from Monday 00:00 local, 167 hours long in the week the clocks go forward', () => {
    const w = isoWeekRange('2026-W13', 'Europe/London')!;
    expect(w.monday).toBe('2026-03-23');
    expect(w.sunday).toBe('2026-03-29');
    expect(w.from.toISOString()).toBe('2026-03-23T00:00:00.000Z');
    expect(w.to.toISOString()).toBe('2026-03-29T23:00:00.000Z');
    expect((w.to.getTime() - w.from.getTime()) / 3600_000).toBe(167);
  });

  it('refuses a week that does not exist', () => {
    expect(isoWeekRange('2021-W53', 'Europe/London')).toBeNull();
    expect(isoWeekRange('2020-W53', 'Europe/London')?.monday).toBe('2020-12-28');
    expect(isoWeekRange('2026-W00', 'Europe/London')).toBeNull();
    expect(isoWeekRange('2026-14', 'Europe/London')).toBeNull();
  });
});

describe('site-time formatting (screens, e-mails, the printed permit)', () => {
  it('shows an instant on the site’s clock, not the machine’s', () => {
    // UK summer time is UTC+1 from the last Sunday in March (The Summer Time Act 1972, as amended).
    expect(formatSiteTime('2026-06-16T06:10:00Z', 'Europe/London')).toBe('Tue, 16 Jun 2026, 07:10');
    expect(formatSiteTime(new Date('2026-01-16T06:10:00Z'), 'Europe/London')).toBe('Fri, 16 Jan 2026, 06:10');
    // Sydney keeps daylight time (UTC+11) in January (NSW Standard Time Act 1987).
    expect(formatSiteTime('2026-01-16T06:10:05Z', 'Australia/Sydney', { seconds: true, zone: true })).toBe(
      'Fri, 16 Jan 2026, 17:10:05 (Australia/Sydney)',
    );
  });

  it('reads midnight as 00:00 (24-hour clock) and gives back text that is not a time', () => {
    expect(formatSiteTime('2026-03-30T23:00:00Z', 'Europe/London')).toBe('Tue, 31 Mar 2026, 00:00');
    expect(formatSiteTime('not a time', 'Europe/London')).toBe('not a time');
  });

  it('gives the clock alone for a time on a day already named', () => {
    // The same instants as above: UK summer time UTC+1; Sydney daylight time UTC+11 in January.
    expect(formatSiteTime('2026-06-16T06:10:00Z', 'Europe/London', { clock: true })).toBe('07:10');
    expect(formatSiteTime('2026-03-30T23:00:00Z', 'Europe/London', { clock: true })).toBe('00:00');
    expect(formatSiteTime('2026-01-16T06:10:05Z', 'Australia/Sydney', { clock: true, seconds: true })).toBe('17:10:05');
  });
});
