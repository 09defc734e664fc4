import { sql } from 'kysely';
import type { IncrementResponse, Options, Store } from 'express-rate-limit';
import type { Db } from '@db/database';

/**
 * Counting failures (or requests) per key within a window, in PostgreSQL (`attempt_counts`), so
 * that every Brink server behind a load balancer sees the same counts (docs/scaling.md). Used for
 * limits that need more than express-rate-limit gives: clearing every key of one account at once
 * (a successful reset clears the sign-in locks it offers to clear), and quiet limits that do not
 * change the answer (forgot-password must answer the same for known and unknown addresses).
 *
 * Each count is one atomic upsert: two servers counting the same key at once both count.
 * Time is the app's clock (`now`), so tests that move the clock move the windows too.
 */
export class Throttle {
  constructor(
    private readonly db: Db,
    /** The limit's name in the table, e.g. `brink:sign-in` (the app's namespace first). */
    readonly scope: string,
    readonly limit: number,
    readonly windowMs: number,
    private readonly now: () => number = Date.now,
  ) {}

  /** Whether the key has reached its limit (without counting). */
  async blocked(key: string): Promise<boolean> {
    const row = await this.db
      .selectFrom('attempt_counts')
      .select('count')
      .where('scope', '=', this.scope)
      .where('key', '=', key)
      .where('reset_at', '>', new Date(this.now()))
      .executeTakeFirst();
    return (row?.count ?? 0) >= this.limit;
  }

  /** Counts one for the key; true when it was still within the limit before counting. */
  async hit(key: string): Promise<boolean> {
    return (await this.count(key)).count <= this.limit;
  }

  /** Counts one for the key: the count in the current window (this one included) and when it ends. */
  async count(key: string): Promise<{ count: number; resetAt: Date }> {
    const t = new Date(this.now());
    const until = new Date(t.getTime() + this.windowMs);
    const row = await this.db
      .insertInto('attempt_counts')
      .values({ scope: this.scope, key, count: 1, reset_at: until })
      .onConflict((oc) =>
        oc.columns(['scope', 'key']).doUpdateSet({
          count: sql<number>`case when attempt_counts.reset_at <= ${t} then 1 else attempt_counts.count + 1 end`,
          reset_at: sql<Date>`case when attempt_counts.reset_at <= ${t} then excluded.reset_at else attempt_counts.reset_at end`,
        }),
      )
      .returning(['count', 'reset_at'])
      .executeTakeFirstOrThrow();
    // Now and then, windows that have ended go (one statement, bounded by the index on reset_at).
    if (Math.random() < 0.01) await this.db.deleteFrom('attempt_counts').where('reset_at', '<=', t).execute();
    return { count: row.count, resetAt: new Date(row.reset_at) };
  }

  /** Takes one back (a request that turned out not to count). */
  async uncount(key: string): Promise<void> {
    await this.db
      .updateTable('attempt_counts')
      .set({ count: sql<number>`greatest(count - 1, 0)` })
      .where('scope', '=', this.scope)
      .where('key', '=', key)
      .execute();
  }

  /** Forgets one key. */
  async forget(key: string): Promise<void> {
    await this.db.deleteFrom('attempt_counts').where('scope', '=', this.scope).where('key', '=', key).execute();
  }

  /** Forgets every key that starts with `prefix` (e.g. all addresses of one account). */
  async clear(prefix: string): Promise<void> {
    await this.db
      .deleteFrom('attempt_counts')
      .where('scope', '=', this.scope)
      .where(sql<boolean>`starts_with(key, ${prefix})`)
      .execute();
  }
}

/**
 * An express-rate-limit store on a Throttle: the middleware's limits counted in PostgreSQL like the
 * others (`localKeys: false`: every server shares them).
 */
export class ThrottleStore implements Store {
  readonly localKeys = false;
  constructor(private readonly throttle: Throttle) {}

  init(options: Options): void {
    if (options.windowMs !== this.throttle.windowMs)
      throw new Error(`ThrottleStore: windowMs ${options.windowMs} ≠ the throttle's ${this.throttle.windowMs}`);
  }

  async increment(key: string): Promise<IncrementResponse> {
    const { count, resetAt } = await this.throttle.count(key);
    return { totalHits: count, resetTime: resetAt };
  }

  async decrement(key: string): Promise<void> {
    await this.throttle.uncount(key);
  }

  async resetKey(key: string): Promise<void> {
    await this.throttle.forget(key);
  }
}
