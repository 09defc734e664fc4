import { Migrator, type MigrationProvider } from 'kysely';
import type { Db } from './database';
import { migrations } from './migrations/index';

const provider: MigrationProvider = { getMigrations: async () => migrations };

/** Brings the database up to the newest migration in db/migrations/index.ts. */
export async function migrateToLatest(db: Db): Promise<string[]> {
  const { error, results } = await new Migrator({ db, provider }).migrateToLatest();
  if (error) throw error;
  return (results ?? []).filter((r) => r.status === 'Success').map((r) => r.migrationName);
}
