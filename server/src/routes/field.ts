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
import { Api, badRequest, notFound, parseOr400, siteOfRow } from '../http';
import { reportConcern } from '../services/concerns';
import { loadFieldPermit, loadMyFieldPermits } from '../services/field';
import { filesOf, limits, receiveFiles } from '../services/uploads';

const idParams = z.object({ id: idSchema });

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
      return { asOf: now.toISOString(), permits: await loadMyFieldPermits(db, user.id, now) };
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
      const { concern, replayed } = await reportConcern(deps, {
        permitId: params.id,
        siteId: site.id,
        by: user,
        excavationId: body.excavationId,
        note: body.note,
        photos: filesOf(req, 'photo'),
        key: idempotencyKeyOf(req, body.idempotencyKey) ?? randomUUID(),
      });
      if (replayed) res.status(200).json({ concern, replayed });
      else res.status(201).json({ concern, replayed, id: concern.id });
    },
  );
}
