/**
 * Zod schemas of the calculation request (docs/calculation.md, "Command line" and "Refusals"),
 * shared by the `npm run calc` CLI, the API and the browser's live check. Every message names what is
 * wrong; `formatIssues` puts the field's path in front of it,
 * e.g. `soil[0].frictionAngle: must be greater than 0° and at most 60°`.
 *
 * Units: m, kPa, kN/m (line loads), kN (point loads), kN/m³, degrees.
 */
import { z } from 'zod';
import { GAMMA_WATER } from '../engineering/soil';
import type { CheckRequest } from '../engineering/types';

function describe(input: unknown): string {
  if (input === null) return 'null';
  if (Array.isArray(input)) return 'a list';
  if (typeof input === 'string') return `the text ${JSON.stringify(input.length > 30 ? input.slice(0, 30) + '…' : input)}`;
  return `a ${typeof input}`;
}

/** A finite number; `is required` when absent, otherwise says what was given instead. */
function num() {
  return z.number({
    error: (iss) => {
      if (iss.input === undefined) return 'is required';
      if (typeof iss.input === 'number') return 'must be a finite number';
      return `must be a number, not ${describe(iss.input)}`;
    },
  });
}

/** Error for an object that is absent or something else. */
const objectError = (what: string) => ({
  error: (iss: { input?: unknown }) => (iss.input === undefined ? 'is required' : `must be ${what}, not ${describe(iss.input)}`),
});

/** Physical bounds beyond which a figure is refused as nonsense (docs/calculation.md, "Refusals"). */
const BOUNDS = {
  /** Any pressure or strength (kPa). */
  pressure: 10_000,
  /** Any force: a line load (kN/m) or a point load (kN). */
  force: 100_000,
  /** Any length, offset or depth other than the excavation's (m). */
  length: 1_000,
  /** Unit weights (kN/m³). */
  unitWeight: 30,
} as const;

const withUnit = (n: number, unit: string) => (unit === '°' ? `${n}°` : `${n.toLocaleString('en-GB')} ${unit}`);
const bound = (unit: string) =>
  unit === 'kPa' ? BOUNDS.pressure : unit === 'kN' || unit === 'kN/m' ? BOUNDS.force : unit === 'm' ? BOUNDS.length : Infinity;
const capped = (schema: z.ZodNumber, unit: string) => {
  const max = bound(unit);
  return max === Infinity ? schema : schema.max(max, `must be at most ${withUnit(max, unit)}`);
};
const positive = (unit: string) => capped(num().gt(0, `must be greater than ${withUnit(0, unit)}`), unit);
const atLeastZero = (unit: string) => capped(num().min(0, `must be at least ${withUnit(0, unit)}`), unit);

function choice<const T extends readonly [string, ...string[]]>(values: T) {
  return z.enum(values, {
    error: (iss) => (iss.input === undefined ? 'is required' : `must be one of ${values.join(', ')} (got ${describe(iss.input)})`),
  });
}

/** Excavation depths above this are outside what the product checks (m). */
const MAX_DEPTH = 50;
const STEP_RANGE = [0.005, 0.5] as const;
const FRICTION_MESSAGE = 'must be greater than 0° and at most 60°';

export const excavationSchema = z.strictObject(
  {
    depth: positive('m').max(MAX_DEPTH, `must be at most ${MAX_DEPTH} m`),
    groundwaterDepth: atLeastZero('m').nullable().default(null),
    designSurcharge: atLeastZero('kPa'),
    ratedPressure: positive('kPa').nullable().default(null),
    pressureState: choice(['active', 'at-rest']).default('active'),
    wallFriction: atLeastZero('°').max(60, 'must be at most 60°').default(0),
    restraint: choice(['unyielding', 'yielding']).default('unyielding'),
  },
  objectError('an excavation object'),
);

