import PgBoss from 'pg-boss';
import { createDb, createPool } from '@db/database';
import type { Config } from './config';
import type { Deps } from './deps';
import { Mailer } from './mail/mailer';
import { GeometryPool } from './services/geometry/pool';

export interface Runtime {
  deps: Deps;
  stop(): Promise<void>;
}

/**
 * Connects to PostgreSQL and starts the job queue and the mail worker. `queuePrefix` keeps the
 * queues of several app instances on one database apart (tests run many at once).
 */
export async function startRuntime(config: Config, opts: { now?: () => Date; queuePrefix?: string } = {}): Promise<Runtime> {
  const pool = createPool(config.databaseUrl);
  const db = createDb(pool);
  const boss = new PgBoss({ connectionString: config.databaseUrl, max: 4, schedule: true, supervise: true });
  boss.on('error', (err) => console.error('[jobs]', err.message));
  await boss.start();
  const prefix = opts.queuePrefix ?? 'brink';
  const mailer = new Mailer(boss, db, config, `${prefix}.mail`);
  await mailer.start();
  const geometry = new GeometryPool();
  const deps: Deps = { db, config, mailer, boss, geometry, now: opts.now ?? (() => new Date()) };
  return {
    deps,
    async stop() {
      await geometry.close();
      await boss.stop({ graceful: true, timeout: 5000 });
      await db.destroy();
    },
  };
}
