import { sql } from 'kysely';
import type { Db } from '@db/database';

/**
 * Numbers of the permits (any revision, any status) that name an excavation or place a machine from
 * the library. Such a record stays: permits are kept with what they were checked against.
 */
export async function permitsReferring(db: Db, ref: { excavationId: number } | { plantItemId: number }): Promise<string[]> {
  const where =
    'excavationId' in ref
      ? sql`${ref.excavationId} = any(r.excavation_ids)`
      : sql`r.loads @> ${JSON.stringify([{ plantItemId: ref.plantItemId }])}::jsonb`;
  const { rows } = await sql<{ number: string }>`
    select distinct p.number from permit_revisions r join permits p on p.id = r.permit_id
    where ${where} order by p.number limit 6`.execute(db);
  return rows.map((r) => r.number);
}

/** "P-0003, P-0007 and others" for a message. */
export function listNumbers(numbers: string[]): string {
  return numbers.length > 5 ? `${numbers.slice(0, 5).join(', ')} and others` : numbers.join(', ');
}
