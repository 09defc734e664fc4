/**
 * Concerns reported from the field: one concern with its photos, its timeline event, its audit entry,
 * its e-mails and pushes, in one transaction; idempotent by the key the phone made (a repeated key
 * answers the first concern and makes no second one, also when both arrive at once).
 */
import { sql } from 'kysely';
import type { Db } from '@db/database';
import type { Concern } from '@shared/schemas/field';
import type { Deps } from '../deps';
import { badRequest, conflict } from '../http';
import { notice } from '../mail/mailer';
import { audit } from './audit';
import { siteLeads } from './inspections';
import { pushConcern } from './permits/push';
import { withCurrentRevision } from './permits/read';
import { storeUpload } from './uploads';

/** Concerns with their reporter's name; narrow with `.where(…)`. */
export function concernQuery(db: Db) {
  return db
    .selectFrom('concerns as c')
    .innerJoin('users as u', 'u.id', 'c.reporter_id')
    .select([
      'c.id',
      'c.permit_id',
      'c.excavation_id',
      'c.excavation_reference',
      'c.note',
      'c.photo_upload_ids',
      'c.reporter_id',
      'u.name',
      'c.created_at',
      'c.idempotency_key',
    ]);
}

type ConcernRow = {
  id: number;
  permit_id: number;
  excavation_id: number | null;
  excavation_reference: string;
  note: string;
  photo_upload_ids: number[];
  reporter_id: number;
  name: string;
  /** A Date, or text when read through JSON. */
  created_at: Date | string;
  idempotency_key: string;
};

export function concernOut(r: ConcernRow): Concern {
  return {
    id: r.id,
    permitId: r.permit_id,
    excavationId: r.excavation_id,
    excavationReference: r.excavation_reference,
    note: r.note,
    photoIds: r.photo_upload_ids,
    reporter: { id: r.reporter_id, name: r.name },
    createdAt: new Date(r.created_at).toISOString(),
    idempotencyKey: r.idempotency_key,
  };
}

/** Is the excavation one of those the permit's current revision names? */
async function permitNamesExcavation(db: Db, permitId: number, excavationId: number): Promise<{ reference: string } | null> {
  const row = await withCurrentRevision(db)
    .innerJoin('excavations as e', 'e.site_id', 'p.site_id')
    .select('e.reference')
    .where('p.id', '=', permitId)
    .where('e.id', '=', excavationId)
    .where(sql<boolean>`e.id = any(r.excavation_ids)`)
    .executeTakeFirst();
  return row ?? null;
}

/** A send repeated with a key already taken: answered with the first one's concern. */
class Replay extends Error {}

interface ConcernReport {
  permitId: number;
  siteId: number;
  by: { id: number; name: string };
  excavationId: number;
  note: string;
  photos: Express.Multer.File[];
  /** The idempotency key (the phone's, or a fresh one). */
  key: string;
}

/**
 * Reports a concern, or answers the first one made with the same key (`replayed`). A key used by
 * someone else or for another permit answers 409; an excavation the permit does not name, 400.
 */
export async function reportConcern(deps: Deps, c: ConcernReport): Promise<{ concern: Concern; replayed: boolean }> {
  const { db } = deps;
  const replay = async () => {
    const first = await concernQuery(db).where('c.idempotency_key', '=', c.key).executeTakeFirst();
    if (!first) return null;
    if (first.permit_id !== c.permitId || first.reporter_id !== c.by.id) {
      throw conflict('This idempotency key was already used for another request; make a new one.');
    }
    return concernOut(first);
  };
  const earlier = await replay();
  if (earlier) return { concern: earlier, replayed: true };

  const excavation = await permitNamesExcavation(db, c.permitId, c.excavationId);
  if (!excavation)
    throw badRequest('Choose one of the excavations this permit names.', { excavationId: 'is not one of this permit’s excavations' });
  let made = true;
  try {
    await db.transaction().execute((trx) => recordConcern({ ...deps, db: trx }, c, excavation.reference));
  } catch (err) {
    if (!(err instanceof Replay)) throw err;
    made = false; // the other send of the same key committed first
  }
  const concern = await replay();
  if (!concern) throw new Error(`the concern with key ${c.key} is missing after it was made`);
  return { concern, replayed: !made };
}

/** The concern's rows and notices, in the caller's transaction; Replay when its key is taken meanwhile. */
async function recordConcern(deps: Deps, c: ConcernReport, excavationReference: string): Promise<void> {
  const { db: trx } = deps;
  const now = deps.now();
  const photoIds: number[] = [];
  for (const [i, f] of c.photos.entries()) {
    const field = c.photos.length > 1 ? `photo[${i}]` : 'photo';
    photoIds.push(
      (await storeUpload(deps, f, { field, accept: 'image', purpose: 'concern-photo', siteId: c.siteId, userId: c.by.id, db: trx })).id,
    );
  }
  const permit = await trx
    .selectFrom('permits as p')
    .innerJoin('sites as s', 's.id', 'p.site_id')
    .select(['p.revision', 'p.number', 's.name as site_name'])
    .where('p.id', '=', c.permitId)
    .executeTakeFirstOrThrow();
  const row = await trx
    .insertInto('concerns')
    .values({
      site_id: c.siteId,
      permit_id: c.permitId,
      excavation_id: c.excavationId,
      excavation_reference: excavationReference,
      note: c.note,
      photo_upload_ids: photoIds,
      reporter_id: c.by.id,
      created_at: now,
      idempotency_key: c.key,
    })
    .onConflict((oc) => oc.column('idempotency_key').doNothing())
    .returning('id')
    .executeTakeFirst();
  if (!row) throw new Replay(); // the same key arrived twice at once: the other send made it
  await trx
    .insertInto('permit_events')
    .values({
      permit_id: c.permitId,
      revision: permit.revision,
      at: now,
      actor_id: c.by.id,
      actor_name: c.by.name,
      action: 'concern',
      from_status: null,
      to_status: null,
      comment: c.note,
      detail: JSON.stringify({ concernId: row.id, excavationId: c.excavationId, excavationReference, photoIds }),
    })
    .execute();
  await audit(trx, {
    actorId: c.by.id,
    siteId: c.siteId,
    entity: 'permit',
    entityId: c.permitId,
    action: 'concern',
    detail: { number: permit.number, concernId: row.id },
  });
  // The notices are queued in the same transaction as the concern.
  const n = c.photos.length;
  const readers = (await siteLeads(trx, c.siteId)).filter((p) => p.id !== c.by.id);
  await deps.mailer.sendEach(trx, readers, (units) =>
    notice({
      subject: `Concern on permit ${permit.number}: excavation ${excavationReference}`,
      lines: [
        `${c.by.name} reported a concern on permit ${permit.number} at ${permit.site_name}, about excavation ${excavationReference}.`,
        `"${c.note}"`,
        n ? `${n === 1 ? 'One photo is' : `${n} photos are`} on the permit's timeline.` : 'No photo was sent.',
        'Please look at it and decide whether work under the permit must stop.',
      ],
      link: { label: `Open permit ${permit.number}`, url: `${deps.config.publicUrl}/permits/${c.permitId}` },
      units,
    }),
  );
  await pushConcern(deps, {
    permitId: c.permitId,
    number: permit.number,
    reporterId: c.by.id,
    reporterName: c.by.name,
    excavationReference,
  });
}
