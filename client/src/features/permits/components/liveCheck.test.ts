import { describe, expect, it } from 'vitest';
import { localProjection } from '@shared/geometry';
import { cumulativeCheck, planOutcome, type CheckInput } from '@shared/permits/check';
import { sixExcavation } from '@shared/engineering/test-fixtures';
import '@client/lib/forms'; // the plain zod reasons every form page sets
import { liveOutcome } from './liveCheck';

// A pit 3 m deep, 5 m square, and a gravel heap 1 m from its east face, in site-local metres.
const proj = localProjection([-1.04833, 52.37124]);
const square = (x0: number, y0: number, w: number): [number, number][] =>
  (
    [
      [x0, y0],
      [x0 + w, y0],
      [x0 + w, y0 + w],
      [x0, y0 + w],
      [x0, y0],
    ] as [number, number][]
  ).map((p) => proj.toWgs84(p) as [number, number]);
const pit = {
  id: 1,
  reference: 'PIT-A',
  name: 'Pit',
  shape: { kind: 'pit' as const, outline: { type: 'Polygon' as const, coordinates: [square(0, 0, 5)] } },
  excavation: sixExcavation(),
  soil: [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 0 }],
};
const withHeap = (heap: { unitWeight: number; height: number }): CheckInput => ({
  origin: [-1.04833, 52.37124],
  method: 'dispersion-45',
  minimumClearance: 0.6,
  permit: {
    id: null,
    number: 'new',
    windowStart: '2030-01-01T08:00:00Z',
    windowEnd: '2030-01-01T12:00:00Z',
    loads: [{ id: 'heap', kind: 'stockpile', label: 'Gravel heap', outline: { type: 'Polygon', coordinates: [square(6, 1, 2)] }, ...heap }],
  },
  excavations: [pit],
  plant: new Map(),
  others: [],
  now: new Date('2030-01-01T07:00:00Z'),
});

describe('the live check beside the placing map', () => {
  it('gives a verdict for figures the shared schemas accept', () => {
    const out = liveOutcome(() => cumulativeCheck(withHeap({ unitWeight: 19, height: 1.5 })));
    expect(out.invalid).toBeNull();
    expect(out.check?.verdict).toMatch(/^(passes|close|fails)$/);
    expect(Number.isFinite(out.check!.utilisation)).toBe(true);
  });

  it('says "Cannot check" with the field as the form labels it for a negative unit weight, never "Passes"', () => {
    const out = liveOutcome(() => cumulativeCheck(withHeap({ unitWeight: -19, height: 1.5 })));
    expect(out.check).toBeNull();
    expect(out.invalid).toBe('Cannot check: Load 1: Unit weight (kN/m³) must be more than 0 kN/m³.');
  });

  it('says "Cannot check" for an empty height (NaN from an empty box), never "utilisation NaN"', () => {
    const out = liveOutcome(() => cumulativeCheck(withHeap({ unitWeight: 19, height: NaN })));
    expect(out.check).toBeNull();
    expect(out.invalid).toBe('Cannot check: Load 1: Height (m) is required: type a figure.');
    expect(out.invalid).not.toMatch(/NaN|loads\[/);
  });

  it('names an excavation figure the calculation refuses by the excavation and the soil layer', () => {
    const atRest = {
      ...pit,
      excavation: { ...pit.excavation, pressureState: 'at-rest' as const },
      soil: [{ top: 0, unitWeight: 18, undrainedShearStrength: 40 }],
    };
    const out = liveOutcome(() => cumulativeCheck({ ...withHeap({ unitWeight: 19, height: 1.5 }), excavations: [atRest] }));
    expect(out.invalid).toMatch(/^Cannot check: PIT-A Layer 1 /);
  });

  it('words a drag frame whose load overlaps the pit as the full check does (the plan gives the refusal back, not thrown)', () => {
    const sound = withHeap({ unitWeight: 19, height: 1.5 });
    const heap = sound.permit.loads[0] as Extract<CheckInput['permit']['loads'][number], { kind: 'stockpile' }>;
    // 4-6 m east overlaps the pit's 0-5 m: plane geometry.
    const over = {
      ...sound,
      permit: { ...sound.permit, loads: [{ ...heap, outline: { type: 'Polygon' as const, coordinates: [square(4, 1, 2)] } }] },
    };
    const {
      permit: { loads, ...permit },
      now,
      ...rest
    } = over;
    const frame = planOutcome({ ...rest, permit, standoffs: false });
    const full = liveOutcome(() => cumulativeCheck(over));
    expect(full.refused).toMatch(/touches or overlaps excavation PIT-A/);
    expect(liveOutcome(() => frame(loads, now))).toEqual(full);
    // The same plan, the heap moved clear again: a verdict.
    expect(liveOutcome(() => frame(sound.permit.loads, now)).check?.verdict).toMatch(/^(passes|close|fails)$/);
  });
});
