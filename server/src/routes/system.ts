import { sql } from 'kysely';
import { z } from 'zod';
import type { Request } from 'express';
import { connectionLossCount } from '@db/database';
import { Api, forbidden, HttpError } from '../http';
import { containsPattern } from '../services/search';
import { openApiDocument } from '../openapi';
import { caughtMailAnswer, configAnswer, healthAnswer, openApiAnswer } from '@shared/schemas/system';

export function registerSystemRoutes(api: Api): void {
  const { db, config } = api.deps;
  const reachable = databaseProbe(() => sql`select 1`.execute(db).then(() => undefined));

  api.route(
    {
      method: 'get',
      path: '/api/health',
      response: healthAnswer,
      summary: 'Whether the server and its database answer',
      tag: 'System',
      access: { kind: 'public' },
    },
    async ({ res }) => {
      if (!(await reachable())) {
        res.status(503).json({ ok: false, database: 'unreachable' });
        return;
      }
      return { ok: true, database: 'ok', demo: config.demo, mailCatcher: config.mailCatcher.enabled } as const;
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/config',
      response: configAnswer,
      summary: 'Settings the browser needs (map tiles)',
      tag: 'System',
      access: { kind: 'public' },
    },
    () => ({ mapTileUrl: config.mapTileUrl, mapTileAttribution: config.mapTileAttribution, demo: config.demo }),
  );

  api.route(
    {
      method: 'get',
      path: '/api/dev/mail',
      response: caughtMailAnswer,
      summary:
        'Messages kept by the local mail catcher, newest first (only while the catcher is on; administrators, or callers on this machine)',
      tag: 'System',
      access: { kind: 'public' },
      query: z.object({ to: z.string().optional(), limit: z.coerce.number().int().min(1).max(500).default(100) }),
    },
    async ({ query, req, user }) => {
      if (!config.mailCatcher.enabled) throw new HttpError(404, 'not_found', 'The local mail catcher is off.');
      // Caught mail holds sign-in links: programs on this machine (the installation's operator, tests)
      // read it all; from elsewhere only an administrator, and only mail to their organisation's people
      // and invitations.
      const local = fromThisMachine(req);
      if (!local && !user?.isAdmin) throw forbidden('Only an administrator may read caught mail.');
      let q = db.selectFrom('caught_mail').selectAll().orderBy('id', 'desc').limit(query.limit);
      if (!local && user) {
        const org = user.organisationId;
        // mail_to lists the envelope's addresses ("a@x, b@y"): an address must be one of them, not a part of one.
        const isRecipient = sql<boolean>`lower(email) = any(string_to_array(replace(lower(caught_mail.mail_to), ' ', ''), ','))`;
        q = q.where(({ or, exists, selectFrom }) =>
          or([
            exists(selectFrom('users').select('id').where('organisation_id', '=', org).where(isRecipient)),
            exists(selectFrom('invitations').select('id').where('organisation_id', '=', org).where(isRecipient)),
          ]),
        );
      }
      if (query.to) q = q.where('mail_to', 'ilike', containsPattern(query.to));
      const rows = await q.execute();
      return {
        messages: rows.map((r) => ({
          id: r.id,
          from: r.mail_from,
          to: r.mail_to,
          subject: r.subject,
          text: r.text,
          html: r.html,
          date: new Date(r.received_at).toISOString(),
        })),
      };
    },
  );

  api.route(
    {
      method: 'get',
      path: '/api/openapi.json',
      response: openApiAnswer,
      summary: 'This document',
      tag: 'System',
      access: { kind: 'public' },
    },
    () => openApiDocument(api.specs),
  );
}

function fromThisMachine(req: Request): boolean {
  const a = req.socket.remoteAddress ?? '';
  const loopback = a === '::1' || a.startsWith('127.') || a.startsWith('::ffff:127.');
  return loopback && !req.headers['x-forwarded-for'];
}

/** How long a ping's answer (reachable or not) stands for every health request (ms). */
export const PING_FRESH_MS = 1000;

/**
 * Whether the database answers, pinged at most once per PING_FRESH_MS: requests within that time of
 * the last answer share it, and concurrent requests share one ping in flight. An outage shows on
 * /api/health at once when a pooled connection breaks, else within a second (503, database:
 * unreachable); the recovery within a second.
 */
export function databaseProbe(
  ping: () => Promise<void>,
  clock: () => number = () => performance.now(),
  losses: () => number = connectionLossCount,
): () => Promise<boolean> {
  let answer: { ok: boolean; at: number; losses: number } | null = null;
  let inFlight: Promise<boolean> | null = null;
  return () => {
    // A connection lost since the answer (PostgreSQL stopped or restarted) makes it stale at once.
    if (answer && clock() - answer.at < PING_FRESH_MS && answer.losses === losses()) return Promise.resolve(answer.ok);
    inFlight ??= ping()
      .then(
        () => true,
        () => false,
      )
      .then((ok) => {
        answer = { ok, at: clock(), losses: losses() };
        inFlight = null;
        return ok;
      });
    return inFlight;
  };
}
