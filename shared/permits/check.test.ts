import { describe, expect, it, vi } from 'vitest';
import { NOT_MONOTONIC_WARNING, runCheck, type CheckRequest } from '../engineering';
import { localProjection } from '../geometry';
import { sixExcavation } from '../engineering/test-fixtures';
import {
  CheckInputError,
  cumulativeCheck,
  elementCorners,
  groupStandoff,
  isRefused,
  planCheck,
  planOutcome,
  windowsOverlap,
} from './check';
import type { PermitCheck, PlacedLoad } from '../schemas/permits';
import type { Stored } from '../schemas/stored';
import { frozen } from '../kept';

const base: Omit<CheckRequest, 'loads'> = {
  excavation: sixExcavation(),
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
  it('for one load equals the engine\u2019s own standoff (docs/calculation.md, "Standoff")', () => {
    // Worked example 1 of docs/calculation.md: q = 60 kPa, B = 1 m; its standoff is 2.5 m there
    // (common practice, no published source; the engine's example result).
    const strip = { id: 'footing', kind: 'strip' as const, pressure: 60, width: 1, offset: 1 };
    const engine = runCheck({ ...base, loads: [strip] }).loads[0].standoff;
    expect(engine).toBe(2.5);
    expect(groupStandoff(base, [strip]).standoff).toBe(engine);
  });

  it('for two tracks is where both together pass, and a centimetre closer fails', () => {
    const track = (id: string, offset: number) => ({ id, kind: 'area' as const, pressure: 50, width: 0.6, length: 3.35, offset });
    const pair = [track('near', 0.5), track('far', 1.8)];
    const s = groupStandoff(base, pair).standoff!;
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
    expect(groupStandoff({ ...base, method: 'elastic', excavation: { ...base.excavation, designSurcharge: 1 } }, huge).standoff).toBeNull();
  });
});

describe('windows', () => {
  it('overlap when they share an instant, not when one ends as the other starts', () => {
    const a = { windowStart: '2030-01-01T08:00:00Z', windowEnd: '2030-01-01T12:00:00Z' };
    expect(windowsOverlap(a, { windowStart: '2030-01-01T11:59:00Z', windowEnd: '2030-01-01T13:00:00Z' })).toBe(true);
    expect(windowsOverlap(a, { windowStart: '2030-01-01T12:00:00Z', windowEnd: '2030-01-01T13:00:00Z' })).toBe(false);
  });
});

