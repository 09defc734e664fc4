import bcrypt from 'bcryptjs';
import { rateLimit } from 'express-rate-limit';
import type { Request } from 'express';
import { z } from 'zod';
import {
  acceptInvitationSchema,
  forgotPasswordSchema,
  resetPasswordSchema,
  signInSchema,
} from '@shared/schemas/auth';
import { Api, HttpError } from '../http';
import { audit } from '../services/audit';
import { endSessionsOf, loadMe } from '../services/people';
import { hashToken, newToken, RESET_HOURS } from '../services/tokens';
import { notice } from '../mail/mailer';

export const BCRYPT_COST = 12;
// Compared against when the address is unknown, so both answers take as long.
const DUMMY_HASH = bcrypt.hashSync('not-a-real-password', BCRYPT_COST);

declare module 'express-session' {
  interface SessionData {
    userId: number;
  }
}

/** Starts a fresh session for the person (a new id, so a planted session id is worthless). */
export async function signInSession(req: Request, userId: number): Promise<void> {
  await new Promise<void>((resolve, reject) => req.session.regenerate((err) => (err ? reject(err) : resolve())));
  req.session.userId = userId;
  await new Promise<void>((resolve, reject) => req.session.save((err) => (err ? reject(err) : resolve())));
}

const tooMany = (message: string) => ({ error: { code: 'rate_limited', message } });

