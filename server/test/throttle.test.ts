import { randomUUID } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { createDb, createPool } from '@db/database';
import { Throttle } from '../src/services/throttle';

// The attempt limits live in PostgreSQL: two throttles on one scope stand for two servers.
const db = createDb(createPool(process.env.DATABASE_URL!, 4));
afterAll(() => db.destroy());

describe('attempt counts in PostgreSQL', () => {
  const scope = `test-${randomUUID()}`;

  it('a limit reached through one server holds on another, and counting at once loses no count', async () => {
    const clock = { t: Date.parse('2026-12-03T08:00:00Z') };
    const one = new Throttle(db, scope, 5, 60_000, () => clock.t);
    const two = new Throttle(db, scope, 5, 60_000, () => clock.t);
    const within = await Promise.all(Array.from({ length: 12 }, (_, i) => (i % 2 ? one : two).hit('a@example.test|')));
    // 12 counted at once: exactly 5 were within the limit, none lost to a race.
    expect(within.filter(Boolean)).toHaveLength(5);
    expect((await two.count('a@example.test|')).count).toBe(13);
    expect(await one.blocked('a@example.test|')).toBe(true);
    expect(await two.blocked('b@example.test|')).toBe(false);
    // The window ends: the count starts again.
    clock.t += 60_000;
    expect(await one.blocked('a@example.test|')).toBe(false);
    expect(await two.hit('a@example.test|')).toBe(true);
    expect((await one.count('a@example.test|')).count).toBe(2);
  });

  it('clears every key of one account at once, and no other', async () => {
    const t = new Throttle(db, scope, 1, 60_000);
    await t.hit('c@example.test|10.0.0.1');
    await t.hit('c@example.test|10.0.0.1');
    await t.hit('c@example.test|*');
    await t.hit('cd@example.test|*');
    await t.hit('cd@example.test|*');
    await new Throttle(db, scope, 1, 60_000).clear('c@example.test|');
    expect(await t.blocked('c@example.test|10.0.0.1')).toBe(false);
    expect(await t.blocked('cd@example.test|*')).toBe(true);
  });
});
