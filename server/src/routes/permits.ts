import { z } from 'zod';
import type { Response } from 'express';
import { bodyIdSchema, idSchema, type SiteRole } from '@shared/schemas/common';
import {
  attachmentFormSchema,
  checkProposalSchema,
  commentSchema,
  permitCreateSchema,
  permitListQuerySchema,
  permitUpdateSchema,
  transitionRules,
  transitionSchema,
  attachmentAddedAnswer,
  briefingAnswer,
  commentAddedAnswer,
  onePermitAnswer,
  oneRevisionAnswer,
  permitCheckAnswer,
  permitsAnswer,
  siteOperatorsAnswer,
} from '@shared/schemas/permits';
import { Api, badRequest, HttpError, notFound, siteFromParam, siteFromQuery, siteOfRow } from '../http';
import { filesOf, limits, receiveFiles, sendUpload } from '../services/uploads';
import { userActor } from '../services/permits/actors';
import { addAttachment, attachmentUploadId, removeAttachment } from '../services/permits/attachments';
import { confirmBriefing } from '../services/permits/briefing';
import { checkProposal, runPermitCheck, withoutProfiles } from '../services/permits/check';
import { assertMayAct, StaleError, transition, WrongPasswordError } from '../services/permits/machine';
import { endSessionsOf } from '../services/people';
import { permitPdf } from '../services/permits/pdf';
import { listPermits, loadDetail, loadRevision } from '../services/permits/read';
import { addComment, createPermit, updatePermit } from '../services/permits/write';

const idParams = z.object({ id: idSchema });
/** The revision the operator was briefed on (the phone sends it; a stale one answers 409); an idempotency key may ride along. */
const briefingBodySchema = z.object({
  revision: z.number().int().positive().optional(),
  idempotencyKey: z.string().max(100).optional(),
});
const revisionParams = z.object({ id: idSchema, revision: idSchema });
const attachmentParams = z.object({ id: idSchema, attachmentId: idSchema });

