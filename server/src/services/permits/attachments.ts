/**
 * A permit's attachments: a method statement (PDF), a photo or another document, stored with the
 * revision they belong to. What was reviewed stays as it was: documents are added and removed only
 * while the permit is a draft or returned; photos (a record of the work) may be added at any time.
 */
import { editableStatuses, type AttachmentAdded, type AttachmentKind } from '@shared/schemas/permits';
import type { Db } from '@db/database';
import type { Deps } from '../../deps';
import { conflict, HttpError, notFound } from '../../http';
import { audit } from '../audit';
import { limits, storeUpload, type Accept } from '../uploads';

const acceptOf = (kind: AttachmentKind): Accept => (kind === 'method-statement' ? 'pdf' : kind === 'photo' ? 'image' : 'pdfOrImage');

/** Stores the file (its type judged from the content) and attaches it to the permit's current revision, with its audit entry. */
export async function addAttachment(
  deps: Deps,
  a: { permitId: number; siteId: number; kind: AttachmentKind; file: Express.Multer.File; by: number },
): Promise<AttachmentAdded> {
  const accept = acceptOf(a.kind);
  if (accept === 'image' && a.file.size > limits.image) {
    throw new HttpError(413, 'too_large', 'The photo is too large (at most 10 MB).', { file: 'is too large' });
  }
  return deps.db.transaction().execute(async (trx) => {
    const p = await trx
      .selectFrom('permits')
      .select(['id', 'revision', 'number', 'site_id', 'status'])
      .where('id', '=', a.permitId)
      .forShare()
      .executeTakeFirst();
    if (!p) throw notFound('That permit');
    if (a.kind !== 'photo' && !editableStatuses.includes(p.status)) {
      throw conflict(`Permit ${p.number} is no longer a draft: documents are added to a new revision; photos may still be added.`);
    }
    const stored = await storeUpload(deps, a.file, {
      field: 'file',
      accept,
      purpose: 'permit-attachment',
      siteId: a.siteId,
      userId: a.by,
      db: trx,
    });
    const added = await trx
      .insertInto('permit_attachments')
      .values({ permit_id: p.id, revision: p.revision, upload_id: stored.id, kind: a.kind, added_by: a.by, added_at: deps.now() })
      .returning('id')
      .executeTakeFirstOrThrow();
    await audit(trx, {
      actorId: a.by,
      siteId: p.site_id,
      entity: 'permit',
      entityId: p.id,
      action: 'attached',
      detail: { number: p.number, kind: a.kind, name: stored.originalName },
    });
    return {
      id: added.id,
      kind: a.kind,
      name: stored.originalName,
      mime: stored.mime,
      size: stored.size,
      url: `/api/permits/${p.id}/attachments/${added.id}`,
    };
  });
}

/** The upload behind one of the permit's attachments (404 when it is not the permit's). */
export async function attachmentUploadId(db: Db, permitId: number, attachmentId: number): Promise<number> {
  const a = await db
    .selectFrom('permit_attachments')
    .select('upload_id')
    .where('id', '=', attachmentId)
    .where('permit_id', '=', permitId)
    .executeTakeFirst();
  if (!a) throw notFound('That attachment');
  return a.upload_id;
}

/** Removes an attachment of the current revision while the permit is a draft or returned (409 otherwise), with its audit entry. */
export async function removeAttachment(db: Db, permitId: number, attachmentId: number, by: number): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const p = await trx
      .selectFrom('permits')
      .select(['id', 'status', 'revision', 'number', 'site_id'])
      .where('id', '=', permitId)
      .forUpdate()
      .executeTakeFirst();
    if (!p) throw notFound('That permit');
    const a = await trx
      .selectFrom('permit_attachments')
      .select(['id', 'revision'])
      .where('id', '=', attachmentId)
      .where('permit_id', '=', p.id)
      .executeTakeFirst();
    if (!a) throw notFound('That attachment');
    if (!editableStatuses.includes(p.status) || a.revision !== p.revision) {
      throw conflict(`Permit ${p.number} is frozen: its attachments stay with the revision they belong to.`);
    }
    await trx.deleteFrom('permit_attachments').where('id', '=', a.id).execute();
    await audit(trx, {
      actorId: by,
      siteId: p.site_id,
      entity: 'permit',
      entityId: p.id,
      action: 'detached',
      detail: { number: p.number, attachmentId: a.id },
    });
  });
}
