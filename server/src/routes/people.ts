import { z } from 'zod';
import { invitationSchema, oneOrganisationAnswer, organisationUpdateSchema } from '@shared/schemas/auth';
import { idSchema, roleLabels } from '@shared/schemas/common';
import {
  createdAnswer,
  membershipSchema,
  onePersonAnswer,
  peopleAnswer,
  peopleListQuerySchema,
  userUpdateSchema,
} from '@shared/schemas/sites';
import { Api, HttpError, notFound } from '../http';
import { audit } from '../services/audit';
import { loadPeople, loadPeoplePage, revokeAccess } from '../services/people';
import { isUniqueViolation } from '../services/pg-errors';
import { ownedPath } from '../services/organisation';
import { INVITATION_HOURS, newToken } from '../services/tokens';
import { notice } from '../mail/mailer';

const userParams = z.object({ id: idSchema });
const memberParams = z.object({ id: idSchema, siteId: idSchema });

export function registerPeopleRoutes(api: Api): void {
  const { db, config } = api.deps;

  api.route(
    {
      method: 'post',
      path: '/api/invitations',
      response: createdAnswer,
      summary: 'Invite a person by e-mail, optionally with a role on a site',
      tag: 'People',
      access: { kind: 'admin' },
      body: invitationSchema,
      responses: { 201: 'Invitation queued for e-mail', 409: 'The address belongs to a person of another organisation' },
    },
    async ({ body, user, res, deps }) => {
      let siteName: string | null = null;
      if (body.siteId) {
        const site = await db
          .selectFrom('sites')
          .select('name')
          .where('id', '=', body.siteId)
          .where('organisation_id', '=', user.organisationId)
          .executeTakeFirst();
        if (!site) throw new HttpError(400, 'invalid', 'That site does not exist.', { siteId: 'is not a site' });
        siteName = site.name;
      }
      // A person belongs to one organisation: an address that is already someone's elsewhere is
      // refused now, not when its owner follows the link. The answer names no organisation and is
      // the same for any such address; each refusal is audited (docs/security.md, "Organisations").
      const elsewhere = await db
        .selectFrom('users')
        .select('id')
        .where('email', '=', body.email)
        .where('organisation_id', '<>', user.organisationId)
        .executeTakeFirst();
      if (elsewhere) {
        await audit(db, { actorId: user.id, entity: 'invitation', action: 'refused', detail: { email: body.email } });
        throw new HttpError(409, 'conflict', 'This address cannot be invited here. Ask the person for another address.', {
          email: 'cannot be invited here',
        });
      }
      const { token, hash } = newToken();
      const id = await db.transaction().execute(async (trx) => {
        const inv = await trx
          .insertInto('invitations')
          .values({
            organisation_id: user.organisationId,
            email: body.email,
            name: body.name,
            is_admin: body.isAdmin,
            site_id: body.siteId,
            role: body.role,
            token_hash: hash,
            invited_by: user.id,
            expires_at: new Date(deps.now().getTime() + INVITATION_HOURS * 3600_000),
          })
          .returning('id')
          .executeTakeFirstOrThrow();
        await audit(trx, {
          actorId: user.id,
          siteId: body.siteId,
          entity: 'invitation',
          entityId: inv.id,
          action: 'created',
          detail: { email: body.email, role: body.role, isAdmin: body.isAdmin },
        });
        // The e-mail is queued in the same transaction: no invitation without its message.
        await deps.mailer.send(trx, {
          to: body.email,
          ...notice({
            subject: 'You are invited to Brink',
            lines: [
              `Hello ${body.name},`,
              `${user.name} has invited you to Brink, where loads beside open excavations are requested, checked and approved${
                siteName && body.role ? `, as ${roleLabels[body.role].toLowerCase()} on ${siteName}` : ''
              }.`,
              `Open the link below to choose your password. It works once, for ${INVITATION_HOURS} hours.`,
            ],
            link: { label: 'Accept the invitation', url: `${config.publicUrl}/invitations/accept?token=${token}` },
          }),
        });
        return inv.id;
      });
      res.status(201).json({ id });
    },
  );

  api.route(
    {
      method: 'patch',
      path: '/api/organisation',
      response: oneOrganisationAnswer,
      summary: 'Rename my organisation (its administrators only)',
      tag: 'People',
      access: { kind: 'admin' },
      body: organisationUpdateSchema,
      responses: { 409: 'Another organisation on this Brink has that name' },
    },
    async ({ body, user }) => {
      try {
        return await db.transaction().execute(async (trx) => {
          const before = await trx
            .selectFrom('organisations')
            .select('name')
            .where('id', '=', user.organisationId)
            .forUpdate()
            .executeTakeFirstOrThrow();
          const r = await trx
            .updateTable('organisations')
            .set({ name: body.name })
            .where('id', '=', user.organisationId)
            .returning(['id', 'name'])
            .executeTakeFirstOrThrow();
          await audit(trx, {
            actorId: user.id,
            entity: 'organisation',
            entityId: r.id,
            action: 'renamed',
            detail: { from: before.name, to: r.name },
          });
          return { organisation: r };
        });
      } catch (e) {
        // Names are unique on the installation (the operator tells organisations apart by them).
        if (isUniqueViolation(e))
          throw new HttpError(409, 'conflict', 'Another organisation on this Brink already has that name. Choose another.', {
            name: 'is already taken on this Brink',
          });
        throw e;
      }
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/users',
      response: peopleAnswer,
      summary:
        "My organisation's people with their site roles, by name, a page at a time (`next` is the cursor of the next page); `q` finds a name or e-mail address",
      tag: 'People',
      access: { kind: 'admin' },
      query: peopleListQuerySchema,
    },
    async ({ user, query }) => loadPeoplePage(db, user, query),
  );

  api.route(
    {
      method: 'patch',
      path: '/api/users/:id',
      response: onePersonAnswer,
      summary: 'Rename, deactivate or reactivate a person, or make them an administrator',
      tag: 'People',
      access: { kind: 'admin' },
      params: userParams,
      beforeBody: ownedPath(['id', 'users', 'That person']),
      body: userUpdateSchema,
    },
    async ({ params, body, user }) => {
      if (params.id === user.id && (body.active === false || body.isAdmin === false)) {
        throw new HttpError(400, 'invalid', 'You cannot deactivate yourself or remove your own administrator role.', {
          [body.active === false ? 'active' : 'isAdmin']: 'cannot be changed on your own account',
        });
      }
      await db.transaction().execute(async (trx) => {
        const set = {
          ...(body.name !== undefined ? { name: body.name } : {}),
          ...(body.isAdmin !== undefined ? { is_admin: body.isAdmin } : {}),
          ...(body.active !== undefined ? { active: body.active } : {}),
        };
        if (Object.keys(set).length) {
          const r = await trx.updateTable('users').set(set).where('id', '=', params.id).executeTakeFirst();
          if (!r.numUpdatedRows) throw notFound('That person');
        }
        if (body.active === false) {
          await revokeAccess(trx, params.id, api.deps.now());
        }
        await audit(trx, { actorId: user.id, entity: 'user', entityId: params.id, action: 'updated', detail: body });
      });
      const [p] = await loadPeople(db, [params.id]);
      if (!p) throw notFound('That person');
      return { user: p };
    },
  );

  api.route(
    {
      method: 'put',
      path: '/api/users/:id/memberships/:siteId',
      response: onePersonAnswer,
      summary: "Set a person's role on a site",
      tag: 'People',
      access: { kind: 'admin' },
      params: memberParams,
      // A site member is a person of the site's organisation: both must be the administrator's.
      beforeBody: ownedPath(['siteId', 'sites', 'That site'], ['id', 'users', 'That person']),
      body: membershipSchema,
    },
    async ({ params, body, user }) => {
      await db.transaction().execute(async (trx) => {
        await trx
          .insertInto('site_members')
          .values({ site_id: params.siteId, user_id: params.id, role: body.role, can_inspect: body.canInspect })
          .onConflict((oc) => oc.columns(['site_id', 'user_id']).doUpdateSet({ role: body.role, can_inspect: body.canInspect }))
          .execute();
        await audit(trx, {
          actorId: user.id,
          siteId: params.siteId,
          entity: 'user',
          entityId: params.id,
          action: 'role-set',
          detail: body,
        });
      });
      const [p] = await loadPeople(db, [params.id]);
      return { user: p };
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/api/users/:id/memberships/:siteId',
      responses: { 204: 'Removed' },
      summary: "Remove a person's role on a site",
      tag: 'People',
      access: { kind: 'admin' },
      params: memberParams,
      beforeBody: ownedPath(['siteId', 'sites', 'That role']),
    },
    async ({ params, user }) => {
      await db.transaction().execute(async (trx) => {
        const r = await trx
          .deleteFrom('site_members')
          .where('site_id', '=', params.siteId)
          .where('user_id', '=', params.id)
          .executeTakeFirst();
        if (!r.numDeletedRows) throw notFound('That role');
        await audit(trx, { actorId: user.id, siteId: params.siteId, entity: 'user', entityId: params.id, action: 'role-removed' });
      });
    },
  );
}
