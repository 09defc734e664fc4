/**
 * The excavation register: what is dug, where (GeoJSON, WGS84), how deep, what holds it up and what
 * ground it is in. The support and soil fields carry the calculation request's own names
 * (docs/calculation.md, "Command line": `excavation` and `soil`), so a check can be built from an excavation directly
 * with `calcExcavationOf`.
 *
 * Units: metres, kPa, kN/m³, degrees.
 */
import { z } from 'zod';
import { excavationStates } from './common';
import { lineString, polygon } from '@turf/helpers';
import { kinks } from '@turf/kinks';
import type { LineString, Polygon } from 'geojson';
import { calcRequestSchema, excavationSchema as calcExcavationSchema, soilLayerSchema, storedSoilLayerSchema } from './calc';
import type { Excavation as CalcExcavation, SoilLayer } from '../engineering/types';
import { SITE_TOLERANCE, simplifyLine, simplifyRing } from '../geometry/simplify';
import { oneOf } from './messages';
import { readStored, readStoredOrNull, type Stored } from './stored';
import { latitudeSchema, lineStringOf, longitudeSchema, polygonOf, positionSchema } from './geojson';

export const excavationKinds = ['trench', 'pit'] as const;
export type ExcavationKind = (typeof excavationKinds)[number];
export const kindLabels: Record<ExcavationKind, string> = { trench: 'Trench', pit: 'Pit' };

export { excavationStates };
export type ExcavationState = (typeof excavationStates)[number];
export const stateLabels: Record<ExcavationState, string> = { planned: 'Planned', open: 'Open', backfilled: 'Backfilled' };

export const supportTypes = ['trench-box', 'hydraulic-frames', 'sheet-piles', 'timbering', 'battered', 'unsupported'] as const;
export type SupportType = (typeof supportTypes)[number];
export const supportLabels: Record<SupportType, string> = {
  'trench-box': 'Trench box',
  'hydraulic-frames': 'Hydraulic frames',
  'sheet-piles': 'Sheet piles',
  timbering: 'Timbering',
  battered: 'Battered back',
  unsupported: 'Unsupported',
};

/** Trench widths the register accepts (m). */
const TRENCH_WIDTH = { min: 0.3, max: 10 } as const;
/** Every point of an excavation lies within this distance of the site origin (m). */
export const SITE_RADIUS = 5000;
/** Default design surcharge allowance (kPa): the customary general site allowance. */
export const DEFAULT_DESIGN_SURCHARGE = 10;

const listOf = (what: string) => `must be ${what}`;

export const lineStringSchema = lineStringOf(positionSchema, 'a trench centre line needs at least two points');
export const polygonSchema = polygonOf(
  positionSchema,
  'a pit outline needs at least three corners and the first repeated at the end',
  'a pit outline must be one ring without holes',
);

/**
 * Vertex limits (issue 12: bound the work one request can cause). A trench centre line or pit outline
 * may hold at most MAX_OUTLINE_POINTS points after simplification to the site tolerance (0.05 m,
 * see shared/geometry/simplify.ts), and an import at most MAX_IMPORT_POINTS in all. 200 points is
 * one every 2 m along a 400 m curving trench; drawn trenches carry tens. The raw limit of 500
 * positions bounds what is read before simplifying.
 */
export const MAX_OUTLINE_POINTS = 200;
export const MAX_IMPORT_POINTS = 2000;

/** Points of a geometry as stored (a ring's closing point not counted). */
export const pointCount = (g: LineString | Polygon): number =>
  g.type === 'LineString' ? g.coordinates.length : g.coordinates[0].length - 1;

/**
 * A trench centre line or a pit outline, valid GeoJSON, simplified to the site tolerance, within
 * the vertex limit, not crossing itself (checked with turf's kinks, which finds every point where
 * the line or ring crosses or touches itself; checked after the limit so that its quadratic work
 * is bounded).
 */
