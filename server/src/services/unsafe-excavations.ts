import type { Db } from '@db/database';

/**
 * The references of those excavations whose latest inspection (at or before `now`) found them not
 * safe. No permit on them may go live or resume until a later inspection is safe. Kept apart from
 * services/inspections.ts, which itself calls the permit transitions.
 */
export async function unsafeExcavations(db: Db, excavationIds: number[], now: Date): Promise<string[]> {
  if (excavationIds.length === 0) return [];
  const latest = await db
    .selectFrom('inspections')
    .innerJoin('excavations', 'excavations.id', 'inspections.excavation_id')
    .distinctOn('inspections.excavation_id')
    .select(['inspections.excavation_id', 'inspections.outcome', 'excavations.reference'])
    .where('inspections.excavation_id', 'in', excavationIds)
    .where('inspections.inspected_at', '<=', now)
    .orderBy('inspections.excavation_id')
    .orderBy('inspections.inspected_at', 'desc')
    .orderBy('inspections.id', 'desc')
    .execute();
  return latest.filter((r) => r.outcome === 'not-safe').map((r) => r.reference);
}
