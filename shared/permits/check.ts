/**
 * The cumulative check of a permit, pure so the server (authoritative) and the browser (live, while
 * a load is dragged) run the same code: placed loads become bearing footprints, each footprint is
 * measured against each named excavation (shared/geometry) and becomes an engine load, and the
 * engine (shared/engineering `runCheck`) checks, per excavation, this permit's loads together with
 * those of every other approved, live or suspended permit on that excavation whose window overlaps.
 *
 * Every input is checked first with the shared schemas (the permit's placed loads as the API does,
 * each engine request as `npm run calc` does): bad figures throw CheckInputError naming the field.
 *
 * Units: m, kN, kPa, kN/m; positions WGS84 [longitude, latitude]; rotations degrees clockwise from north.
 */
import { z } from 'zod';
import { calcRequestSchema, engineLoadSchema, formatPath, requestLoadsSchema } from '../schemas/calc';
import { passesLike } from '../schemas/fieldwise';
import { contentKey, frozen, Kept } from '../kept';
import {
  CAUTION,
  notMonotonicWarning,
  prepareCheck,
  runCheck,
  runVerdict,
  standoffSolver,
  type CheckRequest,
  type Excavation,
  type Load,
  type Method,
  type SoilLayer,
  type StandoffAnswer,
} from '../engineering';
import {
  footprintPlacement,
  GeometryError,
  localProjection,
  prepareExcavation,
  prepareRing,
  type ExcavationShape,
  type LocalProjection,
  type PreparedOutline,
  type XY,
} from '../geometry';
import { distanceToRing, pointInRing, pointSegment, segmentsMeet } from '../geometry/planar';
import { elementLoad, stockpilePressure, type PlantElement } from '../schemas/plant';
import { calcExcavationOf, type Excavation as RegisterExcavation } from '../schemas/excavations';
import type { LineString, Polygon } from 'geojson';
import {
  loadName,
  placedLoadSchema,
  verdictOf,
  type CheckedLoad,
  type CountedPermit,
  type ExcavationCheck,
  type LngLat,
  type PermitCheck,
  type OtherPermit,
  type PlacedLoad,
} from '../schemas/permits';

/** The plan shape of a register excavation: a trench's centre line with its width, or a pit's outline. */
export function excavationShapeOf(e: Pick<RegisterExcavation, 'kind' | 'width'> & { geometry: LineString | Polygon }): ExcavationShape {
  const g = e.geometry;
  if (e.kind === 'trench' && g.type === 'LineString') return { kind: 'trench', centreLine: g, width: e.width ?? 0 };
  if (e.kind === 'pit' && g.type === 'Polygon') return { kind: 'pit', outline: g };
  throw new Error(`A ${e.kind} drawn as a ${g.type}: a trench is a centre line (LineString), a pit an outline (Polygon)`);
}

/** An excavation of the register as the check needs it: its plan shape and its engine inputs. */
export function checkExcavationOf(
  e: Pick<RegisterExcavation, 'id' | 'reference' | 'name' | 'kind' | 'geometry' | 'width' | 'soil'> &
    CalcFields & { outline?: Polygon | null },
): CheckExcavation {
  return {
    id: e.id,
    reference: e.reference,
    name: e.name,
    shape: excavationShapeOf(e),
    excavation: calcExcavationOf(e),
    soil: e.soil as SoilLayer[],
    groundOutline: e.outline ?? null,
  };
}
type CalcFields = Parameters<typeof calcExcavationOf>[0];

/** An excavation as the check needs it: its plan shape and its engine inputs. */
export interface CheckExcavation {
  id: number;
  reference: string;
  name: string;
  shape: ExcavationShape;
  excavation: Excavation;
  soil: SoilLayer[];
  /**
   * The ground outline as stored when the excavation was written (WGS84; null or absent for rows
   * without one). Used only to pass over a nearby excavation that no footprint comes near (a box
   * test with a margin); every figure is measured against the outline drawn from `shape`.
   */
  groundOutline?: Polygon | null;
}

export interface PlantForCheck {
  id: number;
  name: string;
  operatingMass: number;
  designFactor: number;
  elements: PlantElement[];
}

export type { OtherPermit };

