import PgBoss from 'pg-boss';
import { createDb, createPool, isDatabaseUnavailable } from '@db/database';
import type { Config } from './config';
import type { Deps } from './deps';
import { Mailer } from './mail/mailer';
import { Pusher } from './push/pusher';
import { loadOrMakeVapidKeys } from './push/keys';
import { GeometryPool } from './services/geometry/pool';
import { createFileStore } from './files/store';

export interface Runtime {
  deps: Deps;
  stop(): Promise<void>;
}

/**
 * Connects to PostgreSQL and starts the job queue, the mail worker and the push worker. `queuePrefix` keeps the
 * queues of several app instances on one database apart (tests run many at once).
 */
export async function startRuntime(config: Config, opts: { now?: () => Date; queuePrefix?: string } = {}): Promise<Runtime> {
  const pool = createPool(config.databaseUrl, 10, { name: 'db' });
  const db = createDb(pool);
  // The upload store first: a bucket that cannot be reached stops the start with its reason.
  const files = createFileStore(config);
  await files.ready();
  // Handed to pg-boss's own pg.Pool (its types do not list pg's options).
  const connectTimeout = { connectionTimeoutMillis: 5000 } as object;
  // Maintenance every 20 s (pg-boss's default: 2 min): a job left active by a server that died
  // is expired and retried soon after its expiry (30 s for e-mail) instead of minutes later.
  const boss = new PgBoss({
    connectionString: config.databaseUrl,
    max: 4,
    schedule: true,
    supervise: true,
    maintenanceIntervalSeconds: 20,
    ...connectTimeout,
  });
  // While PostgreSQL is down every poll fails: one line per outage burst, not one per poll. The
  // workers keep polling and pick up where they were when it is back.
  let quietUntil = 0;
  boss.on('error', (err) => {
    if (isDatabaseUnavailable(err)) {
      if (Date.now() < quietUntil) return;
      quietUntil = Date.now() + 10_000;
    }
    console.error('[jobs]', err.message);
  });
  await boss.start();
  const prefix = opts.queuePrefix ?? 'brink';
  const mailer = new Mailer(boss, db, config, `${prefix}.mail`);
  await mailer.start();
  const pusher = new Pusher(boss, db, config, `${prefix}.push`, loadOrMakeVapidKeys(config.push.keysFile));
  await pusher.start();
  const geometry = new GeometryPool();
  const deps: Deps = { db, config, mailer, pusher, boss, files, geometry, namespace: prefix, now: opts.now ?? (() => new Date()) };
  return {
    deps,
    async stop() {
      await geometry.close();
      await boss.stop({ graceful: true, timeout: 5000 });
      await db.destroy();
    },
  };
}
