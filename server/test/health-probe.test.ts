import { describe, expect, it } from 'vitest';
import { databaseProbe, PING_FRESH_MS } from '../src/routes/system';

describe('the database probe behind /api/health', () => {
  it('shares one ping among concurrent requests and reuses its answer for up to a second', async () => {
    let pings = 0;
    let release!: () => void;
    let now = 0;
    const probe = databaseProbe(
      () => {
        pings++;
        return new Promise<void>((r) => (release = r));
      },
      () => now,
    );
    const answers = [probe(), probe(), probe()];
    expect(pings).toBe(1);
    release();
    expect(await Promise.all(answers)).toEqual([true, true, true]);
    now += PING_FRESH_MS - 1;
    expect(await probe()).toBe(true);
    expect(pings).toBe(1);
    now += 1;
    const again = probe();
    expect(pings).toBe(2);
    release();
    expect(await again).toBe(true);
  });

  it('answers false while the ping fails, and true again once it answers', async () => {
    let up = false;
    let now = 0;
    const probe = databaseProbe(
      () => (up ? Promise.resolve() : Promise.reject(new Error('connection refused'))),
      () => now,
    );
    expect(await probe()).toBe(false);
    up = true;
    expect(await probe()).toBe(false); // the failed answer stands for its second
    now += PING_FRESH_MS;
    expect(await probe()).toBe(true);
  });

  it('pings again at once when a pooled connection was lost since the last answer', async () => {
    let up = true;
    let lost = 0;
    const probe = databaseProbe(
      () => (up ? Promise.resolve() : Promise.reject(new Error('terminating connection'))),
      () => 0,
      () => lost,
    );
    expect(await probe()).toBe(true);
    up = false;
    expect(await probe()).toBe(true); // within the second, nothing noticed yet
    lost++;
    expect(await probe()).toBe(false);
  });
});
