/**
 * Properties of the check that must hold for any valid request (docs/calculation.md), tried on
 * random requests with fast-check. Tolerances are round-off or the stated accuracy (0.5 %).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { prepareCheck } from './check';
import { BREAK_EPSILON, loadBreakpoints, NOT_MONOTONIC_WARNING, runCheck, runVerdict } from './index';
import { loadEffect } from './loads';
import { layerIndexAt } from './soil';
import { midpoint } from './test-fixtures';
import type { CheckRequest, Load, Method, PlacedLoad, SoilLayer } from './types';

const cm = (lo: number, hi: number) => fc.integer({ min: Math.round(lo * 100), max: Math.round(hi * 100) }).map((x) => x / 100);

const drainedLayer = fc.record({
  unitWeight: cm(16, 21),
  frictionAngle: fc.integer({ min: 20, max: 40 }),
  cohesion: cm(0, 8),
});
const anyLayer = fc.oneof(drainedLayer, fc.record({ unitWeight: cm(16, 21), undrainedShearStrength: cm(5, 60) }));

function soilOf(layers: Omit<SoilLayer, 'top'>[], tops: number[]): SoilLayer[] {
  const cuts = [0, ...[...new Set(tops)].sort((a, b) => a - b)];
  return layers.slice(0, cuts.length).map((l, i) => ({ ...l, top: cuts[i] }));
}

const placedLoad = (H: number, maxOffset = 2 * H): fc.Arbitrary<PlacedLoad> =>
  fc
    .oneof(
      fc.record({ kind: fc.constant('strip' as const), pressure: cm(5, 150), width: cm(0.2, 3), offset: cm(0, maxOffset) }),
      fc.record({ kind: fc.constant('line' as const), force: cm(5, 80), offset: cm(0, maxOffset) }),
      fc.record({
        kind: fc.constant('area' as const),
        pressure: cm(5, 150),
        width: cm(0.2, 3),
        length: cm(0.3, 6),
        offset: cm(0, maxOffset),
      }),
      fc.record({
        kind: fc.constant('point' as const),
        force: cm(5, 300),
        offset: cm(0, maxOffset),
        padWidth: cm(0.2, 1),
        padLength: cm(0.2, 1),
      }),
    )
    .map((l) => ({ ...l, id: '' }) as PlacedLoad);

const requestArb = (opts: { layers?: boolean; method?: Method; rated?: boolean } = {}) =>
  cm(1, 5).chain((H) =>
    fc
      .record({
        layers: fc.array(opts.layers === false ? drainedLayer : anyLayer, { minLength: 1, maxLength: opts.layers === false ? 1 : 3 }),
        tops: fc.array(cm(0.1, 6), { maxLength: 2 }),
        zw: fc.option(cm(0, 6), { nil: null }),
        qd: cm(5, 20),
        rated: opts.rated ? fc.option(cm(20, 150), { nil: null }) : fc.constant(null),
        method: opts.method ? fc.constant(opts.method) : fc.constantFrom<Method>('dispersion-45', 'elastic'),
        restraint: fc.constantFrom('unyielding' as const, 'yielding' as const),
        placed: fc.array(placedLoad(H), { minLength: 1, maxLength: 5 }),
        blanket: fc.option(cm(1, 10), { nil: null }),
      })
      .map(({ layers, tops, zw, qd, rated, method, restraint, placed, blanket }): CheckRequest => {
        const loads: Load[] = placed.map((l, i) => ({ ...l, id: `L${i}` }));
        if (blanket !== null) loads.push({ id: 'B', kind: 'blanket', pressure: blanket });
        return {
          excavation: {
            depth: H,
            groundwaterDepth: zw,
            designSurcharge: qd,
            ratedPressure: rated,
            pressureState: 'active',
            wallFriction: 0,
            restraint,
          },
          soil: soilOf(layers, tops),
          method,
          minimumClearance: 0.6,
          step: 0.05,
          loads,
        };
      }),
  );

function shuffled<T>(xs: T[], seed: number): T[] {
  const out = [...xs];
  let s = seed;
  for (let i = out.length - 1; i > 0; i--) {
    s = (s * 1103515245 + 12345) % 2147483648;
    const j = s % (i + 1);
    [out[i], out[j]] = [out[j], out[i]];
  }
  return out;
}

describe('properties of the check', () => {
  it('moving a load away never raises the utilisation under dispersion-45 (one soil, no rated pressure)', () => {
    fc.assert(
      fc.property(requestArb({ layers: false, method: 'dispersion-45' }), cm(0, 3), (req, shift) => {
        const load = req.loads[0] as PlacedLoad;
        const near = runCheck({ ...req, loads: [load] }, { standoffs: false });
        const far = runCheck({ ...req, loads: [{ ...load, offset: load.offset + shift }] }, { standoffs: false });
        expect(far.utilisation as number).toBeLessThanOrEqual(near.utilisation as number);
      }),
      { numRuns: 300 },
    );
  });

  it('the standoff passes at every 0.01 m from it to 3H and either side of every break point, and fails just inside it unless the minimum clearance governs (docs/calculation.md, "Standoff")', () => {
    fc.assert(
      fc.property(requestArb({ rated: true }), (req) => {
        const ctx = prepareCheck(req);
        const model = ctx.model;
        const H = req.excavation.depth;
        const load = req.loads[0] as PlacedLoad;
        const blankets = req.loads.filter((l) => l.kind === 'blanket');
        const s = runCheck({ ...req, loads: [load, ...blankets] }).loads[0].standoff;
        // The full check, independent of the solver's shortcuts, as the oracle.
        const passes = (d: number) => runCheck({ ...req, loads: [{ ...load, offset: d }, ...blankets] }, { standoffs: false }).passes;
        const top = Math.floor(3 * H * 100 + 1e-9);
        if (s === null) {
          expect(passes(top / 100)).toBe(false);
          return;
        }
        const from = Math.round(s * 100);
        for (let cm = from; cm <= top; cm++) expect(passes(cm / 100), `${cm / 100} m`).toBe(true);
        for (const b of loadBreakpoints(model, load, req.method)) {
          for (const d of [b - BREAK_EPSILON, b, b + BREAK_EPSILON])
            if (d >= s && d <= top / 100) expect(passes(d), `break point ${d} m`).toBe(true);
        }
        if (from > Math.ceil(req.minimumClearance * 100 - 1e-9)) {
          // Something in [s − 0.01, s) fails: the centimetre itself or a break point just inside.
          const inside = [
            (from - 1) / 100,
            ...loadBreakpoints(model, load, req.method).flatMap((b) => [b - BREAK_EPSILON, b + BREAK_EPSILON]),
          ].filter((d) => d >= (from - 1) / 100 && d < s);
          expect(inside.some((d) => !passes(d))).toBe(true);
        } else {
          expect(s).toBe(Math.ceil(req.minimumClearance * 100 - 1e-9) / 100);
        }
      }),
      { numRuns: 50 },
    );
  }, 120_000);

  it('failing bands cover exactly the failing centimetres, and a band beyond a passing offset is warned about', () => {
    fc.assert(
      fc.property(requestArb({ rated: true }), (req) => {
        const load = req.loads[0] as PlacedLoad;
        const r = runCheck({ ...req, loads: [load] });
        const bands = r.loads[0].failingBands;
        const passes = (d: number) => runCheck({ ...req, loads: [{ ...load, offset: d }] }, { standoffs: false }).passes;
        const least = Math.ceil(req.minimumClearance * 100 - 1e-9);
        const top = Math.floor(3 * req.excavation.depth * 100 + 1e-9);
        for (let cm = least; cm <= top; cm++) {
          const inBand = bands.some((b) => b.from <= cm / 100 + 1e-9 && cm / 100 <= b.to + 1e-9);
          expect(inBand, `${cm / 100} m`).toBe(!passes(cm / 100));
        }
        const nonMonotonic = bands.length > 1 || (bands.length === 1 && passes(least / 100));
        expect(r.warnings.some((w) => w.includes(NOT_MONOTONIC_WARNING))).toBe(nonMonotonic);
      }),
      { numRuns: 40 },
    );
  }, 120_000);

  it('forces and moments of separate loads add up to the combined ones (superposition)', () => {
    fc.assert(
      fc.property(requestArb(), (req) => {
        const all = runCheck(req, { standoffs: false });
        let F = 0;
        let M = 0;
        for (const l of req.loads) {
          const one = runCheck({ ...req, loads: [l] }, { standoffs: false });
          F += one.forces.surcharge;
          M += one.moments.surcharge;
        }
        expect(Math.abs(all.forces.surcharge - F)).toBeLessThanOrEqual(0.0006 * req.loads.length);
        expect(Math.abs(all.moments.surcharge - M)).toBeLessThanOrEqual(0.0006 * req.loads.length);
      }),
      { numRuns: 200 },
    );
  });

  it("the profile's surcharge integrates to forces.surcharge (trapezium on a 0.005 m step, bounded by its jumps)", () => {
    fc.assert(
      fc.property(requestArb(), (req) => {
        const r = runCheck({ ...req, step: 0.005 }, { standoffs: false });
        let integral = 0;
        let variation = 0;
        for (let k = 1; k < r.profile.length; k++) {
          const a = r.profile[k - 1];
          const b = r.profile[k];
          integral += ((a.surcharge + b.surcharge) / 2) * (b.z - a.z);
          variation += Math.abs(b.surcharge - a.surcharge);
        }
        const tol = (0.005 * variation) / 2 + 0.001 * r.forces.surcharge + 0.002 * req.excavation.depth;
        expect(Math.abs(integral - r.forces.surcharge)).toBeLessThanOrEqual(tol);
      }),
      { numRuns: 200 },
    );
  });

  it('each force is within 0.5 % of a fine numerical integral of its own pressure', () => {
    fc.assert(
      fc.property(requestArb(), (req) => {
        const ctx = prepareCheck(req);
        const H = req.excavation.depth;
        for (const l of req.loads) {
          const e = loadEffect(ctx.model, { method: req.method, restraint: req.excavation.restraint }, l);
          let pmax = 0;
          const p = (z: number) => {
            const v = e.pressureAt(z, layerIndexAt(ctx.model, z));
            pmax = Math.max(pmax, v);
            return v;
          };
          const panels = 20000;
          const fine = midpoint(p, 0, H, panels);
          const fineM = midpoint((z) => p(z) * (H - z), 0, H, panels);
          // The midpoint rule itself errs by up to one panel times the pressure at each band edge.
          const own = 2 * (H / panels) * pmax;
          expect(Math.abs(e.force - fine)).toBeLessThanOrEqual(0.005 * fine + own);
          expect(Math.abs(e.moment - fineM)).toBeLessThanOrEqual(0.005 * fineM + own * H);
        }
      }),
      { numRuns: 100 },
    );
  });

  it('results do not depend on the order of the loads or of the layers', () => {
    fc.assert(
      fc.property(requestArb({ rated: true }), fc.integer({ min: 1, max: 1e6 }), (req, seed) => {
        const a = runCheck(req);
        const b = runCheck({ ...req, loads: shuffled(req.loads, seed), soil: shuffled(req.soil, seed + 1) });
        expect(b.forces).toEqual(a.forces);
        expect(b.moments).toEqual(a.moments);
        expect(b.utilisation).toEqual(a.utilisation);
        expect(b.passes).toEqual(a.passes);
        expect(b.profile).toEqual(a.profile);
        const byId = (r: typeof a) => Object.fromEntries(r.loads.map((l) => [l.id, l]));
        expect(byId(b)).toEqual(byId(a));
      }),
      { numRuns: 60 },
    );
  });

  it("runVerdict gives runCheck's answer without the standoff search, less the profile and nothing else", () => {
    fc.assert(
      fc.property(requestArb({ rated: true }), (req) => {
        const { profile, ...rest } = runCheck(req, { standoffs: false });
        expect(profile.length).toBeGreaterThan(1);
        expect(runVerdict(req)).toStrictEqual(rest);
      }),
      { numRuns: 100 },
    );
  });
});
