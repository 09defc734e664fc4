import { describe, expect, it } from 'vitest';
import type { Kept } from '../api/kept';
import { answerAge, possiblyOutOfDate, provenance, STALE_AFTER_MS } from './copy';
import { stampText, whenText } from './format';

const asOf = '2026-06-10T09:00:00.000Z';
const t0 = Date.parse(asOf);
const min = 60_000;
const copy = (source: Kept<unknown>['source'], triedAt: number | null): Kept<{ asOf: string }> => ({ answer: { asOf }, source, triedAt });

describe('a copy that may be out of date', () => {
  it('the threshold is 5 minutes', () => {
    expect(STALE_AFTER_MS).toBe(5 * min);
  });

  it('warns for a kept copy of a live, suspended or approved permit older than 5 minutes, from the time on the copy', () => {
    for (const status of ['live', 'suspended', 'approved'] as const) {
      expect(possiblyOutOfDate(copy('phone', t0 + 6 * min), [status], t0 + 6 * min)).toBe(true);
      expect(possiblyOutOfDate(copy('phone', t0 + 4 * min), [status], t0 + 4 * min)).toBe(false);
    }
    // The copy shown while the first answer is on its way counts the same.
    expect(possiblyOutOfDate(copy('phone', null), ['live'], t0 + 5 * min + 1)).toBe(true);
    expect(possiblyOutOfDate(copy('phone', null), ['live'], t0 + 5 * min)).toBe(false);
  });

  it('does not warn for permits no longer in force', () => {
    for (const status of ['handed_back', 'lapsed', 'withdrawn'] as const)
      expect(possiblyOutOfDate(copy('phone', null), [status], t0 + 60 * min)).toBe(false);
    // A list warns when any permit in it is in force.
    expect(possiblyOutOfDate(copy('phone', null), ['lapsed', 'live'], t0 + 60 * min)).toBe(true);
  });

  it("a server answer ages from its arrival on the phone's clock (a phone clock 10 min fast does not warn)", () => {
    const arrived = t0 + 10 * min; // the phone's clock reads 10 min ahead of the server's
    expect(answerAge(copy('server', arrived), arrived + min)).toBe(min);
    expect(possiblyOutOfDate(copy('server', arrived), ['live'], arrived + min)).toBe(false);
    // …but a server answer not renewed for over 5 minutes is old too.
    expect(possiblyOutOfDate(copy('server', arrived), ['live'], arrived + 6 * min)).toBe(true);
  });
});

describe('what the page says about an answer', () => {
  it('server, waiting for the server, or no signal', () => {
    expect(provenance(copy('server', t0))).toBe('server');
    expect(provenance(copy('phone', null))).toBe('asking');
    expect(provenance(copy('phone', t0))).toBe('no-signal');
  });

  it('the time a copy dates from', () => {
    const at = new Date(2026, 5, 10, 14, 39);
    expect(stampText(at.toISOString(), new Date(2026, 5, 10, 14, 39, 20))).toBe('14:39, just now');
    expect(stampText(at.toISOString(), new Date(2026, 5, 10, 14, 51))).toBe('14:39, 12 min ago');
    expect(stampText(at.toISOString(), new Date(2026, 5, 10, 17, 0))).toBe('14:39');
    expect(stampText(at.toISOString(), new Date(2026, 5, 11, 8, 0))).toBe('Wed 10 Jun 14:39');
    // The server's answer is said the same way, with "at".
    expect(whenText(at.toISOString(), new Date(2026, 5, 10, 14, 51))).toBe('at 14:39 (12 min ago)');
    expect(whenText(at.toISOString(), new Date(2026, 5, 11, 8, 0))).toBe('on Wed 10 Jun at 14:39');
  });
});
