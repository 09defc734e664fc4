import bcrypt from 'bcryptjs';
import { rateLimit } from 'express-rate-limit';
import type { Request } from 'express';
import { z } from 'zod';
import {
  acceptInvitationSchema,
  invitationOfferAnswer,
  messageAnswer,
  myUnitsSchema,
  signedInAnswer,
  forgotPasswordSchema,
  resetPasswordSchema,
  signInSchema,
} from '@shared/schemas/auth';
import { Api, HttpError } from '../http';
import { audit } from '../services/audit';
import { endSessionsOf, loadMe, revokeResets } from '../services/people';
import { hashToken, newToken, RESET_HOURS } from '../services/tokens';
import { notice } from '../mail/mailer';
import { ThrottleStore } from '../services/throttle';

const BCRYPT_COST = 12;
// Compared against when the address is unknown, so both answers take as long.
const DUMMY_HASH = bcrypt.hashSync('not-a-real-password', BCRYPT_COST);

declare module 'express-session' {
  interface SessionData {
    userId: number;
    /** When the session's expiry was last moved on (ms since 1970; see app.ts, SESSION_TOUCH_MS). */
    touchedAt?: number;
  }
}

/** Starts a fresh session for the person (a new id, so a planted session id is worthless). */
async function signInSession(req: Request, userId: number): Promise<void> {
  await new Promise<void>((resolve, reject) => req.session.regenerate((err) => (err ? reject(err) : resolve())));
  req.session.userId = userId;
  req.session.touchedAt = Date.now();
  await new Promise<void>((resolve, reject) => req.session.save((err) => (err ? reject(err) : resolve())));
}

const tooMany = (message: string) => ({ error: { code: 'rate_limited', message } });

