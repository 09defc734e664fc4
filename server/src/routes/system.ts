import { sql } from 'kysely';
import { z } from 'zod';
import { Api, HttpError } from '../http';
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
      summary: 'Messages kept by the local mail catcher, newest first (only while the catcher is on)',
      tag: 'System',
      access: { kind: 'public' },
      query: z.object({ to: z.string().optional(), limit: z.coerce.number().int().min(1).max(500).default(100) }),
    },
    async ({ query }) => {
      if (!config.mailCatcher.enabled) throw new HttpError(404, 'not_found', 'The local mail catcher is off.');
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
