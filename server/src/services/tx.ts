import { CompiledQuery, sql } from 'kysely';
import type PgBoss from 'pg-boss';
import type { Db } from '@db/database';

/**
 * The one way a change and everything it sets in motion commit together. `fn` runs in the caller's
 * transaction when `db` already is one (so a consequence joins its cause), else in a new one. Work
 * that must happen later (an e-mail, a job) is enqueued through `queueConnection(trx)` inside the
 * same transaction: it exists if and only if the change committed.
 *
 * Pass the transaction on as `{ ...deps, db: trx }`: every service that takes `deps` then reads,
 * writes and enqueues inside it.
 */
export async function inTransaction<T>(db: Db, fn: (trx: Db) => Promise<T>): Promise<T> {
  if (db.isTransaction) return fn(db);
  return db.transaction().execute(fn);
}

let savepoints = 0;

/**
 * Runs `fn` inside a savepoint of the transaction `trx`: when it throws, only its own writes are
 * undone (the transaction stays usable) and the error is rethrown. For a consequence that may fail
 * on its own without undoing its cause (one permit among many that could not be suspended).
 */
export async function withSavepoint<T>(trx: Db, fn: () => Promise<T>): Promise<T> {
  if (!trx.isTransaction) return fn();
  const name = sql.id(`brink_sp_${++savepoints}`);
  await sql`savepoint ${name}`.execute(trx);
  try {
    const out = await fn();
    await sql`release savepoint ${name}`.execute(trx);
    return out;
  } catch (err) {
    await sql`rollback to savepoint ${name}`.execute(trx);
    throw err;
  }
}

/** pg-boss's connection interface over a Kysely connection: a job sent through it is part of that transaction. */
export function queueConnection(db: Db): PgBoss.Db {
  return {
    async executeSql(text: string, values: unknown[]) {
      const result = await db.executeQuery(CompiledQuery.raw(text, values ?? []));
      return { rows: result.rows as unknown[] };
    },
  };
}
