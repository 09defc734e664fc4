import { badRequest } from '../http';

/**
 * Keyset pages (issue 16 §1): a list answers a page and `next`, the cursor of the page after it,
 * which carries the last row's sort key (as PostgreSQL prints it, so a timestamp keeps its
 * microseconds) and id. Opaque to clients: base64url of a JSON array.
 */
function encodeCursor(key: string, id: number): string {
  return Buffer.from(JSON.stringify([key, id])).toString('base64url');
}

/** The sort key and id of a cursor this server gave; anything else is refused (400 naming `cursor`). */
export function decodeCursor(cursor: string): [string, number] {
  try {
    const v: unknown = JSON.parse(Buffer.from(cursor, 'base64url').toString());
    if (Array.isArray(v) && v.length === 2 && typeof v[0] === 'string' && Number.isInteger(v[1])) return [v[0], v[1] as number];
  } catch {
    // not JSON: refused below
  }
  throw badRequest('That page of the list cannot be found: start from the first page.', { cursor: 'is not a cursor this list gave' });
}

/** The page of `rows` (fetched with one more than `limit`) and the cursor after it, or null on the last page. */
export function pageOf<R extends { id: number }>(rows: R[], limit: number, key: (r: R) => string): { page: R[]; next: string | null } {
  const page = rows.slice(0, limit);
  const last = page.at(-1);
  return { page, next: rows.length > limit && last ? encodeCursor(key(last), last.id) : null };
}
