import bcrypt from 'bcryptjs';
import type { Db } from '../database';

/** The password of every demo person: printed by `npm start` and listed in the README. */
import { DEMO_PASSWORD } from '../../shared/demo';

export { DEMO_PASSWORD };

export const demoPeople = [
  { email: 'admin@demo.brink.test', name: 'Ada Marsh (demo administrator)', isAdmin: true, role: null },
  { email: 'coordinator@demo.brink.test', name: 'Colm Ridley (demo coordinator)', isAdmin: false, role: 'coordinator' },
  { email: 'supervisor@demo.brink.test', name: 'Sana Whitlock (demo supervisor)', isAdmin: false, role: 'supervisor' },
  { email: 'operator@demo.brink.test', name: 'Owen Petts (demo operator)', isAdmin: false, role: 'operator' },
] as const;

/** The invented organisation that owns the demo site, its people and its plant library. */
const DEMO_ORGANISATION = 'Marsh & Ridley Civils (demo)';

export interface DemoContext {
  organisationId: number;
  siteId: number;
  people: Record<'admin' | 'coordinator' | 'supervisor' | 'operator', number>;
}

/** The invented demo organisation, its site and its people, one for each role. */
export async function seedSiteAndPeople(db: Db): Promise<DemoContext> {
  const org = await db.insertInto('organisations').values({ name: DEMO_ORGANISATION }).returning('id').executeTakeFirstOrThrow();
  const site = await db
    .insertInto('sites')
    .values({
      organisation_id: org.id,
      name: 'Alder Marsh pumping station',
      latitude: 52.37124,
      longitude: -1.04833,
      timezone: 'Europe/London',
      minimum_clearance: 0.6,
      default_method: 'dispersion-45',
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  const hash = await bcrypt.hash(DEMO_PASSWORD, 10);
  const people = {} as DemoContext['people'];
  for (const p of demoPeople) {
    const u = await db
      .insertInto('users')
      .values({ organisation_id: org.id, email: p.email, name: p.name, password_hash: hash, is_admin: p.isAdmin })
      .returning('id')
      .executeTakeFirstOrThrow();
    people[p.email.split('@')[0] as keyof DemoContext['people']] = u.id;
    if (p.role) {
      await db
        .insertInto('site_members')
        .values({ site_id: site.id, user_id: u.id, role: p.role, can_inspect: p.role !== 'operator' })
        .execute();
    }
  }
  return { organisationId: org.id, siteId: site.id, people };
}