describe('an open excavation the permit does not name', () => {
  // Two pits 3 m deep in the same ground, 20 m apart east–west, in site-local metres.
  const proj = localProjection([-1.04833, 52.37124]);
  const square = (x0: number, y0: number, w: number): [number, number][] => {
    const pts: [number, number][] = [
      [x0, y0],
      [x0 + w, y0],
      [x0 + w, y0 + w],
      [x0, y0 + w],
      [x0, y0],
    ];
    return pts.map((p) => proj.toWgs84(p) as [number, number]);
  };
  const pit = (id: number, reference: string, x0: number) => ({
    id,
    reference,
    name: reference,
    shape: { kind: 'pit' as const, outline: { type: 'Polygon' as const, coordinates: [square(x0, 0, 5)] } },
    excavation: base.excavation,
    soil: base.soil,
  });
  const named = pit(1, 'PIT-A', 0);
  const other = pit(2, 'PIT-B', 25);
  const stockpileAt = (x0: number) => ({
    id: 'heap',
    kind: 'stockpile' as const,
    label: 'Gravel heap',
    outline: { type: 'Polygon' as const, coordinates: [square(x0, 1, 2)] },
    unitWeight: 18,
    height: 1.5,
  });
  const input = (x0: number) => ({
    origin: [-1.04833, 52.37124] as [number, number],
    method: 'dispersion-45' as const,
    minimumClearance: 0.6,
    permit: { id: null, number: 'P-T', windowStart: '2030-01-01T08:00:00Z', windowEnd: '2030-01-01T12:00:00Z', loads: [stockpileAt(x0)] },
    excavations: [named],
    nearby: [other],
    plant: new Map(),
    others: [],
    now: new Date('2030-01-01T07:00:00Z'),
  });

  it('is checked too, with a warning to name it, when a load stands within its influence zone', () => {
    // The heap's east edge is 1 m from PIT-B (x 22..24 against the pit's face at 25): inside the
    // influence zone, which reaches as far from the edge as the pit is deep (docs/calculation.md, "Load spread at 45°";
    // common practice, no published source).
    const check = cumulativeCheck(input(22));
    const refs = check.excavations.map((e) => [e.reference, e.named]);
    expect(refs).toEqual([
      ['PIT-A', true],
      ['PIT-B', false],
    ]);
    expect(check.warnings.some((w) => w.startsWith('PIT-B is not named on this permit') && w.includes('Gravel heap'))).toBe(true);
    // 1 m from PIT-B the heap adds pressure there: that check is not empty.
    expect(check.excavations[1].result.utilisation).toBeGreaterThan(0);
  });

  it('gives, without the standoff search (a frame of a drag), the same verdicts and figures as the full check, and no standoff', () => {
    // Same engine, same loads: only the standoff search is left out (docs/calculation.md, "Standoff").
    const full = cumulativeCheck(input(22));
    const quick = cumulativeCheck({ ...input(22), standoffs: false });
    expect(full.computedStandoff).not.toBeNull();
    expect(quick.computedStandoff).toBeNull();
    expect(quick.excavations.flatMap((e) => e.loadStandoffs.map((l) => l.standoff))).toEqual([null, null]);
    expect([quick.verdict, quick.utilisation, quick.passes]).toEqual([full.verdict, full.utilisation, full.passes]);
    expect(quick.excavations.map((e) => [e.reference, e.result.utilisation, e.loads.map((l) => l.force)])).toEqual(
      full.excavations.map((e) => [e.reference, e.result.utilisation, e.loads.map((l) => l.force)]),
    );
  });

  it('refuses figures the shared schemas refuse, naming the field, instead of giving a verdict (docs/calculation.md, "Refusals")', () => {
    const withHeap = (heap: Record<string, unknown>) => ({
      ...input(22),
      permit: { ...input(22).permit, loads: [{ ...stockpileAt(22), ...heap }] },
    });
    const refusal = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return e instanceof CheckInputError ? `${e.field} ${e.reason}` : `other: ${(e as Error).message}`;
      }
      return 'no refusal';
    };
    expect(refusal(() => cumulativeCheck(withHeap({ unitWeight: -19 })))).toBe('loads[0].unitWeight must be more than 0 kN/m³');
    expect(refusal(() => cumulativeCheck(withHeap({ height: NaN })))).toMatch(/^loads\[0\]\.height /);
    // An excavation whose figures the calculation refuses: at rest with an undrained layer.
    const atRest = {
      ...named,
      excavation: { ...named.excavation, pressureState: 'at-rest' as const },
      soil: [{ top: 0, unitWeight: 18, undrainedShearStrength: 40 }],
    };
    expect(refusal(() => cumulativeCheck({ ...input(22), excavations: [atRest] }))).toMatch(
      /^PIT-A soil\[0\]\.undrainedShearStrength .*at rest needs φ′/,
    );
  });

  it('is left out when every load stands beyond its influence zone', () => {
    // The heap at x 12..14 is 11 m from PIT-B (deeper than 3 m away) and 7 m from PIT-A.
    const check = cumulativeCheck(input(12));
    expect(check.excavations.map((e) => e.reference)).toEqual(['PIT-A']);
    expect(check.warnings.some((w) => w.includes('not named'))).toBe(false);
  });
});