export interface CheckInput {
  /** The site origin, for site-local metres. */
  origin: LngLat;
  method: Method;
  minimumClearance: number;
  permit: { id: number | null; number: string; windowStart: string; windowEnd: string; loads: PlacedLoad[] };
  excavations: CheckExcavation[];
  /**
   * The site's other open excavations, not named on the permit. One that a load of this permit
   * touches, or stands within the influence zone of (closer than its depth), is checked too, with
   * a warning to name it: a load does not stop pressing on a support because nobody named it.
   */
  nearby?: CheckExcavation[];
  plant: Map<number, PlantForCheck>;
  /** Candidates; only those on the same excavation with an overlapping window are counted. */
  others: OtherPermit[];
  /**
   * The machines of other permits frozen when each was sent for review (by permit id); a permit
   * without one uses `plant`.
   */
  otherPlant?: Map<number, Map<number, PlantForCheck>>;
  now: Date;
  /** The engine's calls (default: shared/engineering as is); the server passes memoised ones (pure functions of their arguments). */
  engine?: CheckEngine;
  /**
   * false: the verdict at the loads' positions only, without the standoff search (every standoff
   * null, no failing bands) and without the pressure profiles (the engine's runVerdict; `engine` is
   * not called). The placing map uses it for each frame of a drag and runs the full check when the
   * load is let go; a stored or shown-as-final check never uses it.
   */
  standoffs?: false;
}

/** The two engine calls the check makes; both pure, so a caller may memoise them, and their answers may be frozen and shared: never changed in place. */
export interface CheckEngine {
  runCheck: typeof runCheck;
  groupStandoff: typeof groupStandoff;
}

/** One bearing footprint of a placed load: a plant element, or the drawn shape of an ad hoc load. */
interface Footprint {
  loadId: string;
  label: string;
  element: string;
  kind: 'area' | 'strip' | 'line';
  /** Site-local metres: a closed outline (area, strip) or a path (line). */
  local: XY[];
  /** kPa for area and strip, kN/m for line. */
  intensity: number;
}

/** A load that cannot be checked where it is: it touches or overlaps an excavation. */
interface Refusal {
  loadId: string;
  index: number;
  excavationId: number;
  reference: string;
  message: string;
}

/**
 * Figures the check cannot run on (a load's or an excavation's): refused with the same shared schemas
 * as the API and `npm run calc`, naming the field (`loads[0].unitWeight`, or an excavation's reference
 * and its field), never analysed into a verdict.
 */
export class CheckInputError extends Error {
  constructor(
    /** The field: `loads[i].<name>` for a load of the permit, `<reference> <path>` for an excavation. */
    readonly field: string,
    readonly reason: string,
  ) {
    super(`${field} ${reason}`);
  }
}

const placedLoadsSchema = z.array(placedLoadSchema);
/**
 * Loads found valid, by content: a frame of a drag moves one load, so only that one is read again.
 * Validity alone is kept (the check reads the loads as given), and a list is valid exactly when each
 * of its loads is.
 */
const validLoads = new Kept<true>(500);

/** A load found valid, by its id, with its content key then: what the next run's load of that id is read against. */
type LikeLoads = Map<string, { key: string; load: PlacedLoad }>;

/**
 * Throws CheckInputError for the first wrong field of the permit's loads (placedLoadSchema, as the API).
 * `known` holds the content keys of loads already found valid (the plan's loads of the last run); a
 * load changed since is read field by field (passesLike) against the last one of its id found valid,
 * when that one still has the content it was found valid with (nothing changed it in place); else whole.
 */
function validateLoads(loads: unknown[], keys: string[], known: Map<string, unknown>, like: LikeLoads): void {
  let valid = true;
  for (let i = 0; i < loads.length && valid; i++) {
    if (known.has(keys[i]) || validLoads.get(keys[i])) continue;
    const id = (loads[i] as { id?: unknown } | null)?.id;
    const before = typeof id === 'string' ? like.get(id) : undefined;
    const sound = before && contentKey(before.load) === before.key ? before.load : undefined;
    valid = (sound && passesLike(placedLoadSchema, loads[i], sound)) ?? placedLoadSchema.safeParse(loads[i]).success;
    if (valid) validLoads.set(keys[i], true);
  }
  if (valid) return;
  const r = placedLoadsSchema.safeParse(loads);
  if (!r.success) {
    const issue = r.error.issues[0];
    throw new CheckInputError(formatPath(['loads', ...issue.path]), issue.message);
  }
}

