import type { Db } from '../database';
import { seedSiteAndPeople, type DemoContext } from './people';
import { seedExcavations } from './excavations';
import { seedPlant } from './plant';
import { seedPermits } from './permits';
import { seedInspections } from './inspections';

/**
 * Seed steps run in order, each given what the earlier ones made. A feature that brings demo
 * data adds its step here.
 */
const steps: ((db: Db, ctx: DemoContext) => Promise<void>)[] = [seedPlant, seedExcavations, seedPermits, seedInspections];

/** Seeds the invented demo site when the database has nobody in it. Returns whether it seeded. */
export async function seedDemoIfEmpty(db: Db): Promise<boolean> {
  const any = await db.selectFrom('users').select('id').limit(1).executeTakeFirst();
  if (any) return false;
  await db.transaction().execute(async (trx) => {
    const ctx = await seedSiteAndPeople(trx);
    for (const step of steps) await step(trx, ctx);
  });
  return true;
}