/** Permits, with every change checked against the status, the role and the version. */
export function registerPermitRoutes(api: Api): void {
  const { db } = api.deps;
  const { decisionPassword } = api.throttles;
  const permitSite = siteOfRow('permits');
  const members = { kind: 'site', roles: 'any', admin: true, siteId: permitSite } as const;

  /** Runs a change and answers with the permit as it now is; on a stale version, 409 with the permit too. */
  async function answerWithPermit(
    res: Response,
    id: number,
    viewer: { id: number; role: SiteRole | null },
    change: () => Promise<unknown>,
  ) {
    try {
      await change();
    } catch (err) {
      if (!(err instanceof StaleError)) throw err;
      res
        .status(409)
        .json({ error: { code: err.code, message: err.message, fields: err.fields }, permit: await loadDetail(db, id, viewer) });
      return;
    }
    const permit = await loadDetail(db, id, viewer);
    if (!permit) throw notFound('That permit');
    return { permit };
  }

  api.route(
    {
      method: 'get',
      path: '/api/sites/:siteId/operators',
      summary: 'The plant operators of a site, to name on a permit',
      response: siteOperatorsAnswer,
      tag: 'Permits',
      access: { kind: 'site', roles: ['supervisor', 'coordinator'], admin: true, siteId: siteFromParam },
      params: z.object({ siteId: idSchema }),
    },
    async ({ params, user }) => {
      const [operators, last] = await Promise.all([
        db
          .selectFrom('site_members')
          .innerJoin('users', 'users.id', 'site_members.user_id')
          .select(['users.id', 'users.name', 'users.email'])
          .where('site_members.site_id', '=', params.siteId)
          .where('site_members.role', '=', 'operator')
          .where('users.active', '=', true)
          .orderBy('users.name')
          .execute(),
        // The operators named on the caller's latest request on this site: offered ticked on the next one.
        db
          .selectFrom('permit_revisions as r')
          .innerJoin('permits as p', 'p.id', 'r.permit_id')
          .select('r.id')
          .where('p.site_id', '=', params.siteId)
          .where('r.created_by', '=', user.id)
          .where((eb) => eb.exists(eb.selectFrom('permit_operators as o').select('o.user_id').whereRef('o.revision_id', '=', 'r.id')))
          .orderBy('r.id', 'desc')
          .limit(1)
          .executeTakeFirst(),
      ]);
      const named = last
        ? (await db.selectFrom('permit_operators').select('user_id').where('revision_id', '=', last.id).execute()).map((o) => o.user_id)
        : [];
      return { operators, lastUsed: operators.filter((o) => named.includes(o.id)).map((o) => o.id) };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/sites/:siteId/permits/check',
      summary:
        'Run the cumulative check of a request not yet saved (the page that asks for a permit): its window, excavations and loads, with the other permits counted',
      tag: 'Permits',
      access: { kind: 'site', roles: ['supervisor', 'coordinator'], admin: true, siteId: siteFromParam },
      params: z.object({ siteId: idSchema }),
      body: checkProposalSchema,
      response: permitCheckAnswer,
    },
    async ({ params, body, deps }) => {
      if (!body.windowStart || !body.windowEnd) {
        throw badRequest('Give the window of the work.', {
          ...(body.windowStart ? {} : { windowStart: 'is required' }),
          ...(body.windowEnd ? {} : { windowEnd: 'is required' }),
        });
      }
      const site = await db.selectFrom('sites').select(['default_method']).where('id', '=', params.siteId).executeTakeFirst();
      if (!site) throw notFound('That site');
      return {
        check: withoutProfiles(
          await runPermitCheck(
            db,
            {
              siteId: params.siteId,
              permitId: null,
              number: 'new',
              windowStart: new Date(body.windowStart),
              windowEnd: new Date(body.windowEnd),
              excavationIds: body.excavationIds ?? [],
              loads: body.loads ?? [],
              method: body.method ?? (site.default_method as 'dispersion-45' | 'elastic'),
              plantSnapshot: null,
            },
            deps.now(),
          ),
        ),
      };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/permits',
      summary: 'Request a permit (a draft): kind, site, excavations, placed loads, window, operators, dig checks',
      tag: 'Permits',
      access: {
        kind: 'site',
        roles: ['supervisor'],
        siteId: (req) => {
          const sent = (req.body as { siteId?: unknown } | undefined)?.siteId;
          const id = bodyIdSchema.safeParse(sent);
          if (!id.success) {
            const why = sent === undefined || sent === null ? 'is required' : id.error.issues[0].message;
            throw badRequest('Please name the site.', { siteId: why });
          }
          return id.data;
        },
      },
      body: permitCreateSchema,
      response: onePermitAnswer,
      responses: { 201: 'Created' },
    },
    async ({ body, user, res, deps }) => {
      const id = await createPermit(deps, user, body);
      res.status(201).json({ permit: await loadDetail(db, id, { id: user.id, role: 'supervisor' }) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/permits',
      summary:
        'Permits I may see: awaiting my review, my requests, live now, or all, filtered by site, status, kind, excavation, window and text, sorted, a page at a time (`next` is the cursor of the next page)',
      tag: 'Permits',
      // The site named, if any, checked by the guard in the one query that reads the person: of
      // their organisation (else 404) and theirs (else 403; administrators of it pass).
      access: { kind: 'site', roles: 'any', admin: true, optional: true, siteId: siteFromQuery },
      query: permitListQuerySchema,
      response: permitsAnswer,
    },
    async ({ query, user, site }) => {
      return listPermits(db, user, query, site ? [site.id] : undefined);
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/permits/:id',
      summary: 'One permit: its current revision, check, decision, operators, timeline and attachments',
      response: onePermitAnswer,
      tag: 'Permits',
      access: members,
      params: idParams,
    },
    async ({ params, user, site }) => {
      const permit = await loadDetail(db, params.id, { id: user.id, role: site?.role ?? null });
      if (!permit) throw notFound('That permit');
      return { permit };
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/permits/:id/revisions/:revision',
      summary: 'One revision of a permit, as it was',
      tag: 'Permits',
      access: members,
      params: revisionParams,
      response: oneRevisionAnswer,
    },
    async ({ params }) => {
      const revision = await loadRevision(db, params.id, params.revision);
      if (!revision) throw notFound('That revision');
      return { revision };
    },
  );

  api.route(
    {
      method: 'patch',
      path: '/api/permits/:id',
      summary: 'Change a draft or returned permit (with the version you read); the check is run again',
      tag: 'Permits',
      access: { ...members, roles: ['supervisor'], admin: false },
      params: idParams,
      body: permitUpdateSchema,
      response: onePermitAnswer,
    },
    async ({ params, body, user, site, deps, res }) =>
      answerWithPermit(res, params.id, { id: user.id, role: site?.role ?? null }, () => updatePermit(deps, user, params.id, body)),
  );

  api.route(
    {
      method: 'post',
      path: '/api/permits/:id/check',
      summary:
        'Run the cumulative check: the engine result per excavation, with the other permits counted. With a body, checks those changes without saving them. The pressure profiles are left out (the stored check on the permit has them)',
      tag: 'Permits',
      access: { ...members, roles: ['supervisor', 'coordinator'] },
      params: idParams,
      body: checkProposalSchema,
      response: permitCheckAnswer,
    },
    async ({ params, body, deps }) => ({ check: withoutProfiles(await checkProposal(db, params.id, body, deps.now())) }),
  );

  api.route(
    {
      method: 'post',
      path: '/api/permits/:id/transitions',
      summary:
        'Move a permit on: submit, approve (standoff, conditions), return, decline, suspend, resume, hand back, revise, withdraw. Decisions need the password again',
      tag: 'Permits',
      access: members,
      params: idParams,
      // The role (and, for a decision, that the caller is not the permit's author) is decided before
      // the body is validated: an operator posting `approve` learns nothing about its fields.
      beforeBody: async ({ params, user, rawBody }) => {
        const p = await db.selectFrom('permits').select(['id', 'site_id', 'number']).where('id', '=', params.id).executeTakeFirst();
        if (!p) throw notFound('That permit');
        await assertMayAct(db, p, (rawBody as { action?: unknown } | undefined)?.action, userActor(user));
      },
      body: transitionSchema,
      response: onePermitAnswer,
      responses: { 401: 'Signed out after too many wrong passwords under decisions' },
    },
    async ({ params, body, user, site, deps, req, res }) => {
      // The password that signs a decision is limited like sign-in: SIGNIN_LIMIT_PER_ACCOUNT wrong
      // ones a quarter hour per person end every session of theirs (401); signing in again clears it.
      const key = `${user.id}|`;
      const signOff = async () => {
        await endSessionsOf(db, user.id);
        await new Promise<void>((resolve) => req.session.destroy(() => resolve()));
        res.clearCookie('brink.sid', { path: '/' });
        return new HttpError(
          401,
          'signed_out',
          'Too many wrong passwords under a decision: you have been signed out. Sign in again to continue.',
        );
      };
      if (transitionRules[body.action].signed && (await decisionPassword.blocked(key))) throw await signOff();
      return answerWithPermit(res, params.id, { id: user.id, role: site?.role ?? null }, async () => {
        try {
          return await transition(deps, params.id, body.action, userActor(user), {
            version: body.version,
            reason: body.reason,
            standoff: body.standoff,
            conditions: body.conditions,
            password: body.password,
          });
        } catch (err) {
          if (err instanceof WrongPasswordError) {
            await decisionPassword.hit(key);
            if (await decisionPassword.blocked(key)) throw await signOff();
          }
          throw err;
        }
      });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/permits/:id/briefing',
      summary: 'An operator named on the permit confirms the briefing (again: no change)',
      tag: 'Permits',
      access: { ...members, roles: ['operator'], admin: false },
      params: idParams,
      body: briefingBodySchema,
      response: briefingAnswer,
    },
    async ({ params, body, user, deps }) => ({ briefing: await confirmBriefing(deps, params.id, user, { revision: body.revision }) }),
  );

  api.route(
    {
      method: 'post',
      path: '/api/permits/:id/comments',
      summary: 'A comment on the permit\u2019s timeline',
      tag: 'Permits',
      access: { ...members, admin: false },
      params: idParams,
      body: commentSchema,
      response: commentAddedAnswer,
      responses: { 201: 'Added' },
    },
    async ({ params, body, user, deps, res }) => {
      await addComment(deps, user, params.id, body.text);
      res.status(201).json({ ok: true });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/permits/:id/pdf',
      summary:
        'The printable permit (PDF) in the reader\u2019s units: decision, conditions, standoff, plan to scale, pressure diagram, signatures, QR code, caution',
      tag: 'Permits',
      access: members,
      params: idParams,
      produces: 'application/pdf',
    },
    async ({ params, deps, res, user }) => {
      const { buffer, number } = await permitPdf(deps, params.id, { readerId: user.id });
      res.setHeader('Content-Type', 'application/pdf');
      res.setHeader('Content-Disposition', `attachment; filename="permit-${number}.pdf"`);
      res.setHeader('Cache-Control', 'private, no-store');
      res.end(buffer);
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/permits/:id/attachments',
      summary:
        'Attach a method statement (PDF), a photo (PNG or JPEG) or another document (PDF or image); the type is judged from the content',
      tag: 'Permits',
      access: { ...members, roles: ['supervisor', 'coordinator'], admin: false },
      params: idParams,
      before: [receiveFiles(['file'], limits.pdfOrImage)],
      files: ['file'],
      body: attachmentFormSchema,
      response: attachmentAddedAnswer,
      responses: { 201: 'Stored', 413: 'The file is too large' },
    },
    async ({ params, body, user, site, req, res, deps }) => {
      const [file] = filesOf(req, 'file');
      if (!file) throw badRequest('Please choose a file.', { file: 'is required' });
      const attachment = await addAttachment(deps, { permitId: params.id, siteId: site.id, kind: body.kind, file, by: user.id });
      res.status(201).json({ attachment });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/permits/:id/attachments/:attachmentId',
      summary: 'One attachment, to members of the permit\u2019s site',
      tag: 'Permits',
      access: members,
      params: attachmentParams,
      produces: 'application/octet-stream',
    },
    async ({ params, res, deps }) => {
      await sendUpload(deps, res, await attachmentUploadId(db, params.id, params.attachmentId));
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/api/permits/:id/attachments/:attachmentId',
      summary: 'Remove an attachment while the permit is a draft or returned',
      tag: 'Permits',
      access: { ...members, roles: ['supervisor', 'coordinator'], admin: false },
      params: attachmentParams,
      responses: { 204: 'Removed' },
    },
    async ({ params, user }) => {
      await removeAttachment(db, params.id, params.attachmentId, user.id);
    },
  );
}