/** What `validateLoads` reads the next run's loads against: these loads, all found valid, with their content keys. */
function likeLoads(loads: PlacedLoad[], keys: string[]): LikeLoads {
  return new Map(loads.map((load, i) => [load.id, { key: keys[i], load }]));
}

/**
 * The fixed part of engine requests found valid (the excavation, its soil, the method, the clearance,
 * the step), read by calcRequestSchema with no loads and kept by content, frozen: a frame of a drag
 * changes only the loads. calcRequestSchema's rules on that part do not read the loads, nor the loads'
 * rules that part, so a request is valid exactly when its fixed part and its loads are.
 */
const validFixed = new Kept<Omit<CheckRequest, 'loads'>>(200);

/** The fixed part read by calcRequestSchema (defaults filled in), or undefined when it is wrong. */
function validFixedPart(fixed: Omit<CheckRequest, 'loads'>): Omit<CheckRequest, 'loads'> | undefined {
  const key = contentKey(fixed);
  let valid = validFixed.get(key);
  if (!valid) {
    const r = calcRequestSchema.safeParse({ ...fixed, loads: [] });
    if (r.success) {
      const { loads: _none, ...rest } = r.data;
      void _none;
      valid = frozen(rest);
      validFixed.set(key, valid);
    }
  }
  return valid;
}

/**
 * Engine loads found valid by requestLoadsSchema, each alone: frozen objects (a plan's measured
 * loads), so what was found valid cannot change. A list of them is valid when its ids differ.
 */
const checkedLoads = new WeakSet<Load>();
/** The last engine load found valid of each kind (frozen). */
const likeEngineLoad = new Map<Load['kind'], Load>();

/** The engine loads read by requestLoadsSchema, or null when they are wrong. */
function validEngineLoads(loads: Load[]): Load[] | null {
  // Each load found valid alone (a frame of a drag brings only the moved load's), and no id twice.
  const ids = new Set<string>();
  let known = true;
  for (const l of loads) {
    if (!checkedLoads.has(l)) {
      // A new load is read field by field against the last valid one of its kind (passesLike), else whole.
      const like = likeEngineLoad.get(l.kind);
      if (!Object.isFrozen(l) || !((like && passesLike(engineLoadSchema, l, like)) ?? requestLoadsSchema.safeParse([l]).success)) {
        known = false;
        break;
      }
      checkedLoads.add(l);
      likeEngineLoad.set(l.kind, l);
    }
    if (ids.has(l.id)) {
      known = false;
      break;
    }
    ids.add(l.id);
  }
  if (known) return loads;
  const r = requestLoadsSchema.safeParse(loads);
  return r.success ? r.data : null;
}

/** The engine request checked with the calculation's own schema (calc.ts), defaults filled in. */
function validRequest(
  fixed: Omit<CheckRequest, 'loads'>,
  valid: Omit<CheckRequest, 'loads'> | undefined,
  loads: Load[],
  reference: string,
): CheckRequest {
  const checked = valid && validEngineLoads(loads);
  if (valid && checked) return { ...valid, loads: checked };
  // Something is wrong: the whole request read at once names its first wrong field, as `npm run calc` does.
  const r = calcRequestSchema.safeParse({ ...fixed, loads });
  if (r.success) return r.data;
  const issue = r.error.issues[0];
  throw new CheckInputError(`${reference} ${formatPath(issue.path)}`.trim(), issue.message);
}

export class PlacementError extends Error {
  constructor(readonly refusals: Refusal[]) {
    super(refusedMessage(refusals));
  }
}

/** Loads a plan's run refuses where they stand: what PlacementError carries, without making an Error. */
export interface Refused {
  refusals: Refusal[];
  /** PlacementError's message. */
  message: string;
}

const refusedMessage = (refusals: Refusal[]) => refusals.map((r) => r.message).join('; ');

/** Whether a plan's run refused the loads (Refused) rather than checking them: the one test of the two. */
export const isRefused = (outcome: PermitCheck | Refused): outcome is Refused => 'refusals' in outcome;

