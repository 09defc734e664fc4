/** PostgreSQL error codes the routes turn into plain answers (see the PostgreSQL manual, appendix A). */
const code = (e: unknown) => (e as { code?: unknown } | null)?.code;

/** 23505: a unique constraint refused the row. */
export const isUniqueViolation = (e: unknown): boolean => code(e) === '23505';

/** 23503: a foreign key still points at the row. */
export const isForeignKeyViolation = (e: unknown): boolean => code(e) === '23503';
