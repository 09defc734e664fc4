/**
 * The calculation engine's entry point: `runCheck(request)` answers the docs/calculation.md "Command line" contract
 * (profile, forces, moments, utilisation, each load's force, band and standoff, warnings).
 *
 * Units: m, kN, kPa, kN/m³, degrees; forces per metre run of support (kN/m), moments about formation
 * (kN·m/m). The request is assumed valid (see shared/schemas/calc.ts). Pure: no I/O.
 */
import { buildProfile, prepareCheck, utilisationOf, type CheckContext } from './check';
import { blanketEffect, isBlanket, loadEffect, loadWarnings } from './loads';
import { NO_STANDOFF_MESSAGE, standoffSolver, type StandoffAnswer } from './standoff';
import type { CheckRequest, CheckResult, LoadResult, OffsetBand, PlacedLoad, ProfilePoint } from './types';
import type { SurchargeEffect } from './surcharge';

export * from './types';
export { prepareCheck } from './check';
export { standoffSolver, loadBreakpoints, BREAK_EPSILON, type StandoffAnswer } from './standoff';

import { CAUTION } from '../caution';
export { CAUTION };

/** Start of the warning given when the 5 kPa/m minimum equivalent fluid pressure governs somewhere. */
export const MINIMUM_PRESSURE_WARNING = 'the minimum equivalent fluid pressure governs';
/** Words in the warning given when a load fails at some offset beyond one where it passes. */
export const NOT_MONOTONIC_WARNING = 'moving it farther away is not always safer';

/**
 * The warnings a signatory must not miss, from a result's list: where the 5 kPa/m minimum governs
 * and where moving a load farther away is not always safer. The permit's calculation sheet and the
 * printed permit show them apart from the rest.
 */
export function attentionWarnings(warnings: readonly string[]): string[] {
  return warnings.filter((w) => w.includes(MINIMUM_PRESSURE_WARNING) || w.includes(NOT_MONOTONIC_WARNING));
}

/** An offset in words: "1.23 m", "just under 1.50 m" beside a break point, or "1.234 m". */
function offsetWords(x: number): string {
  const cm = Math.round(x * 100) / 100;
  if (Math.abs(x - cm) < 1e-9) return `${cm.toFixed(2)} m`;
  if (Math.abs(x - cm) < 1e-5) return `just ${x < cm ? 'under' : 'over'} ${cm.toFixed(2)} m`;
  return `${x.toFixed(3)} m`;
}

/** Failing bands in words: "0.60 m to 0.85 m, 1.21 m to 1.23 m". */
export function bandsWords(bands: readonly OffsetBand[]): string {
  return bands.map((b) => (b.from === b.to ? offsetWords(b.from) : `${offsetWords(b.from)} to ${offsetWords(b.to)}`)).join(', ');
}

/** Whether a load fails somewhere beyond an offset where it passes (its bands are not one run from the minimum clearance). */
export function failsBeyondPassing(bands: readonly OffsetBand[], minimumClearance: number): boolean {
  const least = Math.ceil(minimumClearance * 100 - 1e-9) / 100;
  return bands.length > 1 || (bands.length === 1 && bands[0].from > least + 1e-9);
}

/** The warning for a load (or machine) whose failing offsets are not one band starting at the minimum clearance. */
export function notMonotonicWarning(name: string, answer: Pick<StandoffAnswer, 'failingBands'>): string {
  const bands = bandsWords(answer.failingBands);
  return (
    `${name}: ${NOT_MONOTONIC_WARNING}: it fails at ${bands} from the face but passes at some offsets closer to it ` +
    '(the load can move into a weaker layer or another part of the method); the standoff lies beyond the farthest failing offset'
  );
}

interface RunOptions {
  /** Solve each load's standoff (default true). */
  standoffs?: boolean;
}

const SCALE = [1, 10, 100, 1000, 10000, 1e5, 1e6, 1e7, 1e8, 1e9];

/** x rounded to `decimals` places, never −0. */
function round(x: number, decimals: number): number {
  const f = SCALE[decimals];
  const r = Math.round(x * f) / f;
  return r === 0 ? 0 : r;
}

/** Utilisation shown rounded up to 0.001 (after round-off noise), so a shown 1.000 always passes. */
function roundUtilisation(u: number): number {
  const r = Math.ceil(round(u, 9) * 1000) / 1000;
  return r === 0 ? 0 : r;
}

/** Solve the standoff of one placed load of a request (m, or null), with that request's blankets. */
export function solveStandoff(request: CheckRequest, load: PlacedLoad, ctx: CheckContext = prepareCheck(request)): number | null {
  const blankets = request.loads.filter(isBlanket).map((b) => blanketEffect(ctx.model, b.pressure));
  return standoffSolver(ctx, blankets).solve(load);
}

const compareIds = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

export function runCheck(request: CheckRequest, options: RunOptions = {}): CheckResult {
  return evaluate(request, options.standoffs !== false, true) as CheckResult;
}

/**
 * runCheck without the standoff search and without the rounded pressure profile: the verdict where
 * the loads stand, every other figure as runCheck gives it with `standoffs: false`. For the frames
 * of a drag on the placing map, which show the verdict and draw no profile.
 */