const geometrySchema = z
  .discriminatedUnion('type', [lineStringSchema, polygonSchema], {
    error: (iss) =>
      typeof iss.input === 'object' && iss.input !== null && 'type' in iss.input
        ? `must be a LineString (a trench centre line) or a Polygon (a pit outline), not ${JSON.stringify((iss.input as { type: unknown }).type)}`
        : 'must be a GeoJSON geometry: a LineString (trench centre line) or a Polygon (pit outline)',
  })
  .transform((g, ctx): LineString | Polygon => {
    const simple: LineString | Polygon =
      g.type === 'LineString'
        ? { type: 'LineString', coordinates: simplifyLine(g.coordinates) }
        : { type: 'Polygon', coordinates: [simplifyRing(g.coordinates[0])] };
    const n = pointCount(simple);
    if (n > MAX_OUTLINE_POINTS) {
      ctx.addIssue({
        code: 'custom',
        message: `has ${n} points after simplifying to ${SITE_TOLERANCE} m; at most ${MAX_OUTLINE_POINTS} are allowed (split it into separate excavations)`,
        fatal: true,
      });
      return z.NEVER;
    }
    return simple;
  })
  .superRefine((g, ctx) => {
    let crossings;
    try {
      crossings = g.type === 'LineString' ? kinks(lineString(g.coordinates)) : kinks(polygon(g.coordinates));
    } catch {
      return; // too few points or an open ring: already named by the structure's own checks
    }
    if (crossings.features.length > 0) {
      const [lon, lat] = crossings.features[0].geometry.coordinates;
      ctx.addIssue({ code: 'custom', message: `must not cross itself (it does near ${lat.toFixed(6)}, ${lon.toFixed(6)})` });
    }
  });
export type ExcavationGeometry = LineString | Polygon;

const calc = calcExcavationSchema.shape;

/** The fields of an excavation, without the whole-record rules (for partial changes). */
export const excavationFields = {
  reference: z.string({ error: 'is required' }).trim().min(1, 'is required').max(40, 'must be at most 40 characters'),
  name: z.string({ error: 'is required' }).trim().min(1, 'is required').max(120, 'must be at most 120 characters'),
  kind: z.enum(excavationKinds, { error: oneOf(kindLabels) }),
  geometry: geometrySchema,
  width: z
    .number({ error: 'must be a number (m)' })
    .min(TRENCH_WIDTH.min, `must be between ${TRENCH_WIDTH.min} and ${TRENCH_WIDTH.max} m`)
    .max(TRENCH_WIDTH.max, `must be between ${TRENCH_WIDTH.min} and ${TRENCH_WIDTH.max} m`)
    .nullable()
    .default(null),
  depth: calc.depth,
  state: z.enum(excavationStates, { error: oneOf(stateLabels) }).default('planned'),
  supportType: z.enum(supportTypes, { error: oneOf(supportLabels) }),
  designSurcharge: calc.designSurcharge.max(200, 'must be at most 200 kPa').default(DEFAULT_DESIGN_SURCHARGE),
  ratedPressure: calc.ratedPressure,
  restraint: calc.restraint,
  pressureState: calc.pressureState,
  wallFriction: calc.wallFriction,
  soil: z
    .array(soilLayerSchema, { error: listOf('a list of soil layers') })
    .min(1, 'must list at least one layer')
    .max(20, 'must list at most 20 layers'),
  groundwaterDepth: calc.groundwaterDepth,
  designReference: z.string().trim().max(200, 'must be at most 200 characters').default(''),
  notes: z.string().max(4000, 'must be at most 4000 characters').default(''),
};

/** The calculation's `excavation` object of an excavation record. */
export function calcExcavationOf(e: Pick<CalcExcavation, keyof CalcExcavation>): CalcExcavation {
  return {
    depth: e.depth,
    groundwaterDepth: e.groundwaterDepth,
    designSurcharge: e.designSurcharge,
    ratedPressure: e.ratedPressure,
    pressureState: e.pressureState,
    wallFriction: e.wallFriction,
    restraint: e.restraint,
  };
}

type Fields = z.output<z.ZodObject<typeof excavationFields>>;

/**
 * Whole-record rules: the geometry matches the kind (a trench is a centre line with a width, a pit a
 * polygon), and the support and soil make a calculation request the engine accepts (the same rules
 * as `npm run calc`: the first layer starts at 0 m, no repeated tops, wall friction within φ′).
 */
