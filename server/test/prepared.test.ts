import { sql } from 'kysely';
import { afterAll, describe, expect, it } from 'vitest';
import { createDb, createPool, PREPARED } from '@db/database';

// One connection, so that what PostgreSQL reports prepared is this pool's.
const db = createDb(createPool(process.env.DATABASE_URL!, 1));
afterAll(() => db.destroy());

const preparedRuns = async (text: string) => {
  const { rows } = await sql<{ runs: number }>`
    select (generic_plans + custom_plans)::int as runs from pg_prepared_statements where statement = ${text}`.execute(db);
  return rows[0]?.runs ?? 0;
};

describe('statements marked PREPARED', () => {
  it('are planned once per connection and run again by name; unmarked ones are not kept', async () => {
    const marked = (n: number) => db.selectFrom('users').select('id').modifyFront(PREPARED).where('id', '=', n);
    const plain = (n: number) => db.selectFrom('users').select('email').where('id', '=', n);
    for (let i = 1; i <= 7; i++) {
      await marked(i).execute();
      await plain(i).execute();
    }
    expect(marked(0).compile().sql.startsWith('select /* prepared */ ')).toBe(true);
    expect(await preparedRuns(marked(0).compile().sql)).toBe(7);
    expect(await preparedRuns(plain(0).compile().sql)).toBe(0);
    // PostgreSQL chose its one generic plan after five runs (no planning per call since).
    const { rows } = await sql<{ generic: number }>`
      select generic_plans::int as generic from pg_prepared_statements where statement = ${marked(0).compile().sql}`.execute(db);
    expect(rows[0].generic).toBe(2);
  });
});