/** The corners of a plant element in site-local metres, the machine at `at` turned to bearing `rotation`. */
export function elementCorners(e: Pick<PlantElement, 'x' | 'y' | 'length' | 'width'>, at: XY, rotation: number): XY[] {
  const th = (rotation * Math.PI) / 180;
  const fwd: XY = [Math.sin(th), Math.cos(th)]; // machine x axis: east, north components
  const left: XY = [-Math.cos(th), Math.sin(th)]; // machine y axis (to the left of forward)
  const corners: [number, number][] = [
    [e.x - e.length / 2, e.y - e.width / 2],
    [e.x + e.length / 2, e.y - e.width / 2],
    [e.x + e.length / 2, e.y + e.width / 2],
    [e.x - e.length / 2, e.y + e.width / 2],
  ];
  return corners.map(([x, y]) => [at[0] + x * fwd[0] + y * left[0], at[1] + x * fwd[1] + y * left[1]]);
}

/**
 * The bearing footprints of a placed load. A plant item's elements each carry operating mass × g ×
 * share × design factor (kN) spread over their rectangle; a stockpile presses unit weight × height.
 */
export function footprintsOf(load: PlacedLoad, plant: Map<number, PlantForCheck>, proj: LocalProjection): Footprint[] {
  const label = loadName(load, (id) => plant.get(id)?.name);
  switch (load.kind) {
    case 'plant': {
      const item = plant.get(load.plantItemId);
      if (!item) throw new Error(`plant item ${load.plantItemId} is not in the library`);
      const at = proj.toLocal(load.position);
      return item.elements.map((e) => ({
        loadId: load.id,
        label,
        element: e.name,
        kind: 'area' as const,
        local: elementCorners(e, at, load.rotation),
        intensity: elementLoad(item, e).pressure,
      }));
    }
    case 'stockpile':
      return [
        {
          loadId: load.id,
          label,
          element: '',
          kind: 'area',
          local: ring(load.outline.coordinates[0], proj),
          intensity: stockpilePressure(load.unitWeight, load.height),
        },
      ];
    case 'area':
      return [
        { loadId: load.id, label, element: '', kind: 'area', local: ring(load.outline.coordinates[0], proj), intensity: load.pressure },
      ];
    case 'strip':
      return [
        { loadId: load.id, label, element: '', kind: 'strip', local: ring(load.outline.coordinates[0], proj), intensity: load.pressure },
      ];
    case 'line':
      return [
        {
          loadId: load.id,
          label,
          element: '',
          kind: 'line',
          local: load.path.coordinates.map((c) => proj.toLocal(c)),
          intensity: load.force,
        },
      ];
  }
}

function ring(coords: LngLat[], proj: LocalProjection): XY[] {
  return coords.slice(0, -1).map((c) => proj.toLocal(c));
}

const TOUCHES = (ref: string) =>
  `touches or overlaps excavation ${ref}: move it clear of the edge (loads are only checked clear of the edge)`;

/** Least distance (m) from a path to the outline; null when it meets, enters or touches it. */
function pathOffset(outline: PreparedOutline, path: XY[]): number | null {
  const r = outline.ring;
  let d = Infinity;
  for (let i = 0; i < path.length; i++) {
    if (pointInRing(path[i], r)) return null;
    d = Math.min(d, distanceToRing(path[i], r));
    if (i > 0) {
      for (let k = 0; k < r.length; k++) {
        if (segmentsMeet(path[i - 1], path[i], r[k], r[(k + 1) % r.length])) return null;
        d = Math.min(d, pointSegment(r[k], path[i - 1], path[i])[0]);
      }
    }
  }
  return d <= 1e-6 ? null : d;
}

/**
 * The engine load of a footprint beside an excavation; null when it touches or overlaps it (no Error
 * made: see footprintPlacement). Throws GeometryError for a footprint that is not a valid outline.
 */
function engineLoad(f: Footprint, outline: PreparedOutline, id: string): Exclude<Load, { kind: 'blanket' }> | null {
  const round = (x: number) => Math.round(x * 1000) / 1000;
  if (f.kind === 'line') {
    const offset = pathOffset(outline, f.local);
    return offset === null ? null : { id, kind: 'line', force: f.intensity, offset: round(offset) };
  }
  const placed = footprintPlacement(outline, prepareRing(f.local, 'load footprint').ring);
  if (!placed) return null;
  if (f.kind === 'strip') return { id, kind: 'strip', pressure: f.intensity, width: round(placed.width), offset: round(placed.offset) };
  return {
    id,
    kind: 'area',
    pressure: f.intensity,
    width: round(placed.width),
    length: round(placed.length),
    offset: round(placed.offset),
  };
}

