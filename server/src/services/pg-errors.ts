/** PostgreSQL error codes the routes turn into plain answers (see the PostgreSQL manual, appendix A). */
const code = (e: unknown) => (e as { code?: unknown } | null)?.code;

/** 23505: a unique constraint refused the row. */
export const isUniqueViolation = (e: unknown): boolean => code(e) === '23505';

/** 23503: a foreign key still points at the row. */
export const isForeignKeyViolation = (e: unknown): boolean => code(e) === '23503';

/** 22003: a number past its column's type (an id of 2³¹ or more that no schema stopped). */
export const isOutOfRange = (e: unknown): boolean => code(e) === '22003';
