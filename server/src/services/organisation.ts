import { sql } from 'kysely';
import type { Db } from '@db/database';
import { notFound } from '../http';
import type { Deps } from '../deps';
import { INVITATION_HOURS, newToken } from './tokens';

/**
 * Organisations (issue 16 §1): an installation holds many; each owns its people, sites, invitations
 * and plant library, and nothing of one is visible to another. The scope is kept here and in the
 * site guard (`authorise` in http.ts, which finds a site only within the person's organisation):
 * - `ownedPath` (a route's `beforeBody`) or `ownOnly` before a route touches a record by id: a
 *   record of another organisation answers 404, as one that does not exist, so ids tell nothing;
 * - every list of an owned table filters on `organisation_id` (loadPeople, loadPlant, the sites and
 *   the permits lists).
 */
type OwnedTable = 'users' | 'sites' | 'invitations' | 'plant_items';

/** Whose organisation: the signed-in person (SessionUser), or an organisation id. */
export type Scope = { organisationId: number };

/** 404 naming `what` unless every id is a row of `table` in the scope's organisation. */
async function ownOnly(db: Db, scope: Scope, table: OwnedTable, ids: number | readonly number[], what: string): Promise<void> {
  const wanted = [...new Set(typeof ids === 'number' ? [ids] : ids)];
  if (wanted.length === 0) return;
  const { rows } = await sql<{ n: number }>`
    select count(*)::int as n from ${sql.table(table)}
    where id = any(${wanted}::int[]) and organisation_id = ${scope.organisationId}`.execute(db);
  if (rows[0].n !== wanted.length) throw notFound(what);
}

/** The ids among `ids` that are rows of `table` in the scope's organisation (for refusals that name each field). */
export async function ownIds(db: Db, scope: Scope, table: OwnedTable, ids: readonly number[]): Promise<Set<number>> {
  if (ids.length === 0) return new Set();
  const { rows } = await sql<{ id: number }>`
    select id from ${sql.table(table)} where id = any(${[...ids]}::int[]) and organisation_id = ${scope.organisationId}`.execute(db);
  return new Set(rows.map((r) => r.id));
}

/** The organisation a site belongs to (null: no such site). */
export async function organisationOfSite(db: Db, siteId: number): Promise<Scope | null> {
  const r = await db.selectFrom('sites').select('organisation_id').where('id', '=', siteId).executeTakeFirst();
  return r ? { organisationId: r.organisation_id } : null;
}

/**
 * A route's `beforeBody` rule: each path parameter named belongs to the caller's organisation, else
 * 404 naming it. Runs after the access rule and before the body is read, so neither a bad body nor
 * the answer tells whether the other organisation's record exists.
 */
export const ownedPath =
  (...checks: [param: string, table: OwnedTable, what: string][]) =>
  async ({ params, user, deps }: { params: Record<string, number>; user: Scope; deps: Deps }): Promise<void> => {
    for (const [param, table, what] of checks) await ownOnly(deps.db, user, table, params[param], what);
  };

/**
 * A new organisation and the invitation of its first administrator (the installation operator's
 * command, server/src/cli/organisation.ts). Refuses a name already taken and an address that
 * already has an account. Returns the invitation's link, which works once, for INVITATION_HOURS.
 */
export async function createOrganisation(
  db: Db,
  o: { name: string; adminEmail: string; adminName: string; publicUrl: string; now: Date },
): Promise<{ organisationId: number; link: string }> {
  const { token, hash } = newToken();
  return db.transaction().execute(async (trx) => {
    const taken = await trx.selectFrom('organisations').select('id').where('name', '=', o.name).executeTakeFirst();
    if (taken) throw new Error(`An organisation called "${o.name}" already exists.`);
    const person = await trx.selectFrom('users').select('id').where('email', '=', o.adminEmail).executeTakeFirst();
    if (person) throw new Error(`${o.adminEmail} already has an account; a person belongs to one organisation.`);
    const org = await trx.insertInto('organisations').values({ name: o.name }).returning('id').executeTakeFirstOrThrow();
    await trx
      .insertInto('invitations')
      .values({
        organisation_id: org.id,
        email: o.adminEmail,
        name: o.adminName,
        is_admin: true,
        token_hash: hash,
        invited_by: null,
        expires_at: new Date(o.now.getTime() + INVITATION_HOURS * 3600_000),
      })
      .execute();
    return { organisationId: org.id, link: `${o.publicUrl}/invitations/accept?token=${token}` };
  });
}