/** Do two windows overlap (a shared instant, not merely touching ends)? */
export function windowsOverlap(a: { windowStart: string; windowEnd: string }, b: { windowStart: string; windowEnd: string }): boolean {
  return Date.parse(a.windowStart) < Date.parse(b.windowEnd) && Date.parse(b.windowStart) < Date.parse(a.windowEnd);
}

/**
 * The standoff of a load made of several bearing elements (a machine's tracks, pads or wheels),
 * moved as one: the least clear distance d ≥ the minimum clearance from the excavation to its
 * nearest element such that all its elements together pass the check (alone, without other loads)
 * at d and at every larger d up to 3H. The engine's own search (docs/calculation.md, "Standoff"):
 * every 0.01 m from 3H to the minimum clearance and either side of every element's break points,
 * rounded up beyond the farthest failing offset; null when 3H fails. With the failing bands.
 */
export function groupStandoff(base: Omit<CheckRequest, 'loads'>, group: Exclude<Load, { kind: 'blanket' }>[]): StandoffAnswer {
  if (group.length === 0) return { standoff: null, failingBands: [], monotonic: true };
  const nearest = Math.min(...group.map((l) => l.offset));
  const solver = standoffSolver(prepareCheck({ ...base, loads: group }), []);
  return solver.searchGroup(group.map((load) => ({ load, relative: load.offset - nearest })));
}

function maxOrNull(xs: (number | null)[]): number | null {
  if (xs.some((x) => x === null)) return null;
  return xs.length ? Math.max(...(xs as number[])) : 0;
}

/** An engine load beside an excavation without its id (the id names the permit and the load). */
type Measured = Omit<Exclude<Load, { kind: 'blanket' }>, 'id'>;
/** What measuring gives for a footprint that touches or crosses the outline (or is no valid outline). */
const TOUCHING = Object.freeze({ touching: true as const });
type Touching = typeof TOUCHING;
const touches = <T extends object>(m: T | Touching): m is Touching => m === TOUCHING;

/**
 * Footprints measured against an outline, by the prepared outline (kept by prepareExcavation) and the
 * footprint's content, frozen: every other permit's loads are measured once while they and the outline
 * stay the same, whichever check asks. A footprint that touches is kept as TOUCHING.
 */
const measured = new WeakMap<PreparedOutline, Kept<Measured | Touching>>();

/** engineLoad without the id, or TOUCHING for a footprint that touches or crosses the outline. */
function measure(f: Footprint, outline: PreparedOutline): Measured | Touching {
  try {
    const placed = engineLoad(f, outline, '');
    if (!placed) return TOUCHING;
    const { id: _id, ...load } = placed;
    void _id;
    return frozen(load);
  } catch (err) {
    if (err instanceof GeometryError) return TOUCHING;
    throw err;
  }
}

/** measure, once while the outline and the footprint stay the same. */
function measuredLoad(f: Footprint, outline: PreparedOutline): Measured | Touching {
  let kept = measured.get(outline);
  if (!kept) measured.set(outline, (kept = new Kept(500)));
  return kept.keep(contentKey([f.kind, f.local, f.intensity]), () => measure(f, outline));
}

/** A box in site-local metres. */
type Box = [minX: number, minY: number, maxX: number, maxY: number];
const boxOf = (pts: XY[]): Box => {
  const b: Box = [Infinity, Infinity, -Infinity, -Infinity];
  for (const [x, y] of pts) {
    if (x < b[0]) b[0] = x;
    if (y < b[1]) b[1] = y;
    if (x > b[2]) b[2] = x;
    if (y > b[3]) b[3] = y;
  }
  return b;
};
const boxesMeet = (a: Box, b: Box) => a[0] <= b[2] && b[0] <= a[2] && a[1] <= b[3] && b[1] <= a[3];
/** Margin (m) added to depth around a stored outline: far above its rounding through WGS84 (below 1 mm). */
const STORED_OUTLINE_MARGIN = 0.5;