export const soilLayerSchema = z
  .strictObject(
    {
      top: atLeastZero('m'),
      unitWeight: positive('kN/m³').max(BOUNDS.unitWeight, `must be at most ${BOUNDS.unitWeight} kN/m³`),
      saturatedUnitWeight: num()
        .min(
          GAMMA_WATER,
          `must be at least the unit weight of water, ${GAMMA_WATER} kN/m³ (a lighter soil would have negative effective stress)`,
        )
        .max(BOUNDS.unitWeight, `must be at most ${BOUNDS.unitWeight} kN/m³`)
        .optional(),
      frictionAngle: num().gt(0, FRICTION_MESSAGE).max(60, FRICTION_MESSAGE).optional(),
      cohesion: atLeastZero('kPa').optional(),
      undrainedShearStrength: positive('kPa').optional(),
    },
    objectError('a soil layer object'),
  )
  .superRefine((layer, ctx) => {
    const drained = layer.frictionAngle !== undefined;
    const undrained = layer.undrainedShearStrength !== undefined;
    // A cohesion of 0 beside cu changes nothing (records saved before this rule carry it): it is dropped.
    if (undrained && !drained && (layer.cohesion ?? 0) > 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['cohesion'],
        message: 'does not apply to an undrained layer (its strength is undrainedShearStrength): leave it out',
      });
    }
    if (drained === undrained) {
      ctx.addIssue({
        code: 'custom',
        path: [drained ? 'undrainedShearStrength' : 'frictionAngle'],
        message: drained
          ? 'give either frictionAngle (drained) or undrainedShearStrength (undrained), not both'
          : 'is required (or give undrainedShearStrength for an undrained layer)',
      });
    }
  })
  .transform(({ cohesion, ...layer }): typeof layer & { cohesion?: number } =>
    layer.frictionAngle !== undefined ? { ...layer, cohesion: cohesion ?? 0 } : layer,
  );

const id = z
  .string({ error: (iss) => (iss.input === undefined ? 'is required' : `must be text, not ${describe(iss.input)}`) })
  .min(1, 'must not be empty')
  .max(100, 'must be at most 100 characters');
const offset = atLeastZero('m');

export const loadKinds = ['blanket', 'strip', 'line', 'area', 'point'] as const;

/** One load of a request (its id unique in the request: requestLoadsSchema). */
export const engineLoadSchema = z.discriminatedUnion(
  'kind',
  [
    z.strictObject({ id, kind: z.literal('blanket'), pressure: positive('kPa') }),
    z.strictObject({ id, kind: z.literal('strip'), pressure: positive('kPa'), width: positive('m'), offset }),
    z.strictObject({ id, kind: z.literal('line'), force: positive('kN/m'), offset }),
    z.strictObject({
      id,
      kind: z.literal('area'),
      pressure: positive('kPa'),
      width: positive('m'),
      length: positive('m'),
      offset,
    }),
    z.strictObject({
      id,
      kind: z.literal('point'),
      force: positive('kN'),
      offset,
      padWidth: positive('m').optional(),
      padLength: positive('m').optional(),
    }),
  ],
  {
    error: (iss) => {
      const input = iss.input as Record<string, unknown> | undefined;
      if (input === null || typeof input !== 'object' || Array.isArray(input)) return `must be a load object, not ${describe(input)}`;
      if (input.kind === undefined) return `is required (one of ${loadKinds.join(', ')})`;
      return `unknown load kind ${JSON.stringify(input.kind)}: must be one of ${loadKinds.join(', ')}`;
    },
  },
);

/** A request's loads, each id once (the rest of the request does not bear on them). */
export const requestLoadsSchema = z.array(engineLoadSchema, objectError('a list of loads')).superRefine((loads, ctx) => {
  const ids = loads.map((l) => l.id);
  ids.forEach((v, i) => {
    const first = ids.indexOf(v);
    if (first !== i) ctx.addIssue({ code: 'custom', path: [i, 'id'], message: `repeats the id of loads[${first}] (${JSON.stringify(v)})` });
  });
});

export const calcRequestSchema = z
  .strictObject(
    {
      excavation: excavationSchema,
      soil: z.array(soilLayerSchema, objectError('a list of soil layers')).min(1, 'must list at least one layer'),
      method: choice(['dispersion-45', 'elastic']),
      minimumClearance: num().min(0, 'must be at least 0 m').max(10, 'must be at most 10 m').default(0.6),
      step: num()
        .min(STEP_RANGE[0], `must be at least ${STEP_RANGE[0]} m`)
        .max(STEP_RANGE[1], `must be at most ${STEP_RANGE[1]} m`)
        .default(0.05),
      loads: requestLoadsSchema,
    },
    objectError('a request object'),
  )
  .superRefine((req, ctx) => {
    const tops = req.soil.map((l) => l.top);
    const shallowest = tops.indexOf(Math.min(...tops));
    if (tops.length > 0 && tops[shallowest] !== 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['soil', shallowest, 'top'],
        message: 'the shallowest layer must start at ground level (top 0 m)',
      });
    }
    tops.forEach((t, i) => {
      const first = tops.indexOf(t);
      if (first !== i) ctx.addIssue({ code: 'custom', path: ['soil', i, 'top'], message: `repeats the top of soil[${first}] (${t} m)` });
    });
    const delta = req.excavation.wallFriction;
    const zw = req.excavation.groundwaterDepth;
    const sortedTops = [...tops].sort((a, b) => a - b);
    req.soil.forEach((l, i) => {
      if (req.excavation.pressureState === 'at-rest' && l.undrainedShearStrength !== undefined && l.frictionAngle === undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['soil', i, 'undrainedShearStrength'],
          message: `soil[${i}] (from ${l.top} m) is undrained: at rest needs φ′ (frictionAngle) for every layer; give its drained strength or check it as active`,
        });
      }
      // Below the water table a layer without saturatedUnitWeight weighs its unitWeight: it must not be lighter than water.
      const next = sortedTops.find((t) => t > l.top) ?? Infinity;
      if (l.saturatedUnitWeight === undefined && zw !== null && zw < next && l.unitWeight < GAMMA_WATER) {
        ctx.addIssue({
          code: 'custom',
          path: ['soil', i, 'saturatedUnitWeight'],
          message: `is required for a layer below the water table whose unitWeight (${l.unitWeight} kN/m³) is below that of water, ${GAMMA_WATER} kN/m³`,
        });
      }
      if (l.frictionAngle !== undefined && delta > l.frictionAngle) {
        ctx.addIssue({
          code: 'custom',
          path: ['excavation', 'wallFriction'],
          message: `must not exceed the friction angle of any drained layer (${delta}° > soil[${i}].frictionAngle ${l.frictionAngle}°)`,
        });
      }
    });
  });

