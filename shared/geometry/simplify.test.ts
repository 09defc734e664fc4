import { describe, expect, it } from 'vitest';
import { localProjection } from './projection';
import { SITE_TOLERANCE, simplifyLine, simplifyRing } from './simplify';
import { stepsFor } from './zones';

// Douglas & Peucker (1973): points within the tolerance of the kept line are dropped. Check values
// are constructed here (common practice, no published source).
const proj = localProjection([-1.53, 52.41]);
const ll = (x: number, y: number) => proj.toWgs84([x, y]) as [number, number];

describe('simplification to the site tolerance (0.05 m)', () => {
  it('drops points within 0.05 m of the line kept and keeps those farther', () => {
    const line = [ll(0, 0), ll(5, 0.04), ll(10, 0), ll(15, 0.2), ll(20, 0)];
    expect(simplifyLine(line)).toEqual([line[0], line[2], line[3], line[4]]);
    expect(simplifyLine(line, 0.25)).toEqual([line[0], line[4]]);
  });

  it('keeps a ring closed with at least three corners, dropping corners on its edges', () => {
    const ring = [ll(0, 0), ll(4, 0.01), ll(8, 0), ll(8, 6), ll(0, 6), ll(0, 0)];
    expect(simplifyRing(ring)).toEqual([ring[0], ring[2], ring[3], ring[4], ring[0]]);
    const thin = [ll(0, 0), ll(8, 0.01), ll(4, 0.02), ll(0, 0)];
    expect(simplifyRing(thin)).toEqual(thin);
  });

  it('draws a stored zone with as few chords as keep it within the tolerance of the true zone', () => {
    // r·(1/cos(π/(4·steps)) − 1) ≤ 0.05 m: 4 chords a quarter circle at 2.5 m, more for wider zones.
    expect(stepsFor(2.5, SITE_TOLERANCE)).toBe(4);
    for (const r of [0.5, 2.5, 6, 20]) {
      const steps = stepsFor(r, SITE_TOLERANCE);
      expect(r * (1 / Math.cos(Math.PI / (4 * steps)) - 1)).toBeLessThanOrEqual(SITE_TOLERANCE);
      expect(r * (1 / Math.cos(Math.PI / (4 * (steps - 1))) - 1)).toBeGreaterThan(SITE_TOLERANCE * (steps > 2 ? 1 : 0));
    }
    expect(stepsFor(2.5, 0)).toBe(64);
  });
});
