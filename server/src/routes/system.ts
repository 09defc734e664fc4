import { sql } from 'kysely';
import { z } from 'zod';
import type { Request } from 'express';
import { Api, forbidden, HttpError } from '../http';
import { openApiDocument } from '../openapi';

export function registerSystemRoutes(api: Api): void {
  const { db, config } = api.deps;

  api.route(
    { method: 'get', path: '/api/health', summary: 'Whether the server and its database answer', tag: 'System', access: { kind: 'public' } },
    async ({ res }) => {
      try {
        await sql`select 1`.execute(db);
      } catch {
        res.status(503).json({ ok: false, database: 'unreachable' });
        return;
      }
      return { ok: true, database: 'ok', demo: config.demo, mailCatcher: config.mailCatcher.enabled };
    },
  );

  api.route(
    { method: 'get', path: '/api/config', summary: 'Settings the browser needs (map tiles)', tag: 'System', access: { kind: 'public' } },
    () => ({ mapTileUrl: config.mapTileUrl, mapTileAttribution: config.mapTileAttribution, demo: config.demo }),
  );

  api.route(
    {
      method: 'get',
      path: '/api/dev/mail',
      summary: 'Messages kept by the local mail catcher, newest first (only while the catcher is on; administrators, or callers on this machine)',
      tag: 'System',
      access: { kind: 'public' },
      query: z.object({ to: z.string().optional(), limit: z.coerce.number().int().min(1).max(500).default(100) }),
    },
    async ({ query, req, user }) => {
      if (!config.mailCatcher.enabled) throw new HttpError(404, 'not_found', 'The local mail catcher is off.');
      // Caught mail holds sign-in links: only administrators, or programs on this machine (tests).
      if (!user?.isAdmin && !fromThisMachine(req)) throw forbidden('Only an administrator may read caught mail.');
      let q = db.selectFrom('caught_mail').selectAll().orderBy('id', 'desc').limit(query.limit);
      if (query.to) q = q.where('mail_to', 'ilike', `%${query.to.replace(/[%_\\]/g, (c) => `\\${c}`)}%`);
      const rows = await q.execute();
      return {
        messages: rows.map((r) => ({ id: r.id, from: r.mail_from, to: r.mail_to, subject: r.subject, text: r.text, html: r.html, date: new Date(r.received_at).toISOString() })),
      };
    },
  );

  api.route(
    { method: 'get', path: '/api/openapi.json', summary: 'This document', tag: 'System', access: { kind: 'public' } },
    () => openApiDocument(api.specs),
  );
}

function fromThisMachine(req: Request): boolean {
  const a = req.socket.remoteAddress ?? '';
  const loopback = a === '::1' || a.startsWith('127.') || a.startsWith('::ffff:127.');
  return loopback && !req.headers['x-forwarded-for'];
}
