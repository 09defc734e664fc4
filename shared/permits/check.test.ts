import { describe, expect, it } from 'vitest';
import { runCheck, type CheckRequest } from '../engineering';
import { localProjection } from '../geometry';
import { elementCorners, groupStandoff, windowsOverlap } from './check';

const base: Omit<CheckRequest, 'loads'> = {
  excavation: { depth: 3, groundwaterDepth: null, designSurcharge: 10, ratedPressure: null, pressureState: 'active', wallFriction: 0, restraint: 'unyielding' },
  soil: [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 0 }],
  method: 'dispersion-45',
  minimumClearance: 0.6,
  step: 0.05,
};

describe('a machine\u2019s bearing elements', () => {
  it('turn with the machine: facing east, the left track lies north of the origin', () => {
    // A track 4 m long, 0.6 m wide, 1 m to the left of the machine's origin (plane geometry, no published source).
    const corners = elementCorners({ x: 0, y: 1, length: 4, width: 0.6 }, [10, 20], 90);
    const xs = corners.map((c) => c[0]);
    const ys = corners.map((c) => c[1]);
    expect(Math.min(...xs)).toBeCloseTo(8, 9);
    expect(Math.max(...xs)).toBeCloseTo(12, 9);
    expect(Math.min(...ys)).toBeCloseTo(20.7, 9);
    expect(Math.max(...ys)).toBeCloseTo(21.3, 9);
  });

  it('project back to the same place', () => {
    const proj = localProjection([-1.04833, 52.37124]);
    const p = proj.toWgs84([12.5, -7.25]);
    const back = proj.toLocal(p);
    expect(back[0]).toBeCloseTo(12.5, 6);
    expect(back[1]).toBeCloseTo(-7.25, 6);
  });
});

describe('the standoff of loads that move together', () => {
  it('for one load equals the engine\u2019s own standoff (engineering.md §5)', () => {
    // The hand check of engineering.md §3.1: q = 60 kPa, B = 1 m; its standoff is 2.5 m there
    // (common practice, no published source; the engine's example result).
    const strip = { id: 'footing', kind: 'strip' as const, pressure: 60, width: 1, offset: 1 };
    const engine = runCheck({ ...base, loads: [strip] }).loads[0].standoff;
    expect(engine).toBe(2.5);
    expect(groupStandoff(base, [strip])).toBe(engine);
  });

  it('for two tracks is where both together pass, and a centimetre closer fails', () => {
    const track = (id: string, offset: number) => ({ id, kind: 'area' as const, pressure: 50, width: 0.6, length: 3.35, offset });
    const pair = [track('near', 0.5), track('far', 1.8)];
    const s = groupStandoff(base, pair)!;
    expect(s).not.toBeNull();
    const at = (d: number) => runCheck({ ...base, loads: [track('near', d), track('far', d + 1.3)] }).passes;
    expect(at(s)).toBe(true);
    expect(at(s - 0.01)).toBe(false);
    // Each track alone would be allowed closer: the pair's standoff is the larger.
    const alone = runCheck({ ...base, loads: [track('near', 0.5)] }).loads[0].standoff!;
    expect(s).toBeGreaterThan(alone);
  });

  it('is null when no offset within 3H passes (an elastic load reaches the support from any distance)', () => {
    const huge = [{ id: 'x', kind: 'strip' as const, pressure: 2000, width: 5, offset: 0.5 }];
    expect(groupStandoff({ ...base, method: 'elastic', excavation: { ...base.excavation, designSurcharge: 1 } }, huge)).toBeNull();
  });
});

describe('windows', () => {
  it('overlap when they share an instant, not when one ends as the other starts', () => {
    const a = { windowStart: '2030-01-01T08:00:00Z', windowEnd: '2030-01-01T12:00:00Z' };
    expect(windowsOverlap(a, { windowStart: '2030-01-01T11:59:00Z', windowEnd: '2030-01-01T13:00:00Z' })).toBe(true);
    expect(windowsOverlap(a, { windowStart: '2030-01-01T12:00:00Z', windowEnd: '2030-01-01T13:00:00Z' })).toBe(false);
  });
});
