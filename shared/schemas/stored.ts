import type { z } from 'zod';

/**
 * A jsonb value as the database gives it back: stored by this Brink or an older one, so not to be
 * trusted until parsed (`readStored`). The column's type names the shape it should have (from
 * shared/); the brand keeps a read from being used, or cast, without the parse.
 */
declare const storedShape: unique symbol;
export interface Stored<T> {
  readonly [storedShape]: T;
}

/** A stored jsonb value that does not have the shape Brink reads: names what and where. */
export class StoredShapeError extends Error {
  constructor(
    readonly what: string,
    readonly issues: string[],
  ) {
    super(`A stored ${what} does not have the shape Brink reads: ${issues.join('; ')}`);
  }
}

/**
 * Parses a stored jsonb value with its shared schema (which accepts, explicitly, the older shapes
 * rows really have); a shape that drifted throws StoredShapeError naming the path of each field.
 */
export function readStored<S extends z.ZodType>(what: string, schema: S, value: Stored<z.output<S>>): z.output<S> {
  const r = schema.safeParse(value);
  if (!r.success)
    throw new StoredShapeError(
      what,
      r.error.issues.map((i) => `${i.path.join('.') || '(value)'} ${i.message}`),
    );
  return r.data;
}

/** The same for a column that may be null (null stays null). */
export function readStoredOrNull<S extends z.ZodType>(what: string, schema: S, value: Stored<z.output<S>> | null): z.output<S> | null {
  return value === null ? null : readStored(what, schema, value);
}
