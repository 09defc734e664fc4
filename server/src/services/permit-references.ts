import { sql } from 'kysely';
import type { Db } from '@db/database';

/**
 * Numbers of the permits (any revision, any status) that name an excavation or place a machine from
 * the library. Such a record stays: permits are kept with what they were checked against. An
 * excavation's are looked for on its own site only (`siteId`); a machine's, with `visibleTo`, on
 * the sites that person can see: an answer never names permits of a site the caller cannot see.
 */
export async function permitsReferring(
  db: Db,
  ref: { excavationId: number; siteId: number } | { plantItemId: number; visibleTo?: { id: number; isAdmin: boolean } },
): Promise<string[]> {
  const where =
    'excavationId' in ref
      ? sql`${ref.excavationId} = any(r.excavation_ids)`
      : sql`r.loads @> ${JSON.stringify([{ plantItemId: ref.plantItemId }])}::jsonb`;
  const { rows } = await sql<{ number: string }>`
    select distinct p.number from permit_revisions r join permits p on p.id = r.permit_id
    where ${where} ${
      'siteId' in ref
        ? sql`and p.site_id = ${ref.siteId}`
        : ref.visibleTo && !ref.visibleTo.isAdmin
          ? sql`and p.site_id in (select site_id from site_members where user_id = ${ref.visibleTo.id})`
          : sql``
    } order by p.number limit 6`.execute(db);
  return rows.map((r) => r.number);
}

/** "P-0003, P-0007 and others" for a message. */
export function listNumbers(numbers: string[]): string {
  return numbers.length > 5 ? `${numbers.slice(0, 5).join(', ')} and others` : numbers.join(', ');
}