export function registerAuthRoutes(api: Api): void {
  const { db, config } = api.deps;
  const window = 15 * 60 * 1000;
  const perIp = rateLimit({
    windowMs: window,
    limit: config.signInLimitPerIp,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    message: tooMany('Too many sign-in attempts from this address. Wait a few minutes and try again.'),
  });
  const perAccount = rateLimit({
    windowMs: window,
    limit: config.signInLimitPerAccount,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `account:${String(req.body?.email ?? '').trim().toLowerCase()}`,
    message: tooMany('Too many failed sign-ins for this account. Wait 15 minutes or reset the password.'),
  });

  api.route(
    {
      method: 'post',
      path: '/api/auth/sign-in',
      summary: 'Sign in with e-mail and password',
      tag: 'Sign-in',
      access: { kind: 'public' },
      body: signInSchema,
      before: [perIp, perAccount],
      responses: { 200: 'Signed in: the person and their site roles', 401: 'Wrong e-mail or password', 429: 'Too many attempts' },
    },
    async ({ req, body }) => {
      const u = await db
        .selectFrom('users')
        .select(['id', 'password_hash', 'active'])
        .where('email', '=', body.email)
        .executeTakeFirst();
      const ok = await bcrypt.compare(body.password, u?.password_hash ?? DUMMY_HASH);
      if (!u || !ok || !u.active || !u.password_hash) {
        throw new HttpError(401, 'bad_credentials', 'That e-mail and password do not match an active account.');
      }
      await signInSession(req, u.id);
      await audit(db, { actorId: u.id, entity: 'user', entityId: u.id, action: 'signed-in' });
      return { user: await loadMe(db, u.id) };
    },
  );

  api.route(
    { method: 'post', path: '/api/auth/sign-out', summary: 'Sign out', tag: 'Sign-in', access: { kind: 'public' } },
    async ({ req, res }) => {
      await new Promise<void>((resolve) => req.session.destroy(() => resolve()));
      res.clearCookie('brink.sid', { path: '/' });
      res.status(204).end();
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/auth/me',
      summary: 'The signed-in person with their site roles',
      tag: 'Sign-in',
      access: { kind: 'signedIn' },
    },
    async ({ user }) => ({ user: await loadMe(db, user!.id) }),
  );

  api.route(
    {
      method: 'post',
      path: '/api/auth/forgot-password',
      summary: 'E-mail a password reset link (answers the same whether or not the address is known)',
      tag: 'Sign-in',
      access: { kind: 'public' },
      body: forgotPasswordSchema,
      before: [perIp],
      responses: { 202: 'Accepted' },
    },
    async ({ body, res, deps }) => {
      const u = await db.selectFrom('users').select(['id', 'name', 'email']).where('email', '=', body.email).where('active', '=', true).executeTakeFirst();
      if (u) {
        const { token, hash } = newToken();
        await db
          .insertInto('password_resets')
          .values({ user_id: u.id, token_hash: hash, expires_at: new Date(deps.now().getTime() + RESET_HOURS * 3600_000) })
          .execute();
        await deps.mailer.send({
          to: u.email,
          ...notice({
            subject: 'Reset your Brink password',
            lines: [
              `Hello ${u.name},`,
              `Someone asked to reset the password of your Brink account. The link works once, for ${RESET_HOURS} hour. If it was not you, ignore this message; your password stays as it is.`,
            ],
            link: { label: 'Choose a new password', url: `${config.publicUrl}/reset-password?token=${token}` },
          }),
        });
        await audit(db, { actorId: u.id, entity: 'user', entityId: u.id, action: 'password-reset-requested' });
      }
      res.status(202).json({ message: 'If that address has an account, a reset link is on its way.' });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/auth/reset-password',
      summary: 'Set a new password with the link from the reset e-mail',
      tag: 'Sign-in',
      access: { kind: 'public' },
      body: resetPasswordSchema,
    },
    async ({ body, deps }) => {
      const hash = await bcrypt.hash(body.password, BCRYPT_COST);
      await db.transaction().execute(async (trx) => {
        const row = await trx
          .updateTable('password_resets')
          .set({ used_at: deps.now() })
          .where('token_hash', '=', hashToken(body.token))
          .where('used_at', 'is', null)
          .where('expires_at', '>', deps.now())
          .returning('user_id')
          .executeTakeFirst();
        if (!row) throw new HttpError(400, 'invalid_token', 'This reset link has expired or was already used. Ask for a new one.', { token: 'has expired or was already used' });
        await trx.updateTable('users').set({ password_hash: hash }).where('id', '=', row.user_id).execute();
        // Every other session of that person ends.
        await endSessionsOf(trx, row.user_id);
        await audit(trx, { actorId: row.user_id, entity: 'user', entityId: row.user_id, action: 'password-reset' });
      });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/invitations/:token',
      summary: 'What an invitation link offers (before accepting it)',
      tag: 'People',
      access: { kind: 'public' },
      params: z.object({ token: z.string().min(20).max(200) }),
    },
    async ({ params, deps }) => {
      const inv = await db
        .selectFrom('invitations')
        .leftJoin('sites', 'sites.id', 'invitations.site_id')
        .select(['invitations.email', 'invitations.name', 'invitations.role', 'invitations.used_at', 'invitations.expires_at', 'sites.name as siteName'])
        .where('token_hash', '=', hashToken(params.token))
        .executeTakeFirst();
      if (!inv) throw new HttpError(404, 'not_found', 'This invitation link is not valid.');
      if (inv.used_at || new Date(inv.expires_at) <= deps.now()) {
        throw new HttpError(410, 'invalid_token', 'This invitation has expired or was already used. Ask an administrator for a new one.');
      }
      return { email: inv.email, name: inv.name, siteName: inv.siteName ?? null, role: inv.role };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/invitations/accept',
      summary: 'Accept an invitation: set a name and password and sign in',
      tag: 'People',
      access: { kind: 'public' },
      body: acceptInvitationSchema,
    },
    async ({ req, body, deps }) => {
      const hash = await bcrypt.hash(body.password, BCRYPT_COST);
      const userId = await db.transaction().execute(async (trx) => {
        const inv = await trx
          .updateTable('invitations')
          .set({ used_at: deps.now() })
          .where('token_hash', '=', hashToken(body.token))
          .where('used_at', 'is', null)
          .where('expires_at', '>', deps.now())
          .returningAll()
          .executeTakeFirst();
        if (!inv) throw new HttpError(400, 'invalid_token', 'This invitation has expired or was already used. Ask an administrator for a new one.', { token: 'has expired or was already used' });
        const existing = await trx.selectFrom('users').select('id').where('email', '=', inv.email).executeTakeFirst();
        let id: number;
        if (existing) {
          await trx.updateTable('users').set({ name: body.name, password_hash: hash, active: true, ...(inv.is_admin ? { is_admin: true } : {}) }).where('id', '=', existing.id).execute();
          id = existing.id;
        } else {
          id = (await trx.insertInto('users').values({ email: inv.email, name: body.name, password_hash: hash, is_admin: inv.is_admin }).returning('id').executeTakeFirstOrThrow()).id;
        }
        if (inv.site_id && inv.role) {
          await trx
            .insertInto('site_members')
            .values({ site_id: inv.site_id, user_id: id, role: inv.role })
            .onConflict((oc) => oc.columns(['site_id', 'user_id']).doUpdateSet({ role: inv.role! }))
            .execute();
        }
        await audit(trx, { actorId: id, siteId: inv.site_id, entity: 'invitation', entityId: inv.id, action: 'accepted' });
        return id;
      });
      await signInSession(req, userId);
      return { user: await loadMe(db, userId) };
    },
  );
}
