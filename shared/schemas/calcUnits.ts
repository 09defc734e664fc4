/**
 * `"units": "us"` for the calculation request and result (docs/calculation.md, "Command line"): the
 * request's figures are read in US customary units and converted to SI before validation; the result
 * is converted back. The engine never sees anything but SI. Factors: shared/units.ts (NIST SP 811).
 *
 * US units: lengths, depths and offsets in ft; pressures and strengths in psf; unit weights in pcf;
 * line loads and forces on the support per foot run in lbf/ft; point loads in kip; moments in lbf·ft/ft.
 */
import { cautionFor } from '../caution';
import type { CheckResult, OffsetBand } from '../engineering/types';
import { FOOT, fromSystem, inSystem, localizeWords, roundTo, unitSystems, type Quantity, type UnitSystem } from '../units';

/** OSHA's 2 ft (29 CFR 1926.651(j)(2)) in metres: the default minimum clearance in US units. */
const OSHA_CLEARANCE = 2 * FOOT;
/** The default minimum clearance of each system (m). */
export const DEFAULT_CLEARANCE: Record<UnitSystem, number> = { metric: 0.6, us: OSHA_CLEARANCE };
/** The default profile step of a US request: 0.2 ft (0.061 m), near the metric 0.05 m. */
const US_STEP_FT = 0.2;

type Json = Record<string, unknown>;
const isObject = (v: unknown): v is Json => typeof v === 'object' && v !== null && !Array.isArray(v);

const EXCAVATION: Record<string, Quantity> = {
  depth: 'length',
  groundwaterDepth: 'length',
  designSurcharge: 'pressure',
  ratedPressure: 'pressure',
};
const LAYER: Record<string, Quantity> = {
  top: 'length',
  unitWeight: 'unitWeight',
  saturatedUnitWeight: 'unitWeight',
  cohesion: 'pressure',
  undrainedShearStrength: 'pressure',
};
const LOAD: Record<string, Quantity> = {
  pressure: 'pressure',
  width: 'length',
  length: 'length',
  offset: 'length',
  padWidth: 'length',
  padLength: 'length',
};

/** A copy of `o` with each numeric field named in `fields` converted from US units to SI; anything else left for the schema to judge. */
function convertFields(o: unknown, fields: Record<string, Quantity>): unknown {
  if (!isObject(o)) return o;
  const out: Json = { ...o };
  for (const [key, q] of Object.entries(fields)) {
    const v = out[key];
    if (typeof v === 'number' && Number.isFinite(v)) out[key] = fromSystem(q, v, 'us');
  }
  return out;
}

type UnitsChoice = { ok: true; units: UnitSystem; request: unknown } | { ok: false; error: string };

/**
 * Takes `units` off a request (`metric` when absent) and, for `us`, converts its figures to SI and fills
 * the US defaults (minimum clearance 2 ft, step 0.2 ft). `prefix` names the request in a list (`[2]`).
 */
export function requestInSI(input: unknown, prefix = ''): UnitsChoice {
  if (!isObject(input) || !('units' in input)) return { ok: true, units: 'metric', request: input };
  const { units, ...rest } = input;
  if (!unitSystems.includes(units as UnitSystem)) {
    return {
      ok: false,
      error: `${prefix ? `${prefix}.` : ''}units: must be one of ${unitSystems.join(', ')} (got ${JSON.stringify(units)})`,
    };
  }
  if (units === 'metric') return { ok: true, units, request: rest };
  const req: Json = { ...rest };
  req.excavation = convertFields(req.excavation, EXCAVATION);
  if (Array.isArray(req.soil)) req.soil = req.soil.map((l) => convertFields(l, LAYER));
  if (Array.isArray(req.loads)) {
    req.loads = req.loads.map((l) =>
      convertFields(l, { ...LOAD, ...(isObject(l) && l.kind === 'point' ? { force: 'force' } : { force: 'lineForce' }) }),
    );
  }
  for (const key of ['minimumClearance', 'step'] as const) {
    const v = req[key];
    if (typeof v === 'number' && Number.isFinite(v)) req[key] = fromSystem('length', v, 'us');
  }
  req.minimumClearance ??= OSHA_CLEARANCE;
  req.step ??= fromSystem('length', US_STEP_FT, 'us');
  return { ok: true, units: 'us', request: req };
}

const at = (q: Quantity, si: number, places: number) => Number(inSystem(q, si, 'us').toFixed(places)) || 0;
const ftUp = (m: number) => roundTo(m / FOOT, 0.01, 'up');
const ftDown = (m: number) => Math.floor(m / FOOT / 0.01 + 1e-9) / 100;

/**
 * The result in US units. Standoffs are rounded up to 0.01 ft and failing bands widened to whole
 * hundredths of a foot, so a figure in feet never allows a load nearer than the SI result does.
 * Warnings and the caution read in US units (`localizeWords`).
 */
export function resultInUs(r: CheckResult): CheckResult & { units: 'us' } {
  const len = (m: number) => at('length', m, 4);
  const band = (b: OffsetBand): OffsetBand => ({ from: ftDown(b.from), to: ftUp(b.to) });
  return {
    units: 'us',
    ...r,
    coefficients: r.coefficients.map((c) => ({ ...c, top: len(c.top) })),
    profile: r.profile.map((p) => ({
      z: len(p.z),
      soil: at('pressure', p.soil, 2),
      water: at('pressure', p.water, 2),
      surcharge: at('pressure', p.surcharge, 2),
      total: at('pressure', p.total, 2),
      allowance: at('pressure', p.allowance, 2),
    })),
    forces: {
      soil: at('lineForce', r.forces.soil, 1),
      water: at('lineForce', r.forces.water, 1),
      surcharge: at('lineForce', r.forces.surcharge, 1),
      allowance: at('lineForce', r.forces.allowance, 1),
    },
    moments: { surcharge: at('moment', r.moments.surcharge, 1), allowance: at('moment', r.moments.allowance, 1) },
    loads: r.loads.map((l) => ({
      ...l,
      force: at('lineForce', l.force, 1),
      moment: at('moment', l.moment, 1),
      top: l.top === null ? null : len(l.top),
      bottom: l.bottom === null ? null : len(l.bottom),
      standoff: l.standoff === null ? null : ftUp(l.standoff),
      failingBands: l.failingBands.map(band),
    })),
    maxTotalPressure: at('pressure', r.maxTotalPressure, 2),
    warnings: r.warnings.map((w) => localizeWords(w, 'us')),
    caution: cautionFor('us'),
  };
}
