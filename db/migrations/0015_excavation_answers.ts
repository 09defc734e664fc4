import { type Kysely } from 'kysely';

// Issue 16 §3: each excavation keeps its answer of GET /api/sites/:siteId/excavations as JSON text,
// written with the row (server/src/services/excavations.ts, storeAnswers), so that the site map and
// the register join stored text instead of reading, checking and writing 200 excavations' shapes on
// every request. `answer_key` is the answer's format and the row version it was written at; an
// answer under another key (a row changed since, a Brink with another answer) is not used: the row
// is read as before and its answer written again.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('excavations').addColumn('answer', 'text').addColumn('answer_key', 'text').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('excavations').dropColumn('answer_key').dropColumn('answer').execute();
}
