import type PgBoss from 'pg-boss';
import type { Db } from '@db/database';
import type { Config } from './config';
import type { FileStore } from './files/store';
import type { Mailer } from './mail/mailer';
import type { Pusher } from './push/pusher';
import type { GeometryPool } from './services/geometry/pool';

/** What every route and service is given: no globals. */
export interface Deps {
  db: Db;
  config: Config;
  mailer: Mailer;
  /** Web Push notifications to people's devices (queued like the mail). */
  pusher: Pusher;
  boss: PgBoss;
  /** Uploaded files (disk or S3: server/src/files/store.ts). */
  files: FileStore;
  /** Worker threads for geometry that can take long (influence zones). */
  geometry: GeometryPool;
  /**
   * Keeps the job queues and attempt counts of several Brinks on one database apart: `brink` for an
   * installation (all its servers share them); each test app has its own.
   */
  namespace: string;
  /** The time now; tests inject their own clock. */
  now: () => Date;
}
