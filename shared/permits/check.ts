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
import { calcRequestSchema, formatPath, requestLoadsSchema } from '../schemas/calc';
import { contentKey, frozen, Kept } from '../kept';
import {
  CAUTION,
  notMonotonicWarning,
  prepareCheck,
  runCheck,
  standoffSolver,
  type CheckRequest,
  type Excavation,
  type Load,
  type Method,
  type SoilLayer,
  type StandoffAnswer,
} from '../engineering';
import {
  GeometryError,
  localProjection,
  placeFootprint,
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
   * null, no failing bands). The placing map uses it for each frame of a drag and runs the full
   * check when the load is let go; a stored or shown-as-final check never uses it.
   */
  standoffs?: false;
}

/** The two engine calls the check makes; both pure, so a caller may memoise them. */
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

/** Throws CheckInputError for the first wrong field of the permit's loads (placedLoadSchema, as the API). */
function validateLoads(loads: unknown[]): void {
  const keys = loads.map(contentKey);
  if (keys.every((key, i) => validLoads.get(key) ?? placedLoadSchema.safeParse(loads[i]).success)) {
    for (const key of keys) validLoads.set(key, true);
    return;
  }
  const r = placedLoadsSchema.safeParse(loads);
  if (!r.success) {
    const issue = r.error.issues[0];
    throw new CheckInputError(formatPath(['loads', ...issue.path]), issue.message);
  }
}

/**
 * The fixed part of engine requests found valid (the excavation, its soil, the method, the clearance,
 * the step), read by calcRequestSchema with no loads and kept by content, frozen: a frame of a drag
 * changes only the loads. calcRequestSchema's rules on that part do not read the loads, nor the loads'
 * rules that part, so a request is valid exactly when its fixed part and its loads are.
 */
const validFixed = new Kept<Omit<CheckRequest, 'loads'>>(200);

/** The engine request checked with the calculation's own schema (calc.ts), defaults filled in. */
function validRequest(request: CheckRequest, reference: string): CheckRequest {
  const { loads, ...fixed } = request;
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
  if (valid) {
    const r = requestLoadsSchema.safeParse(loads);
    if (r.success) return { ...valid, loads: r.data };
  }
  // Something is wrong: the whole request read at once names its first wrong field, as `npm run calc` does.
  const r = calcRequestSchema.safeParse(request);
  if (r.success) return r.data;
  const issue = r.error.issues[0];
  throw new CheckInputError(`${reference} ${formatPath(issue.path)}`.trim(), issue.message);
}

export class PlacementError extends Error {
  constructor(readonly refusals: Refusal[]) {
    super(refusals.map((r) => r.message).join('; '));
  }
}

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

/** Least distance (m) from a path to the outline; throws GeometryError when it meets or enters it. */
function pathOffset(outline: PreparedOutline, path: XY[]): number {
  const r = outline.ring;
  let d = Infinity;
  for (let i = 0; i < path.length; i++) {
    if (pointInRing(path[i], r)) throw new GeometryError('inside');
    d = Math.min(d, distanceToRing(path[i], r));
    if (i > 0) {
      for (let k = 0; k < r.length; k++) {
        if (segmentsMeet(path[i - 1], path[i], r[k], r[(k + 1) % r.length])) throw new GeometryError('crosses');
        d = Math.min(d, pointSegment(r[k], path[i - 1], path[i])[0]);
      }
    }
  }
  if (d <= 1e-6) throw new GeometryError('touches');
  return d;
}

