/**
 * Counting failures (or requests) per key within a window, in memory, for limits that need more
 * than express-rate-limit gives: clearing every key of one account at once (a successful reset
 * clears the sign-in locks it offers to clear), and quiet limits that do not change the answer
 * (forgot-password must answer the same for known and unknown addresses).
 */
export class Throttle {
  private hits = new Map<string, { count: number; until: number }>();

  constructor(
    readonly limit: number,
    readonly windowMs: number,
    private readonly now: () => number = Date.now,
  ) {}

  /** Whether the key has reached its limit (without counting). */
  blocked(key: string): boolean {
    const h = this.hits.get(key);
    if (!h || h.until <= this.now()) return false;
    return h.count >= this.limit;
  }

  /** Counts one for the key; true when it was still within the limit before counting. */
  hit(key: string): boolean {
    const t = this.now();
    let h = this.hits.get(key);
    if (!h || h.until <= t) {
      h = { count: 0, until: t + this.windowMs };
      this.hits.set(key, h);
    }
    h.count += 1;
    if (this.hits.size > 10_000) this.sweep(t);
    return h.count <= this.limit;
  }

  /** Forgets every key that starts with `prefix` (e.g. all addresses of one account). */
  clear(prefix: string): void {
    for (const k of this.hits.keys()) if (k.startsWith(prefix)) this.hits.delete(k);
  }

  private sweep(t: number): void {
    for (const [k, h] of this.hits) if (h.until <= t) this.hits.delete(k);
  }
}