function checkRecord(v: Fields, ctx: z.RefinementCtx): void {
  if (v.kind === 'trench') {
    if (v.geometry.type !== 'LineString')
      ctx.addIssue({ code: 'custom', path: ['geometry'], message: 'a trench is drawn as its centre line (a LineString)' });
    if (v.width === null)
      ctx.addIssue({ code: 'custom', path: ['width'], message: `is required for a trench (${TRENCH_WIDTH.min} to ${TRENCH_WIDTH.max} m)` });
  } else {
    if (v.geometry.type !== 'Polygon')
      ctx.addIssue({ code: 'custom', path: ['geometry'], message: 'a pit is drawn as its outline (a Polygon)' });
    if (v.width !== null) ctx.addIssue({ code: 'custom', path: ['width'], message: 'applies to trenches only; leave it empty for a pit' });
  }
  const r = calcRequestSchema.safeParse({ excavation: calcExcavationOf(v), soil: v.soil, method: 'dispersion-45', loads: [] });
  if (!r.success) {
    for (const issue of r.error.issues) {
      const path = issue.path[0] === 'excavation' ? issue.path.slice(1) : issue.path;
      ctx.addIssue({ code: 'custom', path, message: issue.message });
    }
  }
}

const sortSoil = <T extends { soil: SoilLayer[] }>(v: T): T => ({ ...v, soil: [...v.soil].sort((a, b) => a.top - b.top) });

/** A new excavation (POST), one feature of an import, and the form. */
export const excavationInputSchema = z.object(excavationFields).superRefine(checkRecord).transform(sortSoil);
export type ExcavationInput = z.input<typeof excavationInputSchema>;
export type ExcavationValues = z.output<typeof excavationInputSchema>;

/**
 * A change (PATCH): any fields, with the version it was read at; the merged record must pass the
 * whole-record rules. Defaults are taken off, so a field left out keeps its saved value.
 */
type OptionalFields = { [K in keyof Fields]: z.ZodOptional<z.ZodType<Fields[K], ExcavationInput[K]>> };
const optionalFields = Object.fromEntries(
  Object.entries(excavationFields).map(([k, s]) => [
    k,
    (s instanceof z.ZodDefault ? (s.unwrap() as z.ZodType) : (s as z.ZodType)).optional(),
  ]),
) as OptionalFields;
export const excavationUpdateSchema = z.object({
  ...optionalFields,
  version: z.number({ error: 'is required: the version you read' }).int().positive('must be the version you read'),
});
export type ExcavationUpdate = Partial<ExcavationInput> & { version: number };

// GeoJSON as the API answers it (stored shapes, already checked when they were saved).
const position = z.array(z.number()).min(2);
export const lineAnswer = z.object({ type: z.literal('LineString'), coordinates: z.array(position) });
export const polygonAnswer = z.object({ type: z.literal('Polygon'), coordinates: z.array(z.array(position)) });
export const multiPolygonAnswer = z.object({ type: z.literal('MultiPolygon'), coordinates: z.array(z.array(z.array(position))) });

export const geometryAnswer = z.discriminatedUnion('type', [lineAnswer, polygonAnswer]);
export type StoredGeometry = z.output<typeof geometryAnswer>;
export type StoredPolygon = z.output<typeof polygonAnswer>;
export const zoneAnswer = z.discriminatedUnion('type', [polygonAnswer, multiPolygonAnswer]);
export type StoredZone = z.output<typeof zoneAnswer>;
export type StoredSoil = z.output<typeof storedSoilLayerSchema>[];

// The excavation's jsonb columns as stored (db/database.ts), parsed when read: a drifted row throws
// StoredShapeError naming the column and the field.
/** excavations.geometry: the centre line or outline as drawn. */
export const storedGeometry = (json: Stored<StoredGeometry>): StoredGeometry => readStored('excavation geometry', geometryAnswer, json);
/** excavations.soil: the soil layers. */
export const storedSoil = (json: Stored<StoredSoil>): StoredSoil => readStored('soil layer list', z.array(storedSoilLayerSchema), json);
/** excavations.outline (null when no outline forms). */
export const storedOutline = (json: Stored<StoredPolygon> | null): StoredPolygon | null =>
  readStoredOrNull('excavation outline', polygonAnswer, json);
