import { randomUUID } from 'node:crypto';
import { z } from 'zod';
import type { Request } from 'express';
import { idSchema } from '@shared/schemas/common';
import {
  CONCERN_PHOTOS_MAX,
  concernFormSchema,
  idempotencyKeySchema,
  concernReportedAnswer,
  fieldPermitsAnswer,
  oneFieldPermitAnswer,
} from '@shared/schemas/field';
import { Api, badRequest, conflict, notFound, parseOr400, siteOfRow } from '../http';
import { notice } from '../mail/mailer';
import { audit } from '../services/audit';
import { concernOut, concernQuery, concernRecipients, loadFieldPermit, permitNamesExcavation, permitsNaming } from '../services/field';
import { pushConcern } from '../services/permits/push';
import { filesOf, limits, receiveFiles, storeUpload } from '../services/uploads';

const idParams = z.object({ id: idSchema });

/** A send repeated with a key already taken: answered with the first one's concern. */
class Replay extends Error {}

/** The idempotency key of a request: the `Idempotency-Key` header or the form field; both must agree. */
function idempotencyKeyOf(req: Request, fromBody: string | undefined): string | null {
  const header = req.get('Idempotency-Key');
  const key = header === undefined ? undefined : parseOr400(idempotencyKeySchema, header, 'Idempotency-Key header');
  if (key && fromBody && key !== fromBody)
    throw badRequest('The Idempotency-Key header and the idempotencyKey field differ.', {
      idempotencyKey: 'differs from the Idempotency-Key header',
    });
  return key ?? fromBody ?? null;
}

/**
 * The field view's API: the permits that name me (everything the phone keeps to show them with no
 * signal), one permit for any member of its site (the printed permit's QR code), and concerns with
 * photos, idempotent by the key the phone made. Briefing confirmations go to the permits API
 * (POST /api/permits/:id/briefing), which is idempotent by nature: a second confirmation keeps the first.
 */
