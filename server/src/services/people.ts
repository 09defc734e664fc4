import { sql } from 'kysely';
import type { Db } from '@db/database';
import { HttpError } from '../http';
import type { Me } from '@shared/schemas/auth';
import type { Person } from '@shared/schemas/sites';
import type { Scope } from './organisation';
import { decodeCursor, pageOf } from './cursor';
import { containsPattern } from './search';

type PersonRow = { id: number; email: string; name: string; is_admin: boolean; active: boolean };

const peopleQuery = (db: Db) => db.selectFrom('users').select(['id', 'email', 'name', 'is_admin', 'active']);

/** People with their site roles, as the API shows them: those `ids` names. */
export async function loadPeople(db: Db, ids: number[]): Promise<Person[]> {
  if (ids.length === 0) return [];
  return withMemberships(db, await peopleQuery(db).where('id', 'in', ids).orderBy('name').execute());
}

/**
 * A page of an organisation's people by name (then id), with their site roles, and the cursor of
 * the next page (index users_organisation_name, migration 0016); with `q`, only those whose name or
 * e-mail address holds it. The cursor carries the search, so it cannot be followed under another.
 */
export async function loadPeoplePage(
  db: Db,
  scope: Scope,
  q: { limit: number; cursor?: string; q?: string },
): Promise<{ users: Person[]; next: string | null; counts: { active: number; total: number } }> {
  const search = q.q ?? '';
  const listScope = `users:${scope.organisationId}:${search}`;
  let query = peopleQuery(db).where('organisation_id', '=', scope.organisationId);
  if (search) {
    const like = containsPattern(search);
    query = query.where((eb) => eb.or([eb('name', 'ilike', like), eb('email', 'ilike', like)]));
  }
  if (q.cursor) {
    const [name, id] = decodeCursor(q.cursor, listScope, 'text');
    query = query.where(sql<boolean>`(name, id) > (${name}, ${id})`);
  }
  const rows = await query
    .orderBy('name')
    .orderBy('id')
    .limit(q.limit + 1)
    .execute();
  const { page, next } = pageOf(rows, q.limit, (r) => r.name, listScope);
  const counts = await db
    .selectFrom('users')
    .select([sql<number>`count(*) filter (where active)::int`.as('active'), sql<number>`count(*)::int`.as('total')])
    .where('organisation_id', '=', scope.organisationId)
    .executeTakeFirstOrThrow();
  return { users: await withMemberships(db, page), next, counts };
}

async function withMemberships(db: Db, users: PersonRow[]): Promise<Person[]> {
  if (users.length === 0) return [];
  const members = await db
    .selectFrom('site_members')
    .innerJoin('sites', 'sites.id', 'site_members.site_id')
    .select(['site_members.user_id', 'site_members.site_id', 'sites.name', 'site_members.role', 'site_members.can_inspect'])
    .where(
      'site_members.user_id',
      'in',
      users.map((u) => u.id),
    )
    .orderBy('sites.name')
    .execute();
  return users.map((u) => ({
    id: u.id,
    email: u.email,
    name: u.name,
    isAdmin: u.is_admin,
    active: u.active,
    memberships: members
      .filter((m) => m.user_id === u.id)
      .map((m) => ({ siteId: m.site_id, siteName: m.name, role: m.role, canInspect: m.can_inspect })),
  }));
}

/** The signed-in person with their site roles; one who is gone or deactivated meanwhile is signed out (401). */
export async function loadMe(db: Db, id: number): Promise<Me> {
  const [[p], own] = await Promise.all([
    loadPeople(db, [id]),
    db
      .selectFrom('users')
      .innerJoin('organisations', 'organisations.id', 'users.organisation_id')
      .select(['users.units', 'organisations.id as organisationId', 'organisations.name as organisationName'])
      .where('users.id', '=', id)
      .executeTakeFirst(),
  ]);
  if (!p || !p.active || !own) throw new HttpError(401, 'signed_out', 'Please sign in.');
  return {
    id: p.id,
    email: p.email,
    name: p.name,
    isAdmin: p.isAdmin,
    organisation: { id: own.organisationId, name: own.organisationName },
    units: own.units,
    memberships: p.memberships,
  };
}

/** Ends every session of a person (after a password reset or deactivation). */
export async function endSessionsOf(db: Db, userId: number): Promise<void> {
  await sql`delete from "session" where ("sess"->>'userId')::int = ${userId}`.execute(db);
}

/** Every unused password reset link of the person stops working. */
export async function revokeResets(db: Db, userId: number, now: Date): Promise<void> {
  await db.updateTable('password_resets').set({ used_at: now }).where('user_id', '=', userId).where('used_at', 'is', null).execute();
}

/** A deactivated person keeps no way in: their sessions, reset links and pending invitations end. */
export async function revokeAccess(db: Db, userId: number, now: Date): Promise<void> {
  await endSessionsOf(db, userId);
  await revokeResets(db, userId, now);
  const u = await db.selectFrom('users').select('email').where('id', '=', userId).executeTakeFirst();
  if (u) await db.updateTable('invitations').set({ used_at: now }).where('email', '=', u.email).where('used_at', 'is', null).execute();
}