export function runVerdict(request: CheckRequest): VerdictResult {
  return evaluate(request, false, false) as VerdictResult;
}

/** A result of runVerdict: a CheckResult without its profile, and without standoffs. */
type VerdictResult = Omit<CheckResult, 'profile'> & { profile?: undefined };

/** runCheck's work: `standoffs` runs the standoff search, `withProfile` rounds the profile into the result. */
function evaluate(
  request: CheckRequest,
  standoffs: boolean,
  withProfile: boolean,
): Omit<CheckResult, 'profile'> & { profile?: ProfilePoint[] } {
  const ctx = prepareCheck(request);
  const { model } = ctx;
  const opts = { method: request.method, restraint: request.excavation.restraint };
  // The effects are summed (forces, moments, the profile, the standoff search's blankets) in one
  // order whatever order the loads came in: by id (each id once, requestLoadsSchema), then place.
  // Floating-point sums in another order can differ in the last bit, and a rounded figure with them.
  const order = request.loads.map((_, i) => i).sort((a, b) => compareIds(request.loads[a].id, request.loads[b].id) || a - b);
  const canonical = order.map((i) => request.loads[i]);
  const effects = canonical.map((l) => loadEffect(model, opts, l));
  /** Each load's effect by its place in the request. */
  const effectOf: SurchargeEffect[] = [];
  order.forEach((i, k) => (effectOf[i] = effects[k]));
  let Fs = 0;
  let Ms = 0;
  for (const e of effects) {
    Fs += e.force;
    Ms += e.moment;
  }
  const raw = buildProfile(ctx, effects);
  const u = utilisationOf(ctx, Fs, Ms, raw.maxTotal);

  const warnings: string[] = [];
  const ex = request.excavation;
  if (u.governing === 'no-allowance') {
    warnings.push('the support has no surcharge allowance (designSurcharge = 0): any surcharge fails the check');
  }
  if (ex.pressureState === 'at-rest' && ex.wallFriction > 0) {
    warnings.push('wall friction is ignored in the at-rest state (K0 = 1 − sin φ′)');
  }
  if (model.minimumGoverns) {
    warnings.push(
      `${MINIMUM_PRESSURE_WARNING} (soil + water ≥ 5 kPa/m × depth in a cohesive layer): the soil pressure is raised to it where the strength would give less`,
    );
  }
  if (model.layers.some((l) => !l.drained) && ex.wallFriction > 0) {
    warnings.push('wall friction does not apply to undrained layers (K = 1 for surcharges)');
  }
  for (const l of request.loads) {
    warnings.push(...loadWarnings(model, opts, l));
    if (!isBlanket(l) && l.offset < request.minimumClearance) {
      warnings.push(`load ${l.id}: ${l.offset} m from the face is closer than the minimum clearance of ${request.minimumClearance} m`);
    }
  }

  const solver = standoffs
    ? standoffSolver(
        ctx,
        effects.filter((_, k) => isBlanket(canonical[k])),
      )
    : null;
  const loads: LoadResult[] = request.loads.map((l, i) => {
    const e = effectOf[i];
    let standoff: number | null = null;
    let failingBands: LoadResult['failingBands'] = [];
    if (solver && !isBlanket(l)) {
      const answer = solver.search(l);
      standoff = answer.standoff;
      failingBands = answer.failingBands;
      if (standoff === null) warnings.push(`load ${l.id}: ${NO_STANDOFF_MESSAGE}`);
      if (!answer.monotonic) warnings.push(notMonotonicWarning(`load ${l.id}`, answer));
    }
    return {
      id: l.id,
      kind: l.kind,
      force: round(e.force, 3),
      moment: round(e.moment, 3),
      top: e.top === null ? null : round(e.top, 4),
      bottom: e.bottom === null ? null : round(e.bottom, 4),
      standoff,
      failingBands,
    };
  });

  const qd = ex.designSurcharge;
  return {
    method: request.method,
    coefficients: model.layers.map((l) => ({ top: l.top, K: round(l.K, 4) })),
    ...(withProfile && {
      profile: ctx.grid.map((z, k): ProfilePoint => {
        const total = ctx.gridSoil[k] + ctx.gridWater[k] + raw.surcharge[k];
        return {
          z,
          soil: round(ctx.gridSoil[k], 3),
          water: round(ctx.gridWater[k], 3),
          surcharge: round(raw.surcharge[k], 3),
          total: round(total, 3),
          allowance: round(ctx.gridAllowance[k], 3),
        };
      }),
    }),
    forces: {
      soil: round(model.soilForce, 3),
      water: round(model.waterForce, 3),
      surcharge: round(Fs, 3),
      allowance: round(qd * model.kForce, 3),
    },
    moments: { surcharge: round(Ms, 3), allowance: round(qd * model.kMoment, 3) },
    loads,
    utilisation: u.utilisation === null ? null : roundUtilisation(u.utilisation),
    governing: u.governing,
    maxTotalPressure: round(raw.maxTotal, 3),
    passes: u.passes,
    warnings,
    caution: CAUTION,
  };
}