/**
 * The engine's request as a stored check keeps it (`request` of each excavation in
 * permit_revisions.check_result), and a stored soil list (excavations.soil): the shape only. The
 * rules above held when it was written; a read checks that the fields are there with their types.
 */
export const storedSoilLayerSchema = z.object({
  top: z.number(),
  unitWeight: z.number(),
  saturatedUnitWeight: z.number().optional(),
  frictionAngle: z.number().optional(),
  cohesion: z.number().optional(),
  undrainedShearStrength: z.number().optional(),
});
const ranLoad = { id: z.string(), offset: z.number() };
export const ranRequestSchema = z.object({
  excavation: z.object({
    depth: z.number(),
    groundwaterDepth: z.number().nullable(),
    designSurcharge: z.number(),
    ratedPressure: z.number().nullable(),
    pressureState: z.enum(['active', 'at-rest']),
    wallFriction: z.number(),
    restraint: z.enum(['unyielding', 'yielding']),
  }),
  soil: z.array(storedSoilLayerSchema),
  method: z.enum(['dispersion-45', 'elastic']),
  minimumClearance: z.number(),
  step: z.number(),
  loads: z.array(
    z.discriminatedUnion('kind', [
      z.object({ id: z.string(), kind: z.literal('blanket'), pressure: z.number() }),
      z.object({ ...ranLoad, kind: z.literal('strip'), pressure: z.number(), width: z.number() }),
      z.object({ ...ranLoad, kind: z.literal('line'), force: z.number() }),
      z.object({ ...ranLoad, kind: z.literal('area'), pressure: z.number(), width: z.number(), length: z.number() }),
      z.object({
        ...ranLoad,
        kind: z.literal('point'),
        force: z.number(),
        padWidth: z.number().optional(),
        padLength: z.number().optional(),
      }),
    ]),
  ),
});
// A stored request is exactly what the engine takes.
const _ranAssignable: (r: z.output<typeof ranRequestSchema>) => CheckRequest = (r) => r;
void _ranAssignable;

export type CalcRequest = z.output<typeof calcRequestSchema>;
// The validated request is exactly what the engine takes.
const _assignable: (r: CalcRequest) => CheckRequest = (r) => r;
void _assignable;

/** `soil[0].frictionAngle` style path. */
export function formatPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const key of path) out += typeof key === 'number' ? `[${key}]` : out === '' ? String(key) : `.${String(key)}`;
  return out;
}

/** One line per wrong field: `path: why`. `prefix` goes before each path (e.g. `[2]` for a list's third request). */
function formatIssues(error: z.ZodError, prefix = ''): string[] {
  const lines: string[] = [];
  for (const issue of error.issues) {
    const at = (extra: PropertyKey[] = []) => {
      const p = formatPath([...issue.path, ...extra]);
      return prefix + (p === '' ? '' : prefix && !p.startsWith('[') ? `.${p}` : p) || '(request)';
    };
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) lines.push(`${at([key])}: is not a known field`);
    } else {
      lines.push(`${at()}: ${issue.message}`);
    }
  }
  return lines;
}

type ParseResult = { ok: true; value: CalcRequest } | { ok: false; errors: string[] };

export function parseCalcRequest(input: unknown, prefix = ''): ParseResult {
  const r = calcRequestSchema.safeParse(input);
  return r.success ? { ok: true, value: r.data } : { ok: false, errors: formatIssues(r.error, prefix) };
}