/**
 * The box around an excavation's stored ground outline grown by its depth and a margin: a footprint
 * whose box lies outside it can neither touch the excavation nor stand closer than its depth. Null
 * without a stored outline (every footprint is measured).
 */
function reachOf(ex: CheckExcavation, proj: LocalProjection): Box | null {
  const ring = ex.groundOutline?.coordinates[0];
  if (!ring?.length) return null;
  const b = boxOf(ring.map((p) => proj.toLocal(p as LngLat)));
  const r = ex.excavation.depth + STORED_OUTLINE_MARGIN;
  return [b[0] - r, b[1] - r, b[2] + r, b[3] + r];
}

/** Everything of a check but the permit's loads and the time. */
export type CheckPlanInput = Omit<CheckInput, 'permit' | 'now'> & { permit: Omit<CheckInput['permit'], 'loads'> };

/** A placed load of the permit as a plan works it out: its footprints, and each measured against an excavation. */
interface OwnLoad {
  feet: Footprint[];
  boxes: Box[];
  /** Per excavation, per footprint: the engine load with its id (frozen), or why it cannot stand there. */
  at: Map<CheckExcavation, (Exclude<Load, { kind: 'blanket' }> | Touching)[]>;
}

/** What the other permits put beside one excavation. */
interface OthersPart {
  counted: CountedPermit[];
  loads: Load[];
  meta: Omit<CheckedLoad, 'force' | 'standoff'>[];
  warnings: string[];
}

/** What a plan works out once for an excavation. */
interface ExcavationPart {
  outline: PreparedOutline;
  reach?: Box | null;
  others?: OthersPart;
  fixed?: { raw: Omit<CheckRequest, 'loads'>; valid: Omit<CheckRequest, 'loads'> | undefined };
}

/**
 * The cumulative check made ready for checks that differ only in the permit's loads and the time:
 * the frames of a drag on the placing map. Everything but the loads is read once, when first needed,
 * and kept for the plan's life: each excavation's outline, the other permits' loads beside it and the
 * fixed part of its engine request, found valid. Each placed load is worked out once while its content
 * stays the same (the loads of the last run are kept, by content): a frame moves one load, so only that
 * one is validated, measured and checked against the nearby excavations again. A run gives exactly
 * what `cumulativeCheck` gives for the same input (shared/permits/check.test.ts); the input must not be
 * changed in place after the plan is made (make a new plan when anything but the loads changes).
 */
export function planCheck(input: CheckPlanInput): (loads: PlacedLoad[], now: Date) => PermitCheck {
  const run = planOutcome(input);
  return (loads, now) => {
    const outcome = run(loads, now);
    if (isRefused(outcome)) throw new PlacementError(outcome.refusals);
    return outcome;
  };
}

/**
 * planCheck, giving loads that touch an excavation as Refused instead of throwing PlacementError: a
 * drag across an excavation is refused frame after frame, and the browser captures each Error's stack
 * (for the first, it parses again every function on that stack to find their source positions).
 */