export function registerFieldRoutes(api: Api): void {
  const { db } = api.deps;
  const permitSite = siteOfRow('permits');
  const concernByKey = (key: string) => concernQuery(db).where('c.idempotency_key', '=', key).executeTakeFirst();

  api.route(
    {
      method: 'get',
      path: '/api/field/permits',
      summary:
        'The permits that name me as an operator (approved, live, suspended, or closed in the last 12 hours), each with its zones, for the phone',
      tag: 'Field',
      access: { kind: 'signedIn' },
      response: fieldPermitsAnswer,
    },
    async ({ user, deps }) => {
      const now = deps.now();
      const ids = await permitsNaming(db, user.id, now);
      const permits = [];
      for (const id of ids) permits.push((await loadFieldPermit(db, id, user.id))!);
      return { asOf: now.toISOString(), permits };
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/field/permits/:id',
      summary: 'One permit for the phone: zones, footprint, standoff, conditions, briefings and concerns',
      tag: 'Field',
      access: { kind: 'site', roles: 'any', admin: true, siteId: permitSite },
      params: idParams,
      response: oneFieldPermitAnswer,
    },
    async ({ params, user, deps }) => {
      const permit = await loadFieldPermit(db, params.id, user.id);
      if (!permit) throw notFound('That permit');
      return { asOf: deps.now().toISOString(), permit };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/permits/:id/concerns',
      summary:
        'Report a concern on a permit: which excavation, a note and up to three photos (PNG or JPEG, 10 MB each). ' +
        'Send an Idempotency-Key: a repeated key answers 200 with the first concern and makes no second one.',
      tag: 'Field',
      access: { kind: 'site', roles: 'any', siteId: permitSite },
      params: idParams,
      before: [receiveFiles(['photo'], limits.image, CONCERN_PHOTOS_MAX)],
      files: ['photo'],
      body: concernFormSchema,
      response: concernReportedAnswer,
      responses: { 201: 'Reported', 200: 'Already reported with this key' },
    },
    async ({ req, res, params, body, user, site, deps }) => {
      const key = idempotencyKeyOf(req, body.idempotencyKey) ?? randomUUID();
      const replay = async () => {
        const first = await concernByKey(key);
        if (!first) return null;
        if (first.permit_id !== params.id || first.reporter_id !== user.id) {
          throw conflict('This idempotency key was already used for another request; make a new one.');
        }
        res.status(200).json({ concern: concernOut(first), replayed: true });
        return true;
      };
      if (await replay()) return;

      const excavation = await permitNamesExcavation(db, params.id, body.excavationId);
      if (!excavation)
        throw badRequest('Choose one of the excavations this permit names.', { excavationId: 'is not one of this permit’s excavations' });
      const photos = filesOf(req, 'photo');
      const now = deps.now();
      let concernId: number;
      try {
        concernId = await db.transaction().execute(async (trx) => {
          const photoIds: number[] = [];
          for (const [i, f] of photos.entries()) {
            const field = photos.length > 1 ? `photo[${i}]` : 'photo';
            photoIds.push(
              (await storeUpload(deps, f, { field, accept: 'image', purpose: 'concern-photo', siteId: site.id, userId: user.id, db: trx }))
                .id,
            );
          }
          const permit = await trx
            .selectFrom('permits')
            .select(['revision', 'number'])
            .where('id', '=', params.id)
            .executeTakeFirstOrThrow();
          const row = await trx
            .insertInto('concerns')
            .values({
              site_id: site.id,
              permit_id: params.id,
              excavation_id: body.excavationId,
              excavation_reference: excavation.reference,
              note: body.note,
              photo_upload_ids: photoIds,
              reporter_id: user.id,
              created_at: now,
              idempotency_key: key,
            })
            .onConflict((oc) => oc.column('idempotency_key').doNothing())
            .returning('id')
            .executeTakeFirst();
          if (!row) throw new Replay(); // the same key arrived twice at once: the other send made it
          await trx
            .insertInto('permit_events')
            .values({
              permit_id: params.id,
              revision: permit.revision,
              at: now,
              actor_id: user.id,
              actor_name: user.name,
              action: 'concern',
              from_status: null,
              to_status: null,
              comment: body.note,
              detail: JSON.stringify({
                concernId: row.id,
                excavationId: body.excavationId,
                excavationReference: excavation.reference,
                photoIds,
              }),
            })
            .execute();
          await audit(trx, {
            actorId: user.id,
            siteId: site.id,
            entity: 'permit',
            entityId: params.id,
            action: 'concern',
            detail: { number: permit.number, concernId: row.id },
          });
          // The notices are queued in the same transaction as the concern.
          const facts = await trx
            .selectFrom('permits as p')
            .innerJoin('sites as s', 's.id', 'p.site_id')
            .select(['p.number', 's.name as site_name'])
            .where('p.id', '=', params.id)
            .executeTakeFirstOrThrow();
          const message = notice({
            subject: `Concern on permit ${facts.number}: excavation ${excavation.reference}`,
            lines: [
              `${user.name} reported a concern on permit ${facts.number} at ${facts.site_name}, about excavation ${excavation.reference}.`,
              `"${body.note}"`,
              photos.length
                ? `${photos.length === 1 ? 'One photo is' : `${photos.length} photos are`} on the permit's timeline.`
                : 'No photo was sent.',
              'Please look at it and decide whether work under the permit must stop.',
            ],
            link: { label: `Open permit ${facts.number}`, url: `${deps.config.publicUrl}/permits/${params.id}` },
          });
          for (const to of await concernRecipients(trx, site.id, user.id)) await deps.mailer.send(trx, { to, ...message });
          await pushConcern(
            { ...deps, db: trx },
            {
              permitId: params.id,
              number: facts.number,
              reporterId: user.id,
              reporterName: user.name,
              excavationReference: excavation.reference,
            },
          );
          return row.id;
        });
      } catch (err) {
        if (err instanceof Replay && (await replay())) return;
        throw err;
      }

      const first = (await concernByKey(key))!;
      res.status(201).json({ concern: concernOut(first), replayed: false, id: concernId });
    },
  );
}