describe('a machine dragged on the placing map (a check each frame)', () => {
  // A 20 t excavator on two tracks walked towards a 3 m pit, frame by frame, with another permit's
  // stockpile counted beside the same pit and a second pit 20 m east, in site-local metres (the
  // geometry is plane geometry, the figures the engine's; common practice, no published source).
  const origin: [number, number] = [-1.04833, 52.37124];
  const proj = localProjection(origin);
  const square = (x0: number, y0: number, w: number) => ({
    type: 'Polygon' as const,
    coordinates: [
      [
        [x0, y0],
        [x0 + w, y0],
        [x0 + w, y0 + w],
        [x0, y0 + w],
        [x0, y0],
      ].map((p) => proj.toWgs84(p as [number, number]) as [number, number]),
    ],
  });
  const pit = (id: number, reference: string, x0: number) => ({
    id,
    reference,
    name: reference,
    shape: { kind: 'pit' as const, outline: square(x0, 0, 5) },
    excavation: base.excavation,
    soil: base.soil,
  });
  const excavator = {
    id: 7,
    name: 'Excavator 20 t',
    operatingMass: 20,
    designFactor: 1.2,
    elements: [
      { name: 'Left track', kind: 'track' as const, x: 0, y: 1.1, length: 3.6, width: 0.6, share: 0.5 },
      { name: 'Right track', kind: 'track' as const, x: 0, y: -1.1, length: 3.6, width: 0.6, share: 0.5 },
    ],
  };
  const heap = { id: 'heap', kind: 'stockpile' as const, label: 'Spoil', outline: square(-4, 1, 2), unitWeight: 18, height: 1.5 };
  const other = {
    id: 2,
    number: 'P-0002',
    status: 'live' as const,
    windowStart: '2030-01-01T06:00:00Z',
    windowEnd: '2030-01-01T18:00:00Z',
    excavationIds: [1],
    loads: [heap],
  };
  /** The machine with its centre at (x, 2.5), facing north; the frames walk it from beside PIT-B onto PIT-A's edge. */
  const at = (x: number) => ({
    origin,
    method: 'dispersion-45' as const,
    minimumClearance: 0.6,
    permit: {
      id: 1,
      number: 'P-0001',
      windowStart: '2030-01-01T08:00:00Z',
      windowEnd: '2030-01-01T12:00:00Z',
      loads: [
        { id: 'exc', kind: 'plant' as const, label: '', plantItemId: 7, position: proj.toWgs84([x, 2.5]) as [number, number], rotation: 0 },
        { id: 'mat', kind: 'area' as const, label: 'Mats', outline: square(9, 7, 1), pressure: 12 },
      ],
    },
    excavations: [pit(1, 'PIT-A', 0)],
    nearby: [pit(2, 'PIT-B', 20)],
    plant: new Map([[7, excavator]]),
    others: [other],
    now: new Date('2030-01-01T07:00:00Z'),
  });
  const frames = Array.from({ length: 24 }, (_, i) => 17.5 - i * 0.6);
  type Check = typeof cumulativeCheck;
  /** What a check shows, less the standoffs and the pressure profile (a frame leaves both out), or the words of its refusal. */
  const shown = (check: Check, input: Parameters<Check>[0]) => {
    try {
      const c = check(input);
      return {
        verdict: c.verdict,
        utilisation: c.utilisation,
        passes: c.passes,
        outside: c.outsideInfluence,
        others: c.otherPermits.map((o) => o.number),
        excavations: c.excavations.map((e) => ({
          reference: e.reference,
          named: e.named,
          request: e.request,
          utilisation: e.result.utilisation,
          passes: e.result.passes,
          maxTotalPressure: e.result.maxTotalPressure,
          loads: e.loads.map((l) => [l.engineId, l.offset, l.force]),
          counted: e.counted.map((o) => o.number),
        })),
        warnings: c.warnings.filter((w) => !/standoff|3H/i.test(w)),
      };
    } catch (e) {
      return { refused: (e as Error).message };
    }
  };

  it('shows each frame the figures of a full check of that placement worked out afresh', async () => {
    // Each frame reuses what the frames before it worked out (outlines, the other permit's loads,
    // the excavation's valid figures and soil model); the full check it is compared with runs in a
    // fresh copy of the module, which has kept nothing.
    const seen = new Set<string>();
    for (const x of frames) {
      const live = shown(cumulativeCheck, { ...at(x), standoffs: false });
      vi.resetModules();
      const fresh = await import('./check');
      const full = shown(fresh.cumulativeCheck, at(x));
      expect(live, `machine centred ${x} m east of the pit's west face`).toEqual(full);
      seen.add('refused' in live ? 'refused' : live.excavations.length === 2 ? 'both pits' : String(live.verdict));
    }
    // The walk passes through every case: clear of both pits, within PIT-B's influence zone, on the edge of PIT-A.
    expect([...seen].sort()).toEqual(expect.arrayContaining(['both pits', 'refused']));
    // A frame draws no profile, so it works none out; the full check keeps it.
    expect(cumulativeCheck({ ...at(frames[0]), standoffs: false }).excavations[0].result.profile).toBeUndefined();
    expect(cumulativeCheck(at(frames[0])).excavations[0].result.profile?.length).toBeGreaterThan(0);
    expect(seen.size).toBeGreaterThanOrEqual(3);
  }, 60_000);

  it('gives from one plan, frame after frame, the verdict and figures of a full check worked out afresh, on every boundary', async () => {
    // The placing map makes one plan (everything but the loads) and runs it each frame. The machine's
    // west track edge stands x − 6.4 m from PIT-A's east face (tracks 1.1 m either side of its centre,
    // 0.6 m wide) and its east track edge 18.6 − x m from PIT-B's west face: plane geometry. Positions
    // on each boundary and a millimetre either side: touching PIT-A (offset 0), PIT-B's influence zone
    // (offset = its depth, 3 m: docs/calculation.md, "Load spread at 45°"; common practice, no published
    // source) and the machine's computed standoff from PIT-A (the full check's own figure).
    const { permit: planPermit, now: _now, ...basis } = at(12);
    void _now;
    const { loads: _loads, ...permitBasis } = planPermit;
    void _loads;
    const frame = planCheck({ ...basis, permit: permitBasis, standoffs: false });
    // The placing map's form of the plan: a refusal given back as Refused, not thrown.
    const quiet = planOutcome({ ...basis, permit: permitBasis, standoffs: false });
    const standoff = cumulativeCheck(at(12)).excavations[0].loadStandoffs.find((l) => l.loadId === 'exc')!.standoff!;
    expect(standoff).toBeGreaterThan(0.6);
    const xs = [
      6.4,
      6.4 + 1e-6,
      6.401,
      6.4 + standoff - 0.001,
      6.4 + standoff,
      6.4 + standoff + 0.001,
      15.599,
      15.6,
      15.601,
      12,
      6.4 + standoff,
    ];
    const turned = (x: number, rotation: number) => {
      const input = at(x);
      return { ...input, permit: { ...input.permit, loads: [{ ...input.permit.loads[0], rotation }, input.permit.loads[1]] } };
    };
    const inputs = [...xs.map((x) => at(x)), turned(12, 90), turned(8, 45), turned(8, 45)];
    const seen = new Set<string>();
    for (const input of inputs) {
      const live = shown((i) => frame(i.permit.loads, i.now), input);
      vi.resetModules();
      const fresh = await import('./check');
      const full = shown(fresh.cumulativeCheck, input);
      expect(live, JSON.stringify(input.permit.loads[0])).toEqual(full);
      const outcome = quiet(input.permit.loads, input.now);
      expect(
        isRefused(outcome) ? { refused: outcome.message } : shown(() => outcome, input),
        JSON.stringify(input.permit.loads[0]),
      ).toEqual(full);
      seen.add('refused' in live ? 'refused' : `${live.excavations.length} ${String(live.verdict)}`);
    }
    // The walk meets a refusal, both pits, and on either side of the standoff a verdict that differs.
    expect(seen.has('refused')).toBe(true);
    expect([...seen].some((v) => v.startsWith('2 '))).toBe(true);
    expect(new Set([...seen].filter((v) => v.startsWith('1 '))).size).toBeGreaterThanOrEqual(2);
    // A load changed between frames (the mats' pressure) is read again, not taken from the plan.
    const sound = at(12);
    const heavier = { ...sound, permit: { ...sound.permit, loads: [sound.permit.loads[0], { ...sound.permit.loads[1], pressure: 40 }] } };
    vi.resetModules();
    const fresh = await import('./check');
    expect(shown((i) => frame(i.permit.loads, i.now), heavier)).toEqual(shown(fresh.cumulativeCheck, heavier));
  }, 60_000);

  it('leaves frozen engine answers as they are (the server keeps and shares them) and gives the same check', () => {
    // The server memoises the engine's calls and hands the same frozen answer to every check
    // (server/src/services/permits/check.ts). A group answer that is not monotonic adds a warning:
    // it goes on the check's copy, never on the shared answer (a change would throw here).
    const engine = {
      runCheck: (...a: Parameters<typeof runCheck>) => frozen(runCheck(...a)),
      groupStandoff: (...a: Parameters<typeof groupStandoff>) => frozen({ ...groupStandoff(...a), monotonic: false }),
    };
    const first = cumulativeCheck({ ...at(9), engine });
    const again = cumulativeCheck({ ...at(9), engine });
    const flagged = (c: PermitCheck) => c.warnings.filter((w) => w.includes(NOT_MONOTONIC_WARNING));
    expect(flagged(first)).toHaveLength(1);
    // Checked again from the same kept answers: one warning still, not one more a check.
    expect(again).toEqual(first);
    expect(flagged(again)).toHaveLength(1);
  });

  it('refuses a figure after the same load was checked with a sound one (nothing valid is kept for it)', () => {
    const sound = at(12);
    expect(() => cumulativeCheck({ ...sound, standoffs: false })).not.toThrow();
    const mats = (pressure: number) => ({
      ...sound,
      permit: { ...sound.permit, loads: [sound.permit.loads[0], { ...sound.permit.loads[1], pressure }] },
    });
    for (const pressure of [NaN, Infinity, -0, 0]) {
      expect(() => cumulativeCheck({ ...mats(pressure), standoffs: false }), `pressure ${pressure}`).toThrow(CheckInputError);
    }
    const wet = { ...base.excavation, groundwaterDepth: NaN };
    expect(() => cumulativeCheck({ ...sound, excavations: [{ ...pit(1, 'PIT-A', 0), excavation: wet }], standoffs: false })).toThrow(
      /PIT-A excavation\.groundwaterDepth/,
    );
  });

  it('refuses a changed field of a load the same plan found sound a frame before, and checks the sound load again after', () => {
    // A drag's frames read only the fields that changed since the last frame (shared/schemas/fieldwise.ts).
    const { permit: planPermit, now, ...basis } = at(12);
    const { loads, ...permitBasis } = planPermit;
    const frame = planCheck({ ...basis, permit: permitBasis, standoffs: false });
    const sound = frame(loads, now).verdict;
    const [machine, mats] = loads as [Extract<PlacedLoad, { kind: 'plant' }>, Extract<PlacedLoad, { kind: 'area' }>];
    const wrong: [string, Record<string, unknown>][] = [
      ['loads[0].rotation', { ...machine, rotation: 400 }],
      ['loads[0].rotation', { ...machine, rotation: NaN }],
      ['loads[0].position', { ...machine, position: [machine.position[0], 95] }],
      ['loads[0].position', { ...machine, position: [NaN, machine.position[1]] }],
      ['loads[0].plantItemId', { ...machine, plantItemId: -7 }],
      ['loads[0].label', { ...machine, label: 'x'.repeat(81) }],
      ['loads[1].pressure', { ...mats, pressure: 0 }],
      ['loads[1].outline', { ...mats, outline: { type: 'Polygon', coordinates: [mats.outline.coordinates[0].slice(0, 2)] } }],
    ];
    for (const [field, load] of wrong) {
      const changed = field.startsWith('loads[0]') ? [load, mats] : [machine, load];
      expect(() => frame(changed as PlacedLoad[], now), field).toThrow(CheckInputError);
      expect(() => frame(changed as PlacedLoad[], now), field).toThrow(new RegExp(`^${field.replace(/[[\].]/g, '\\$&')}[ [.]`));
      // A sound move of the same load after it is checked as before.
      expect(frame(loads, now).verdict).toBe(sound);
      const moved = { ...machine, position: proj.toWgs84([12.5, 2.5]) as [number, number] };
      expect(() => frame([moved, mats], now)).not.toThrow();
    }
    // A load found sound and then changed in place is read whole again, not against what it was.
    const turned = { ...machine };
    expect(frame([turned, mats], now).verdict).toBe(sound);
    turned.rotation = 400;
    expect(() => frame([{ ...turned, position: proj.toWgs84([12.4, 2.5]) as [number, number] }, mats], now)).toThrow(
      /^loads\[0\]\.rotation /,
    );
  });
});