export function planOutcome(input: CheckPlanInput): (loads: PlacedLoad[], now: Date) => PermitCheck | Refused {
  const proj = localProjection(input.origin);
  const engine = input.engine ?? { runCheck, groupStandoff };
  const permit = input.permit;
  const named = new Set(input.excavations.map((e) => e.id));
  const parts = new Map<CheckExcavation, ExcavationPart>();
  const partOf = (ex: CheckExcavation): ExcavationPart => {
    let part = parts.get(ex);
    if (!part) parts.set(ex, (part = { outline: prepareExcavation(ex.shape, proj) }));
    return part;
  };
  let own = new Map<string, OwnLoad>();
  let like: LikeLoads = new Map();

  /** A load's footprints measured against an excavation, once a plan. */
  const measuredOwn = (load: PlacedLoad, o: OwnLoad, ex: CheckExcavation) => {
    let at = o.at.get(ex);
    if (!at) {
      const outline = partOf(ex).outline;
      at = o.feet.map((f) => {
        const m = measure(f, outline);
        if (touches(m)) return m;
        return frozen({ id: [permit.number, load.id, f.element].filter(Boolean).join('/'), ...m } as Exclude<Load, { kind: 'blanket' }>);
      });
      o.at.set(ex, at);
    }
    return at;
  };

  /** The other permits' loads beside an excavation, counted when on the same excavation with an overlapping window. */
  const othersOf = (ex: CheckExcavation): OthersPart => {
    const part = partOf(ex);
    if (part.others) return part.others;
    const others: OthersPart = { counted: [], loads: [], meta: [], warnings: [] };
    for (const o of input.others) {
      if (o.id === permit.id || !o.excavationIds.includes(ex.id) || !windowsOverlap(o, permit)) continue;
      others.counted.push({ id: o.id, number: o.number, status: o.status, windowStart: o.windowStart, windowEnd: o.windowEnd });
      for (const load of o.loads) {
        let feet: Footprint[];
        try {
          feet = footprintsOf(load, input.otherPlant?.get(o.id) ?? input.plant, proj);
        } catch {
          others.warnings.push(`permit ${o.number}: ${loadName(load)} could not be placed and is not counted`);
          continue;
        }
        for (const f of feet) {
          const id = [o.number, load.id, f.element].filter(Boolean).join('/');
          const m = measuredLoad(f, part.outline);
          if (touches(m)) {
            others.warnings.push(`permit ${o.number}: ${f.label} ${TOUCHES(ex.reference)}`);
            continue;
          }
          const el = frozen({ id, ...m } as Exclude<Load, { kind: 'blanket' }>);
          others.loads.push(el);
          others.meta.push({
            engineId: id,
            permitId: o.id,
            permitNumber: o.number,
            loadId: load.id,
            label: f.label,
            element: f.element,
            kind: el.kind,
            offset: el.offset,
            own: false,
          });
        }
      }
    }
    return (part.others = others);
  };

  const fixedOf = (ex: CheckExcavation) => {
    const part = partOf(ex);
    if (!part.fixed) {
      const raw = { excavation: ex.excavation, soil: ex.soil, method: input.method, minimumClearance: input.minimumClearance, step: 0.05 };
      part.fixed = { raw, valid: validFixedPart(raw) };
    }
    return part.fixed;
  };

  const reachOfNearby = (ex: CheckExcavation) => {
    const part = partOf(ex);
    if (part.reach === undefined) part.reach = reachOf(ex, proj);
    return part.reach;
  };

  return (loads, now) => {
    const keys = loads.map(contentKey);
    validateLoads(loads, keys, own, like);
    like = likeLoads(loads, keys);
    const kept = own;
    own = new Map();
    const mine = loads.map((load, index) => {
      let o = kept.get(keys[index]) ?? own.get(keys[index]);
      if (!o) {
        const feet = footprintsOf(load, input.plant, proj);
        o = { feet, boxes: feet.map((f) => boxOf(f.local)), at: new Map() };
      }
      own.set(keys[index], o);
      return { load, index, o };
    });
    const refusals: Refusal[] = [];
    const excavations: ExcavationCheck[] = [];
    const outside = new Set(loads.map((l) => l.id));
    const warnings: string[] = [];

    // A nearby excavation is checked too when a footprint touches it or stands closer than its depth.
    const reached: CheckExcavation[] = [];
    for (const ex of input.nearby ?? []) {
      if (named.has(ex.id)) continue;
      const reach = reachOfNearby(ex);
      if (reach && !mine.some(({ o }) => o.boxes.some((b) => boxesMeet(b, reach)))) continue;
      const reaching = mine.filter(({ load, o }) => measuredOwn(load, o, ex).some((m) => touches(m) || m.offset < ex.excavation.depth));
      if (reaching.length === 0) continue;
      reached.push(ex);
      const labels = [...new Set(reaching.map(({ o, load }) => o.feet[0]?.label ?? loadName(load)))];
      warnings.push(
        `${ex.reference} is not named on this permit, but ${labels.join(', ')} ${labels.length === 1 ? 'stands' : 'stand'} within its influence zone: it is checked too. Name it on the permit.`,
      );
    }

    for (const ex of [...input.excavations, ...reached]) {
      const engineLoads: Load[] = [];
      const meta: Omit<CheckedLoad, 'force' | 'standoff'>[] = [];
      for (const { load, index, o } of mine) {
        const at = measuredOwn(load, o, ex);
        o.feet.forEach((f, i) => {
          const el = at[i];
          if (touches(el)) {
            if (!refusals.some((r) => r.loadId === load.id && r.excavationId === ex.id)) {
              refusals.push({
                loadId: load.id,
                index,
                excavationId: ex.id,
                reference: ex.reference,
                message: `${f.label}${f.element ? ` (${f.element})` : ''} ${TOUCHES(ex.reference)}`,
              });
            }
            return;
          }
          engineLoads.push(el);
          meta.push({
            engineId: el.id,
            permitId: permit.id,
            permitNumber: permit.number,
            loadId: load.id,
            label: f.label,
            element: f.element,
            kind: el.kind,
            offset: el.offset,
            own: true,
          });
          if (el.offset < ex.excavation.depth) outside.delete(load.id);
        });
      }
      const others = othersOf(ex);
      const counted = others.counted.map((c) => ({ ...c }));
      engineLoads.push(...others.loads);
      meta.push(...others.meta);
      warnings.push(...others.warnings);
      if (refusals.length) continue;
      const fixed = fixedOf(ex);
      const request = validRequest(fixed.raw, fixed.valid, engineLoads, ex.reference);
      // The engine's answer may be kept and shared (frozen): a warning added below goes on a copy.
      let result = input.standoffs === false ? runVerdict(request) : engine.runCheck(request);
      const checked: CheckedLoad[] = meta.map((m, i) => ({ ...m, force: result.loads[i].force, standoff: result.loads[i].standoff }));
      // A load of one footprint has the engine's standoff; a machine's elements move together.
      const { loads: _all, ...base } = request;
      void _all;
      const loadStandoffs = mine.flatMap(({ load }) => {
        const parts = checked.flatMap((c, i) => (c.own && c.loadId === load.id ? [i] : []));
        if (parts.length === 0) return [];
        const label = checked[parts[0]].label;
        let answer: Pick<StandoffAnswer, 'standoff' | 'failingBands'>;
        if (parts.length === 1) {
          answer = result.loads[parts[0]];
        } else if (input.standoffs === false) {
          answer = { standoff: null, failingBands: [] };
        } else {
          const group = engine.groupStandoff(
            base,
            parts.map((i) => engineLoads[i] as Exclude<Load, { kind: 'blanket' }>),
          );
          if (!group.monotonic) result = { ...result, warnings: [...result.warnings, notMonotonicWarning(label, group)] };
          answer = group;
        }
        return [
          {
            loadId: load.id,
            label,
            standoff: answer.standoff,
            failingBands: answer.failingBands,
            offset: Math.min(...parts.map((i) => checked[i].offset)),
          },
        ];
      });
      const standoff = maxOrNull(loadStandoffs.map((l) => l.standoff));
      excavations.push({
        excavationId: ex.id,
        named: named.has(ex.id),
        reference: ex.reference,
        name: ex.name,
        depth: ex.excavation.depth,
        request,
        result,
        loads: checked,
        loadStandoffs,
        counted,
        standoff,
        verdict: verdictOf(result.utilisation, result.passes),
      });
    }
    if (refusals.length) return { refusals, message: refusedMessage(refusals) };

    const utils = excavations.map((e) => e.result.utilisation);
    const utilisation = utils.some((u) => u === null) ? null : utils.length ? Math.max(...(utils as number[])) : 0;
    const passes = excavations.every((e) => e.result.passes);
    return {
      checkedAt: now.toISOString(),
      method: input.method,
      excavations,
      utilisation,
      passes,
      verdict: verdictOf(utilisation, passes),
      computedStandoff: maxOrNull(excavations.map((e) => e.standoff)),
      outsideInfluence: mine.filter(({ load }) => outside.has(load.id)).map(({ o, load }) => o.feet[0]?.label ?? load.id),
      otherPermits: input.others.filter((o) => excavations.some((e) => e.counted.some((c) => c.id === o.id))),
      warnings: [...warnings, ...excavations.flatMap((e) => e.result.warnings.map((w) => `${e.reference}: ${w}`))],
      caution: CAUTION,
    };
  };
}

/** Runs the cumulative check. Throws PlacementError naming every load that touches an excavation. */
export function cumulativeCheck(input: CheckInput): PermitCheck {
  const {
    permit: { loads, ...permit },
    now,
    ...rest
  } = input;
  return planCheck({ ...rest, permit })(loads, now);
}
