import type { Db } from '@db/database';
import { localizeWords, type UnitSystem } from '@shared/units';
import { HttpError } from '../http';

/**
 * The units a person reads a site's figures in (docs/calculation.md, "Units"): their own choice, else
 * the site's default, else metric. The same rule as the screens (client/src/lib/units.ts, `useUnits`),
 * for what the server writes: e-mails, the printed permit, the inspection report, refusals.
 */
export async function unitsOf(db: Db, userId: number | null, siteId: number | null): Promise<UnitSystem> {
  if (siteId === null) {
    // No site in question (an account's own page): the person's own choice, else metric.
    const own = userId === null ? undefined : await db.selectFrom('users').select('units').where('id', '=', userId).executeTakeFirst();
    return own?.units ?? 'metric';
  }
  const row = await db
    .selectFrom('sites as s')
    .leftJoin('users as u', (j) => j.on('u.id', '=', userId ?? 0))
    .select(['s.units as site', 'u.units as own'])
    .where('s.id', '=', siteId)
    .executeTakeFirst();
  return row?.own ?? row?.site ?? 'metric';
}

/**
 * A refusal (HttpError) as its reader reads it: the message and each field's reason restated in the
 * units of the person who asked (their own, else the site's the route is about), limits on their safe
 * side (`localizeWords`). Every route's refusals pass through here (http.ts, Api.route), so that a
 * validation limit, a conflict or an import report written in SI reaches a US reader in feet and pounds.
 */
export async function refusalInReaderUnits(db: Db, err: HttpError, userId: number | null, siteId: number | null): Promise<HttpError> {
  const texts = [err.message, ...Object.values(err.fields ?? {})];
  if (userId === null || !texts.some((t) => localizeWords(t, 'us') !== t)) return err;
  const units = await unitsOf(db, userId, siteId);
  if (units === 'metric') return err;
  return new HttpError(err.status, err.code, localizeWords(err.message, units), reasonsIn(err.fields, units));
}

/** Reasons by field (a refusal's, an import report's) restated in `units`. */
export function reasonsIn<T extends Record<string, string> | undefined>(reasons: T, units: UnitSystem): T {
  return (reasons && Object.fromEntries(Object.entries(reasons).map(([k, v]) => [k, localizeWords(v, units)]))) as T;
}