export function registerAuthRoutes(api: Api): void {
  const { db, config } = api.deps;
  const window = 15 * 60 * 1000;
  const { signInPerIp, signIn, signInAccount, forgotPerIp, forgotPerAccount, decisionPassword } = api.throttles;
  const perIp = rateLimit({
    windowMs: window,
    store: new ThrottleStore(signInPerIp),
    limit: config.signInLimitPerIp,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    message: tooMany('Too many sign-in attempts from this address. Wait a few minutes and try again.'),
  });
  const accountKey = (email: string) => `${email.trim().toLowerCase()}|`;

  api.route(
    {
      method: 'post',
      path: '/api/auth/sign-in',
      response: signedInAnswer,
      summary: 'Sign in with e-mail and password',
      tag: 'Sign-in',
      access: { kind: 'public' },
      body: signInSchema,
      before: [perIp],
      responses: { 200: 'Signed in: the person and their site roles', 401: 'Wrong e-mail or password', 429: 'Too many attempts' },
    },
    async ({ req, body }) => {
      // Failures are counted per account and address together (an attacker elsewhere cannot lock
      // the owner out), and per account over all addresses at five times that (bounding guesses
      // spread over many addresses). A successful reset clears both.
      const here = `${accountKey(body.email)}${req.ip ?? ''}`;
      const everywhere = `${accountKey(body.email)}*`;
      if ((await signIn.blocked(here)) || (await signInAccount.blocked(everywhere))) {
        throw new HttpError(429, 'rate_limited', 'Too many failed sign-ins for this account. Wait 15 minutes or reset the password.');
      }
      const u = await db.selectFrom('users').select(['id', 'password_hash', 'active']).where('email', '=', body.email).executeTakeFirst();
      const ok = await bcrypt.compare(body.password, u?.password_hash ?? DUMMY_HASH);
      if (!u || !ok || !u.active || !u.password_hash) {
        await signIn.hit(here);
        await signInAccount.hit(everywhere);
        throw new HttpError(401, 'bad_credentials', 'That e-mail and password do not match an active account.');
      }
      await signInSession(req, u.id);
      // Signing in proves the password: the count of wrong ones under decisions starts again.
      await decisionPassword.clear(`${u.id}|`);
      await audit(db, { actorId: u.id, entity: 'user', entityId: u.id, action: 'signed-in' });
      return { user: await loadMe(db, u.id) };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/auth/sign-out',
      responses: { 204: 'Signed out' },
      summary: 'Sign out',
      tag: 'Sign-in',
      access: { kind: 'public' },
    },
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
      response: signedInAnswer,
      summary: 'The signed-in person with their site roles',
      tag: 'Sign-in',
      access: { kind: 'signedIn' },
    },
    async ({ user }) => ({ user: await loadMe(db, user.id) }),
  );

  api.route(
    {
      method: 'patch',
      path: '/api/auth/me',
      response: signedInAnswer,
      summary: 'Choose my units: metric, US customary, or null to follow each site (figures stay in SI in the API)',
      tag: 'Sign-in',
      access: { kind: 'signedIn' },
      body: myUnitsSchema,
    },
    async ({ user, body }) => {
      await db.transaction().execute(async (trx) => {
        await trx.updateTable('users').set({ units: body.units }).where('id', '=', user.id).execute();
        await audit(trx, { actorId: user.id, entity: 'user', entityId: user.id, action: 'units-chosen', detail: body });
      });
      return { user: await loadMe(db, user.id) };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/auth/forgot-password',
      response: messageAnswer,
      summary: 'E-mail a password reset link (answers the same whether or not the address is known)',
      tag: 'Sign-in',
      access: { kind: 'public' },
      body: forgotPasswordSchema,
      responses: { 202: 'Accepted', 429: 'Too many requests from this address' },
    },
    async ({ req, body, res, deps }) => {
      // Per address: refused openly. Per account: quietly (the answer must not tell whether the
      // address has an account), so at most FORGOT_PER_ACCOUNT mails an hour.
      if (!(await forgotPerIp.hit(req.ip ?? '')))
        throw new HttpError(429, 'rate_limited', 'Too many password reset requests from this address. Wait a few minutes and try again.');
      // The same answer at once for known and unknown addresses; the work is done after it.
      res.status(202).json({ message: 'If that address has an account, a reset link is on its way.' });
      if (!(await forgotPerAccount.hit(accountKey(body.email)))) return;
      void sendReset(body.email, deps).catch((e: unknown) => console.error('[forgot-password]', e));
    },
  );

  async function sendReset(email: string, deps: typeof api.deps): Promise<void> {
    const u = await db
      .selectFrom('users')
      .select(['id', 'name', 'email'])
      .where('email', '=', email)
      .where('active', '=', true)
      .executeTakeFirst();
    if (u) {
      const { token, hash } = newToken();
      await db.transaction().execute(async (trx) => {
        // A new link revokes the older ones (the person's row locked, so concurrent requests queue).
        await trx.selectFrom('users').select('id').where('id', '=', u.id).forUpdate().execute();
        await revokeResets(trx, u.id, deps.now());
        await trx
          .insertInto('password_resets')
          .values({ user_id: u.id, token_hash: hash, expires_at: new Date(deps.now().getTime() + RESET_HOURS * 3600_000) })
          .execute();
        await deps.mailer.send(trx, {
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
        await audit(trx, { actorId: u.id, entity: 'user', entityId: u.id, action: 'password-reset-requested' });
      });
    }
  }

  api.route(
    {
      method: 'post',
      path: '/api/auth/reset-password',
      responses: { 204: 'The password is changed; other sessions and reset links end' },
      summary: 'Set a new password with the link from the reset e-mail',
      tag: 'Sign-in',
      access: { kind: 'public' },
      body: resetPasswordSchema,
    },
    async ({ body, deps }) => {
      const hash = await bcrypt.hash(body.password, BCRYPT_COST);
      const email = await db.transaction().execute(async (trx) => {
        const row = await trx
          .updateTable('password_resets')
          .set({ used_at: deps.now() })
          .where('token_hash', '=', hashToken(body.token))
          .where('used_at', 'is', null)
          .where('expires_at', '>', deps.now())
          .returning('user_id')
          .executeTakeFirst();
        if (!row)
          throw new HttpError(400, 'invalid_token', 'This reset link has expired or was already used. Ask for a new one.', {
            token: 'has expired or was already used',
          });
        const person = await trx
          .updateTable('users')
          .set({ password_hash: hash })
          .where('id', '=', row.user_id)
          .returning('email')
          .executeTakeFirstOrThrow();
        // Every other session and reset link of that person ends (and, once committed, the sign-in locks on the account clear).
        await endSessionsOf(trx, row.user_id);
        await revokeResets(trx, row.user_id, deps.now());
        await audit(trx, { actorId: row.user_id, entity: 'user', entityId: row.user_id, action: 'password-reset' });
        return person.email;
      });
      await signIn.clear(accountKey(email));
      await signInAccount.clear(accountKey(email));
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/invitations/:token',
      response: invitationOfferAnswer,
      summary: 'What an invitation link offers (before accepting it)',
      tag: 'People',
      access: { kind: 'public' },
      params: z.object({ token: z.string().min(20).max(200) }),
    },
    async ({ params, deps }) => {
      const inv = await db
        .selectFrom('invitations')
        .leftJoin('sites', 'sites.id', 'invitations.site_id')
        .select([
          'invitations.email',
          'invitations.name',
          'invitations.role',
          'invitations.used_at',
          'invitations.expires_at',
          'sites.name as siteName',
        ])
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
      response: signedInAnswer,
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
        if (!inv)
          throw new HttpError(
            400,
            'invalid_token',
            'This invitation has expired or was already used. Ask an administrator for a new one.',
            { token: 'has expired or was already used' },
          );
        const existing = await trx
          .selectFrom('users')
          .select(['id', 'active', 'organisation_id'])
          .where('email', '=', inv.email)
          .executeTakeFirst();
        // A person belongs to one organisation; an invitation from another cannot move them.
        if (existing && existing.organisation_id !== inv.organisation_id) {
          throw new HttpError(
            409,
            'conflict',
            'This address already has an account with another organisation on this Brink; an invitation cannot move it. Ask the administrator who invited you.',
          );
        }
        if (existing && !existing.active) {
          throw new HttpError(
            403,
            'deactivated',
            'This account has been deactivated; an invitation cannot reactivate it. Ask an administrator.',
          );
        }
        let id: number;
        if (existing) {
          await trx
            .updateTable('users')
            .set({ name: body.name, password_hash: hash, active: true, ...(inv.is_admin ? { is_admin: true } : {}) })
            .where('id', '=', existing.id)
            .execute();
          id = existing.id;
        } else {
          id = (
            await trx
              .insertInto('users')
              .values({
                organisation_id: inv.organisation_id,
                email: inv.email,
                name: body.name,
                password_hash: hash,
                is_admin: inv.is_admin,
              })
              .returning('id')
              .executeTakeFirstOrThrow()
          ).id;
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