/** excavations.influence_zone (null when no outline forms). */
export const storedZone = (json: Stored<StoredZone> | null): StoredZone | null => readStoredOrNull('influence zone', zoneAnswer, json);

/** An excavation as the API returns it. */
export const excavationAnswer = z.object({
  ...excavationFields,
  geometry: geometryAnswer,
  id: z.number().int(),
  siteId: z.number().int(),
  version: z.number().int(),
  /** The uploaded design drawing (a PDF), served by GET /api/uploads/:id. */
  drawing: z.object({ id: z.number().int(), name: z.string(), size: z.number() }).nullable(),
  /** The ground outline: the trench centre line widened by half its width each side, or the pit polygon. */
  outline: polygonAnswer.nullable(),
  /** The influence zone: the ground within the depth H of the outline (docs/calculation.md, "Load spread at 45°" and "Standoff"). */
  influenceZone: zoneAnswer.nullable(),
  createdAt: z.iso.datetime(),
  updatedAt: z.iso.datetime(),
});
export type Excavation = z.output<typeof excavationAnswer>;
/** GET /api/sites/:siteId/excavations: one page, ordered by reference, and the cursor of the next (null on the last). */
export const excavationsAnswer = z.object({ excavations: z.array(excavationAnswer), next: z.string().nullable() });
export const excavationListQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(1000).default(500),
  /** The `next` of the page before. */
  cursor: z.string().max(300, 'must be at most 300 characters').optional(),
});
export const oneExcavationAnswer = z.object({ excavation: excavationAnswer });

/** Fields a site plan image is pinned by: its south-west and north-east corners, and how opaque it is drawn. */
export const planBoundsSchema = z
  .object({
    south: latitudeSchema,
    west: longitudeSchema,
    north: latitudeSchema,
    east: longitudeSchema,
  })
  .superRefine((b, ctx) => {
    if (b.north <= b.south) ctx.addIssue({ code: 'custom', path: ['north'], message: 'must be north of the south edge' });
    if (b.east <= b.west) ctx.addIssue({ code: 'custom', path: ['east'], message: 'must be east of the west edge' });
  });
export type PlanBounds = z.output<typeof planBoundsSchema>;
export const planOpacitySchema = z
  .number({ error: 'must be a number from 0 to 1' })
  .min(0, 'must be from 0 to 1')
  .max(1, 'must be from 0 to 1');
export const planUpdateSchema = z.object({ bounds: planBoundsSchema.optional(), opacity: planOpacitySchema.optional() });

export const sitePlanAnswer = z.object({
  uploadId: z.number().int(),
  name: z.string(),
  bounds: z.object({ south: z.number(), west: z.number(), north: z.number(), east: z.number() }),
  opacity: z.number(),
});
export type SitePlan = z.output<typeof sitePlanAnswer>;
/** The site plan, null when none is pinned. */
export const planAnswer = z.object({ plan: sitePlanAnswer.nullable() });

/** What an import did with each feature of the file. */
export const importReportAnswer = z.object({
  imported: z.array(
    z.object({ index: z.number().int(), reference: z.string(), id: z.number().int(), action: z.enum(['created', 'updated']) }),
  ),
  refused: z.array(z.object({ index: z.number().int(), reference: z.string().nullable(), reasons: z.record(z.string(), z.string()) })),
});
export type ImportReport = z.output<typeof importReportAnswer>;
export const importAnswer = z.object({ report: importReportAnswer });

