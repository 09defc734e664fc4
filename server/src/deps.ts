import type PgBoss from 'pg-boss';
import type { Db } from '@db/database';
import type { Config } from './config';
import type { Mailer } from './mail/mailer';

/** What every route and service is given: no globals. */
export interface Deps {
  db: Db;
  config: Config;
  mailer: Mailer;
  boss: PgBoss;
  /** The time now; tests inject their own clock. */
  now: () => Date;
}
