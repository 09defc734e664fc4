import type { Db } from '@db/database';
import type { UnitSystem } from '@shared/units';

/**
 * The units a person reads a site's figures in (docs/calculation.md, "Units"): their own choice, else
 * the site's default, else metric. The same rule as the screens (client/src/lib/units.ts, `useUnits`),
 * for what the server writes: e-mails, the printed permit, the inspection report, refusals.
 */
export async function unitsOf(db: Db, userId: number | null, siteId: number): Promise<UnitSystem> {
  const row = await db
    .selectFrom('sites as s')
    .leftJoin('users as u', (j) => j.on('u.id', '=', userId ?? 0))
    .select(['s.units as site', 'u.units as own'])
    .where('s.id', '=', siteId)
    .executeTakeFirst();
  return row?.own ?? row?.site ?? 'metric';
}
