import { badRequest } from '../http';

/**
 * Keyset pages (issue 16 §1): a list answers a page and `next`, the cursor of the page after it,
 * which carries the list it belongs to (its scope: the list, the organisation or site, and the sort),
 * the last row's sort key (as PostgreSQL prints it, so a timestamp keeps its microseconds) and id.
 * Opaque to clients: base64url of a JSON array. A cursor of another list, another organisation or
 * another sort, or one whose key is not of the sort's kind, is refused (400 naming `cursor`) before
 * any SQL sees it; a well-formed one only ever moves within the caller's own list (the scope is in
 * the query's own filters), so it needs no signature.
 */

/** The kind of a list's sort key, checked before it is cast back in SQL. */
type KeyKind = 'integer' | 'text' | 'timestamptz';

const keyShapes: Record<KeyKind, RegExp> = {
  integer: /^-?\d{1,10}$/,
  text: /^[\s\S]{0,300}$/,
  // PostgreSQL's text of a timestamptz: 2026-12-03 13:35:32.123456+00 (or +05:30).
  timestamptz: /^\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2}(\.\d{1,6})?[+-]\d{2}(:\d{2}){0,2}$/,
};

function encodeCursor(scope: string, key: string, id: number): string {
  return Buffer.from(JSON.stringify([scope, key, id])).toString('base64url');
}

/** The sort key and id of a cursor this list gave in this scope; anything else is refused (400 naming `cursor`). */
export function decodeCursor(cursor: string, scope: string, kind: KeyKind): [string, number] {
  try {
    const v: unknown = JSON.parse(Buffer.from(cursor, 'base64url').toString());
    if (
      Array.isArray(v) &&
      v.length === 3 &&
      v[0] === scope &&
      typeof v[1] === 'string' &&
      keyShapes[kind].test(v[1]) &&
      Number.isInteger(v[2]) &&
      (v[2] as number) > 0 &&
      (v[2] as number) <= 2_147_483_647
    )
      return [v[1], v[2] as number];
  } catch {
    // not JSON: refused below
  }
  throw badRequest('That page of the list cannot be found: start from the first page.', { cursor: 'is not a cursor this list gave' });
}

/** The page of `rows` (fetched with one more than `limit`) and the cursor after it in `scope`, or null on the last page. */
export function pageOf<R extends { id: number }>(
  rows: R[],
  limit: number,
  key: (r: R) => string,
  scope: string,
): { page: R[]; next: string | null } {
  const page = rows.slice(0, limit);
  const last = page.at(-1);
  return { page, next: rows.length > limit && last ? encodeCursor(scope, key(last), last.id) : null };
}