/** The engine load of a footprint beside an excavation. */
function engineLoad(f: Footprint, outline: PreparedOutline, id: string): Exclude<Load, { kind: 'blanket' }> {
  const round = (x: number) => Math.round(x * 1000) / 1000;
  if (f.kind === 'line') return { id, kind: 'line', force: f.intensity, offset: round(pathOffset(outline, f.local)) };
  const placed = placeFootprint(outline, prepareRing(f.local, 'load footprint').ring);
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

/**
 * Footprints measured against an outline, by the prepared outline (kept by prepareExcavation) and the
 * footprint's content, frozen: a frame of a drag moves one load, so this permit's other loads and
 * every other permit's are not measured again. A footprint that touches keeps its GeometryError.
 */
const measured = new WeakMap<PreparedOutline, Kept<Omit<Exclude<Load, { kind: 'blanket' }>, 'id'> | GeometryError>>();

/** engineLoad, measured once while the outline and the footprint stay the same. */
function measuredLoad(f: Footprint, outline: PreparedOutline, id: string): Exclude<Load, { kind: 'blanket' }> {
  let kept = measured.get(outline);
  if (!kept) measured.set(outline, (kept = new Kept(500)));
  const m = kept.keep(contentKey([f.kind, f.local, f.intensity]), () => {
    try {
      const { id: _id, ...load } = engineLoad(f, outline, '');
      void _id;
      return frozen(load);
    } catch (err) {
      if (err instanceof GeometryError) return err;
      throw err;
    }
  });
  if (m instanceof GeometryError) throw m;
  return { id, ...m } as Exclude<Load, { kind: 'blanket' }>;
}

/** Whether a footprint touches the excavation or stands closer to it than its depth. */
function footprintReaches(f: Footprint, ex: CheckExcavation, outlineOf: (ex: CheckExcavation) => PreparedOutline): boolean {
  try {
    return measuredLoad(f, outlineOf(ex), 'probe').offset < ex.excavation.depth;
  } catch (err) {
    if (err instanceof GeometryError) return true;
    throw err;
  }
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
 * Whether some footprint may stand within the excavation's depth of its stored ground outline: false
 * only when every footprint's box lies farther than depth + margin from the outline's box, so such a
 * footprint cannot touch it nor stand closer than its depth. True (measure it) without a stored outline.
 */
function mayReach(boxes: Box[], ex: CheckExcavation, proj: LocalProjection): boolean {
  const ring = ex.groundOutline?.coordinates[0];
  if (!ring?.length) return true;
  const b = boxOf(ring.map((p) => proj.toLocal(p as LngLat)));
  const r = ex.excavation.depth + STORED_OUTLINE_MARGIN;
  const zone: Box = [b[0] - r, b[1] - r, b[2] + r, b[3] + r];
  return boxes.some((f) => boxesMeet(f, zone));
}

/** Runs the cumulative check. Throws PlacementError naming every load that touches an excavation. */
export function cumulativeCheck(input: CheckInput): PermitCheck {
  validateLoads(input.permit.loads);
  const proj = localProjection(input.origin);
  const own = input.permit.loads.map((l, index) => ({ load: l, index, feet: footprintsOf(l, input.plant, proj) }));
  const refusals: Refusal[] = [];
  const excavations: ExcavationCheck[] = [];
  const outside = new Set(input.permit.loads.map((l) => l.id));
  const warnings: string[] = [];

  // Each excavation's outline, prepared (or found kept) once a check.
  const outlines = new Map<CheckExcavation, PreparedOutline>();
  const outlineOf = (ex: CheckExcavation) => {
    let outline = outlines.get(ex);
    if (!outline) outlines.set(ex, (outline = prepareExcavation(ex.shape, proj)));
    return outline;
  };
  const named = new Set(input.excavations.map((e) => e.id));
  const boxes = own.flatMap(({ feet }) => feet.map((f) => boxOf(f.local)));
  const reached: CheckExcavation[] = [];
  for (const ex of input.nearby ?? []) {
    if (named.has(ex.id) || !mayReach(boxes, ex, proj)) continue;
    const reaching = own.filter(({ feet }) => feet.some((f) => footprintReaches(f, ex, outlineOf)));
    if (reaching.length === 0) continue;
    reached.push(ex);
    const labels = [...new Set(reaching.map(({ feet, load }) => feet[0]?.label ?? loadName(load)))];
    warnings.push(
      `${ex.reference} is not named on this permit, but ${labels.join(', ')} ${labels.length === 1 ? 'stands' : 'stand'} within its influence zone: it is checked too. Name it on the permit.`,
    );
  }

  const engine = input.engine ?? { runCheck, groupStandoff };
  for (const ex of [...input.excavations, ...reached]) {
    const outline = outlineOf(ex);
    const loads: Load[] = [];
    const meta: Omit<CheckedLoad, 'force' | 'standoff'>[] = [];
    for (const { load, index, feet } of own) {
      for (const f of feet) {
        const id = [input.permit.number, load.id, f.element].filter(Boolean).join('/');
        try {
          const el = measuredLoad(f, outline, id);
          loads.push(el);
          meta.push({
            engineId: id,
            permitId: input.permit.id,
            permitNumber: input.permit.number,
            loadId: load.id,
            label: f.label,
            element: f.element,
            kind: el.kind,
            offset: el.offset,
            own: true,
          });
          if (el.offset < ex.excavation.depth) outside.delete(load.id);
        } catch (err) {
          if (!(err instanceof GeometryError)) throw err;
          if (!refusals.some((r) => r.loadId === load.id && r.excavationId === ex.id)) {
            refusals.push({
              loadId: load.id,
              index,
              excavationId: ex.id,
              reference: ex.reference,
              message: `${f.label}${f.element ? ` (${f.element})` : ''} ${TOUCHES(ex.reference)}`,
            });
          }
        }
      }
    }
    const counted: CountedPermit[] = [];
    for (const o of input.others) {
      if (o.id === input.permit.id || !o.excavationIds.includes(ex.id) || !windowsOverlap(o, input.permit)) continue;
      counted.push({ id: o.id, number: o.number, status: o.status, windowStart: o.windowStart, windowEnd: o.windowEnd });
      for (const load of o.loads) {
        let feet: Footprint[];
        try {
          feet = footprintsOf(load, input.otherPlant?.get(o.id) ?? input.plant, proj);
        } catch {
          warnings.push(`permit ${o.number}: ${loadName(load)} could not be placed and is not counted`);
          continue;
        }
        for (const f of feet) {
          const id = [o.number, load.id, f.element].filter(Boolean).join('/');
          try {
            const el = measuredLoad(f, outline, id);
            loads.push(el);
            meta.push({
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
          } catch (err) {
            if (!(err instanceof GeometryError)) throw err;
            warnings.push(`permit ${o.number}: ${f.label} ${TOUCHES(ex.reference)}`);
          }
        }
      }
    }
    if (refusals.length) continue;
    const request = validRequest(
      { excavation: ex.excavation, soil: ex.soil, method: input.method, minimumClearance: input.minimumClearance, step: 0.05, loads },
      ex.reference,
    );
    const result = input.standoffs === false ? engine.runCheck(request, { standoffs: false }) : engine.runCheck(request);
    const checked: CheckedLoad[] = meta.map((m, i) => ({ ...m, force: result.loads[i].force, standoff: result.loads[i].standoff }));
    // A load of one footprint has the engine's standoff; a machine's elements move together.
    const { loads: _all, ...base } = request;
    void _all;
    const loadStandoffs = own.flatMap(({ load }) => {
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
          parts.map((i) => loads[i] as Exclude<Load, { kind: 'blanket' }>),
        );
        if (!group.monotonic) result.warnings.push(notMonotonicWarning(label, group));
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
  if (refusals.length) throw new PlacementError(refusals);

  const utils = excavations.map((e) => e.result.utilisation);
  const utilisation = utils.some((u) => u === null) ? null : utils.length ? Math.max(...(utils as number[])) : 0;
  const passes = excavations.every((e) => e.result.passes);
  return {
    checkedAt: input.now.toISOString(),
    method: input.method,
    excavations,
    utilisation,
    passes,
    verdict: verdictOf(utilisation, passes),
    computedStandoff: maxOrNull(excavations.map((e) => e.standoff)),
    outsideInfluence: own.filter((o) => outside.has(o.load.id)).map((o) => o.feet[0]?.label ?? o.load.id),
    otherPermits: input.others.filter((o) => excavations.some((e) => e.counted.some((c) => c.id === o.id))),
    warnings: [...warnings, ...excavations.flatMap((e) => e.result.warnings.map((w) => `${e.reference}: ${w}`))],
    caution: CAUTION,
  };
}
