/**
 * passesLike must answer as the whole schema does, or not at all: tried with fast-check on loads
 * changed field by field from sound ones, to sound and wrong values alike.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { engineLoadSchema } from './calc';
import { passesLike } from './fieldwise';
import { placedLoadSchema } from './permits';

const ring = [
  [-1.05, 52.37],
  [-1.0499, 52.37],
  [-1.0499, 52.3701],
  [-1.05, 52.37],
];
const soundPlaced = [
  { id: 'exc', kind: 'plant', label: 'Excavator', plantItemId: 5, position: [-1.0486, 52.371], rotation: 90 },
  { id: 'heap', kind: 'stockpile', label: '', outline: { type: 'Polygon', coordinates: [ring] }, unitWeight: 18, height: 2 },
  { id: 'mats', kind: 'area', label: 'Mats', outline: { type: 'Polygon', coordinates: [ring] }, pressure: 12 },
  { id: 'road', kind: 'line', label: '', path: { type: 'LineString', coordinates: ring.slice(0, 2) }, force: 30 },
];
const soundEngine = [
  { id: 'P-1/exc/left', kind: 'area', pressure: 55, width: 0.6, length: 3.6, offset: 1.25 },
  { id: 'P-1/road', kind: 'line', force: 30, offset: 2 },
  { id: 'P-1/crane', kind: 'point', force: 400, offset: 3, padWidth: 1 },
  { id: 'traffic', kind: 'blanket', pressure: 10 },
];

/** Values a field may be changed to: sound ones and every kind of wrong one. */
const anyValue = fc.oneof(
  fc.double({ noDefaultInfinity: false }),
  fc.constantFrom(NaN, -0, 0, -1, 0.001, 359.9, 360, 361, 2000, 2001, 10_000, 10_001, 95, -181, 181),
  fc.integer({ min: -10, max: 10 }),
  fc.string({ maxLength: 3 }),
  fc.constantFrom('', ' ', 'x'.repeat(41), 'x'.repeat(81), 'plant', 'area', 'line', 'point', 'blanket', 'stockpile', 'strip'),
  fc.constantFrom(undefined, null, true, [], {}, [0, 0], [-1.05, 52.37], [200, 0], [NaN, 52], { type: 'Polygon', coordinates: [ring] }),
  fc.tuple(fc.double(), fc.double()),
);

const nudged = (v: unknown, by: number): unknown => (typeof v === 'number' ? v + by : Array.isArray(v) ? v.map((x) => nudged(x, by)) : v);

/** Now and then a value, mostly undefined. */
const seldom = <T>(arb: fc.Arbitrary<T>) => fc.oneof({ weight: 4, arbitrary: fc.constant(undefined) }, { weight: 1, arbitrary: arb });

/** A sound object changed: some fields set anew (its own values among them), some taken away, maybe one added. */
function changedFrom(sound: Record<string, unknown>[]) {
  return fc
    .record({
      like: fc.constantFrom(...sound),
      set: fc.array(
        fc.tuple(
          fc.nat(),
          fc.oneof(
            anyValue.map((v) => ({ v })),
            fc.double({ min: -0.01, max: 0.01, noNaN: true }),
          ),
        ),
        {
          maxLength: 3,
        },
      ),
      drop: seldom(fc.nat()),
      add: seldom(fc.tuple(fc.constantFrom('extra', 'height', 'force', 'kind'), anyValue)),
    })
    .map(({ like, set, drop, add }) => {
      const keys = Object.keys(like);
      const value: Record<string, unknown> = { ...like };
      for (const [k, change] of set) {
        const key = keys[k % keys.length];
        // A bare number nudges the sound value (a move): numbers, and the numbers of a position.
        value[key] = typeof change === 'object' ? change.v : nudged(like[key], change);
      }
      if (drop !== undefined) delete value[keys[drop % keys.length]];
      if (add) value[add[0]] = add[1];
      return { like, value };
    });
}

describe('passesLike: a changed object read by its changed fields', () => {
  for (const [name, schema, sound] of [
    ['a placed load', placedLoadSchema, soundPlaced],
    ['an engine load', engineLoadSchema, soundEngine],
  ] as const) {
    it(`answers as the whole schema does, or not at all, for ${name}`, () => {
      for (const like of sound) expect(schema.safeParse(like).success, JSON.stringify(like)).toBe(true);
      const answered = { yes: 0, no: 0 };
      fc.assert(
        fc.property(changedFrom(sound as unknown as Record<string, unknown>[]), ({ like, value }) => {
          const fast = passesLike(schema, value, like);
          if (fast === undefined) return;
          expect(fast, JSON.stringify(value)).toBe(schema.safeParse(value).success);
          answered[fast ? 'yes' : 'no']++;
        }),
        { numRuns: 3000 },
      );
      // Both answers were given often enough for the comparison above to mean something.
      expect(answered.yes).toBeGreaterThan(100);
      expect(answered.no).toBeGreaterThan(100);
    });
  }

  it('reads only what changed: a field the same as the sound one is not read again', () => {
    const like = soundPlaced[0];
    let reads = 0;
    const counted = z.object({
      id: z.string(),
      kind: z.literal('plant'),
      label: z.string().refine(() => ++reads > 0),
      position: z.tuple([z.number(), z.number()]),
    });
    const { rotation: _r, plantItemId: _p, ...four } = like;
    void _r;
    void _p;
    expect(passesLike(counted, { ...four, position: [1, 2] }, four)).toBe(true);
    expect(reads).toBe(0);
    expect(passesLike(counted, { ...four, label: 'Digger' }, four)).toBe(true);
    expect(reads).toBe(1);
  });

  it('does not answer for a schema with a rule over the whole object, unknown keys read by a schema, or another kind', () => {
    const like = { a: 1, b: 2 };
    const whole = z.object({ a: z.number(), b: z.number() }).refine((o) => o.a < o.b);
    expect(passesLike(whole, { a: 3, b: 2 }, like)).toBe(undefined);
    const loose = z.object({ a: z.number() }).catchall(z.number());
    expect(passesLike(loose, { a: 1, b: 'x' }, like)).toBe(undefined);
    const plain = z.object({ a: z.number(), b: z.number() });
    expect(passesLike(plain, { a: 3, b: 'x' }, like)).toBe(false);
    expect(passesLike(plain, { a: 3, b: 4 }, like)).toBe(true);
    expect(passesLike(placedLoadSchema, { ...soundPlaced[0], kind: 'area' }, soundPlaced[0])).toBe(undefined);
    expect(passesLike(plain, Object.assign(Object.create({ b: 'x' }), { a: 3 }), { a: 1 })).toBe(undefined);
  });
});
