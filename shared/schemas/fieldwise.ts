/**
 * Reading a changed object again by its changed fields alone. A frame of a drag on the placing map
 * moves one load: its position (or outline, or path) is new and every other field is the one found
 * valid a frame earlier. In the browser zod cannot compile its parsers (the Content-Security-Policy
 * refuses `eval`), and reading whole loads again through its interpreter was a third or more of a
 * frame's check. Here each changed field is read by its own schema, taken from the object schema,
 * so no rule is written twice.
 */
import type { z } from 'zod';

type Fields = Record<string, unknown>;
/** What this reads of zod's own description of a schema (zod 4's `_zod.def` and `_zod.propValues`). */
interface Inner {
  _zod: {
    def: {
      type: string;
      checks?: unknown[];
      shape?: Record<string, z.ZodType>;
      catchall?: Inner;
      options?: Inner[];
      discriminator?: string;
    };
    propValues?: Record<string, Set<unknown>>;
  };
}

/**
 * Whether `value` passes `schema`, given `like`: an object that passed the same schema. Only the
 * fields whose values are not the very ones of `like` are read, each by its field's schema.
 *
 * That answers exactly as `schema.safeParse(value).success` when the object's validity is the
 * validity of each field alone: `schema` is an object, or a discriminated union of objects picked by
 * the same discriminator value as `like`'s, with no rule of its own on the whole (a refinement reads
 * fields together), with unknown keys stripped or refused (not read by a schema), and `value` has
 * exactly the keys of `like`. Otherwise it answers undefined: read the whole value. `like` must not
 * change after it passed: keep a copy, or a frozen object.
 */
export function passesLike(schema: z.ZodType, value: unknown, like: object): boolean | undefined {
  if (!plainObject(value) || !plainObject(like)) return undefined;
  const object = objectFor(schema as unknown as Inner, value as Fields, like);
  const shape = object?._zod.def.shape;
  if (!shape) return undefined;
  const keys = Object.keys(value);
  if (keys.length !== Object.keys(like).length) return undefined;
  for (const k of keys) if (!Object.hasOwn(like, k) || !Object.hasOwn(shape, k)) return undefined;
  for (const k of keys) {
    const v = (value as Fields)[k];
    if (v !== (like as Fields)[k] && !shape[k].safeParse(v).success) return false;
  }
  return true;
}

/** An object as JSON makes it (zod reads a field through the prototype too, so nothing may come from there). */
function plainObject(v: unknown): v is Fields {
  if (typeof v !== 'object' || v === null) return false;
  const proto = Object.getPrototypeOf(v);
  return proto === Object.prototype || proto === null;
}

/** The object schema that reads `value` (and read `like`), when its validity is that of its fields. */
function objectFor(schema: Inner, value: Fields, like: Fields): Inner | undefined {
  const def = schema._zod.def;
  if (def.checks?.length) return undefined;
  if (def.type === 'object') {
    const catchall = def.catchall?._zod.def.type;
    return catchall === undefined || catchall === 'never' ? schema : undefined;
  }
  if (def.type !== 'union' || !def.discriminator || !def.options) return undefined;
  const key = def.discriminator;
  if (value[key] !== like[key]) return undefined;
  const matching = def.options.filter((o) => o._zod.propValues?.[key]?.has(value[key]));
  return matching.length === 1 ? objectFor(matching[0], value, like) : undefined;
}