describe('the standoff of loads that move together, when 3H is not a whole number of 5 cm steps', () => {
  it('tries the minimum clearance itself before answering it', () => {
    // H = 3.01 m: the 5 cm scan from 3H = 9.03 m lands on 0.63 m, then 0.60 m must be tested, not
    // assumed. The answer must pass and 1 cm closer fail (docs/calculation.md, "Standoff"; the search itself is
    // common practice, no published source).
    const deep = { ...base, method: 'elastic' as const, excavation: { ...base.excavation, depth: 3.01 } };
    for (const pressure of [20, 21.3, 22, 25]) {
      const pad = { id: 'p', kind: 'area' as const, pressure, width: 0.6, length: 3.35, offset: 1 };
      const s = groupStandoff(deep, [pad]).standoff;
      const engine = runCheck({ ...deep, loads: [pad] }).loads[0].standoff;
      expect(s).toBe(engine);
      if (s !== null) {
        expect(runCheck({ ...deep, loads: [{ ...pad, offset: s }] }, { standoffs: false }).passes).toBe(true);
        if (s > 0.6) expect(runCheck({ ...deep, loads: [{ ...pad, offset: s - 0.01 }] }, { standoffs: false }).passes).toBe(false);
      }
    }
  });
});

describe('a stored check read back (permit_revisions.check_result)', () => {
  it('fails loudly, naming the path, when a stored shape drifts; accepts the fields added later as absent', async () => {
    const { storedCheck } = await import('../schemas/permits');
    // What the database hands back: not yet trusted.
    const stored = (json: object) => json as Stored<PermitCheck>;
    const base = {
      checkedAt: '2026-01-05T08:00:00.000Z',
      method: 'dispersion-45',
      excavations: [],
      utilisation: null,
      passes: true,
      verdict: 'passes',
      computedStandoff: null,
      outsideInfluence: [],
      otherPermits: [],
      warnings: [],
      caution: 'x',
    };
    expect(storedCheck(null)).toBeNull();
    expect(storedCheck(stored(base))?.verdict).toBe('passes');
    expect(() => storedCheck(stored({ ...base, verdict: 'green' }))).toThrow(/verdict/);
    expect(() => storedCheck(stored({ ...base, excavations: [{ excavationId: 1 }] }))).toThrow(/excavations\.0\.reference/);
  });
});