/** What a change of an excavation did to a permit that stands on it (server/src/services/permits/recheck.ts). */
export const recheckOutcomeAnswer = z.object({
  permitId: z.number().int(),
  number: z.string(),
  /** What happened: suspended (was live), sent back for review (was approved), still fails (suspended or awaiting review), passes. */
  outcome: z.enum(['suspended', 'sent-back', 'still-fails', 'passes']),
  /** The timeline's words, e.g. "TR-3 deepened from 2.5 m to 3.2 m: utilisation 1.31; …". */
  text: z.string(),
});
export type RecheckOutcome = z.output<typeof recheckOutcomeAnswer>;
export const changedExcavationAnswer = z.object({ excavation: excavationAnswer, rechecked: z.array(recheckOutcomeAnswer) });

const changesSchema = z.record(z.string(), z.object({ from: z.unknown(), to: z.unknown() }));
/**
 * What an audit entry keeps beside its action (audit_log.detail): free fields by entity and action;
 * an excavation's change keeps `changes` (field → from, to), which its history reads.
 */
export const auditDetailSchema = z.looseObject({ changes: changesSchema.optional() });
export type AuditDetail = z.output<typeof auditDetailSchema>;
export const storedAuditDetail = (json: Stored<AuditDetail>): AuditDetail => readStored('audit entry detail', auditDetailSchema, json);

/** One change in an excavation's history: who, when, what (field → from, to). */
const historyEntryAnswer = z.object({
  id: z.number().int(),
  at: z.iso.datetime(),
  by: z.string(),
  action: z.string(),
  changes: changesSchema.nullable(),
});
export const historyAnswer = z.object({ entries: z.array(historyEntryAnswer) });

export const importModes = ['add', 'replace'] as const;
export type ImportMode = (typeof importModes)[number];
/** The import's choices as the register page offers them (the server's refusals quote them). */
export const importModeLabels: Record<ImportMode, string> = {
  add: 'Add new excavations only (a reference already used is refused)',
  replace: 'Add new ones and replace those with the same reference',
};
/** The label of the import's choice of mode on the register page. */
export const IMPORT_MODE_LABEL = 'What to do with existing references';

/** The stored code of a choice a file may give by its code or by the word people see ("Trench box" → trench-box). */
export function codeOfLabel<T extends string>(value: unknown, labels: Record<T, string>): unknown {
  if (typeof value !== 'string') return value;
  const v = value.trim().toLowerCase();
  const hit = (Object.entries(labels) as [T, string][]).find(([code, label]) => code === v || label.toLowerCase() === v);
  return hit ? hit[0] : value;
}

/**
 * The fields the check of a load beside an excavation reads (its plan shape, depth, support, soil,
 * water and state). A change to any of them re-checks every permit that stands on the excavation
 * (server/src/services/permits/recheck.ts).
 */
export const checkInputFields = [
  'kind',
  'geometry',
  'width',
  'depth',
  'state',
  'supportType',
  'designSurcharge',
  'ratedPressure',
  'restraint',
  'pressureState',
  'wallFriction',
  'soil',
  'groundwaterDepth',
] as const satisfies readonly (keyof ExcavationValues)[];
export type CheckInputs = Pick<ExcavationValues, (typeof checkInputFields)[number]>;

/**
 * The support's design data: set by coordinators and administrators alone. Supervisors record what
 * is on the ground (outline, depth as dug, state, name, notes); a supervisor sending any of these
 * fields is refused (403 naming them).
 */
export const designFields = [
  'supportType',
  'designSurcharge',
  'ratedPressure',
  'soil',
  'groundwaterDepth',
  'wallFriction',
  'pressureState',
  'restraint',
  'designReference',
] as const satisfies readonly (keyof ExcavationValues)[];
type DesignField = (typeof designFields)[number];

/** The design fields present (not undefined) in a request body or import feature's properties. */
export function designFieldsIn(body: unknown): DesignField[] {
  if (typeof body !== 'object' || body === null || Array.isArray(body)) return [];
  return designFields.filter((f) => (body as Record<string, unknown>)[f] !== undefined);
}

/** JSON with object keys sorted: PostgreSQL's jsonb keeps its own key order, so values are compared this way. */
export function canonical(v: unknown): string {
  return JSON.stringify(v, (_k, x: unknown) =>
    x && typeof x === 'object' && !Array.isArray(x)
      ? Object.fromEntries(Object.entries(x as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : 1)))
      : x,
  );
}
