import path from 'node:path';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import express, { type Express, type RequestHandler } from 'express';
import session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import helmet from 'helmet';
import compression from 'compression';
import pg from 'pg';
import { createPool } from '@db/database';
import type { Deps } from './deps';
import { Api, errorHandler, HttpError } from './http';
import { sameOrigin } from './csrf';
import { setPlainMessages } from '@shared/schemas/messages';
import { registerAuthRoutes } from './routes/auth';
import { registerFieldRoutes } from './routes/field';
import { registerExcavationRoutes } from './routes/excavations';
import { registerPeopleRoutes } from './routes/people';
import { registerPlantRoutes } from './routes/plant';
import { registerSitePlanRoutes } from './routes/site-plan';
import { registerSiteRoutes } from './routes/sites';
import { registerSystemRoutes } from './routes/system';
import { registerUploadRoutes } from './routes/uploads';
import { registerPermitRoutes } from './routes/permits';
import { registerDashboardRoutes } from './routes/dashboard';
import { registerInspectionRoutes } from './routes/inspections';
import { registerPushRoutes } from './routes/push';
import { pageShell } from './shell';

const clientDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../dist/client');

/** Builds the Express app (API and the built client) without listening: tests drive it directly. */
/** A session ends this long after its last use. */
const SESSION_MAX_AGE_MS = 12 * 3600_000;
/** A session's expiry moves on at most this often (one write a minute, not one a request). */
const SESSION_TOUCH_MS = 60_000;

export function createApp(deps: Deps, opts: { sessionPool?: pg.Pool; log?: boolean } = {}): Express {
  const { config } = deps;
  // The shared schemas' refusals in plain words ("is required", never "expected number, received null").
  setPlainMessages();
  const app = express();
  app.disable('x-powered-by');
  // Forwarded client addresses (the per-address limits) and https (the Secure cookie) are believed
  // only from these proxies: loopback, or the load balancer's addresses in TRUST_PROXY.
  app.set('trust proxy', config.trustProxy);

  const tileOrigin = config.mapTileUrl ? safeOrigin(config.mapTileUrl) : null;
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:', ...(tileOrigin ? [tileOrigin] : [])],
          fontSrc: ["'self'"],
          connectSrc: ["'self'"],
          workerSrc: ["'self'"],
          manifestSrc: ["'self'"],
          objectSrc: ["'none'"],
          frameAncestors: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
        },
      },
      crossOriginEmbedderPolicy: false,
    }),
  );

  // gzip for whatever a browser accepts it for (the scripts, styles and page; JSON answers over 1 KB).
  // The health check's answer is under 1 KB and never gzipped, so it skips the wrapping too.
  app.use(exceptHealth(compression()));

  // One line a call; not the health check, which a balancer or monitor asks every few seconds.
  if (opts.log ?? config.env !== 'test') {
    app.use((req, res, next) => {
      if (req.path === HEALTH) return next();
      const t0 = process.hrtime.bigint();
      res.on('finish', () => {
        if (!req.originalUrl.startsWith('/api')) return;
        const ms = Number(process.hrtime.bigint() - t0) / 1e6;
        console.log(`${new Date().toISOString()} ${req.method} ${req.originalUrl.split('?')[0]} ${res.statusCode} ${ms.toFixed(1)} ms`);
      });
      next();
    });
  }

  // Changes only from Brink's own pages, bodies uncompressed (server/src/csrf.ts).
  app.use('/api', sameOrigin(config.publicUrl));

  // Sessions: one read of the session row per request, and a write at most once a minute. A session
  // still ends 12 hours after its last use (to within a minute): when the last move of its expiry is
  // over SESSION_TOUCH_MS old, the request marks the session (touchedAt), so express-session saves it
  // with a new expiry and sends the cookie again; otherwise nothing is written (rolling: false, and
  // connect-pg-simple's per-request touch is off).
  const PgStore = connectPgSimple(session);
  const sessionPool = opts.sessionPool ?? createPool(config.databaseUrl, 4, { name: 'sessions' });
  // While PostgreSQL is down a session cannot be read: the call answers 503 (errorHandler) and
  // the session is there again when PostgreSQL is back. The health check reads no session.
  const sessions = session({
    name: 'brink.sid',
    store: new PgStore({
      pool: sessionPool,
      tableName: 'session',
      createTableIfMissing: false,
      pruneSessionInterval: 15 * 60,
      disableTouch: true,
      errorLog: (...args: unknown[]) => console.error('[sessions]', ...args.map((a) => (a instanceof Error ? a.message : a))),
    }),
    secret: config.sessionSecret,
    resave: false,
    saveUninitialized: false,
    rolling: false,
    cookie: { httpOnly: true, sameSite: 'lax', secure: 'auto', maxAge: SESSION_MAX_AGE_MS, path: '/' },
  });
  app.use('/api', (req, res, next) => (req.path === '/health' ? next() : sessions(req, res, next)));
  app.use('/api', (req, _res, next) => {
    const s = req.session;
    if (s?.userId && Date.now() - (s.touchedAt ?? 0) >= SESSION_TOUCH_MS) {
      s.touchedAt = Date.now();
      s.touch(); // the cookie's expiry: 12 hours from now
    }
    next();
  });
  app.use('/api', express.json({ limit: '2mb' }));
  // Who is signed in: the session holds only the id; the guard of each route (Api.route in http.ts)
  // reads the person fresh, with the site and membership the route needs, in one query.

  const api = new Api(deps);
  registerSystemRoutes(api);
  registerAuthRoutes(api);
  registerPeopleRoutes(api);
  registerSiteRoutes(api);
  registerUploadRoutes(api);
  registerPermitRoutes(api);
  registerPlantRoutes(api);
  registerFieldRoutes(api);
  registerExcavationRoutes(api);
  registerSitePlanRoutes(api);
  registerInspectionRoutes(api);
  registerDashboardRoutes(api);
  registerPushRoutes(api);
  app.use('/api', api.router);
  app.use('/api', (_req, _res, next) => next(new HttpError(404, 'not_found', 'No such API route.')));

  if (existsSync(path.join(clientDir, 'index.html'))) {
    const shell = pageShell(clientDir);
    app.use(express.static(clientDir, { index: false, maxAge: '1h', setHeaders: noCacheForShell }));
    app.get(/^(?!\/api\/).*/, (req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.type('html').send(shell(req.path));
    });
  }
  app.use(errorHandler);
  return app;
}

/** The health check's address (routes/system.ts). */
const HEALTH = '/api/health';
/** A middleware that the health check passes by. */
function exceptHealth(handler: RequestHandler): RequestHandler {
  return (req, res, next) => (req.path === HEALTH ? next() : handler(req, res, next));
}

function noCacheForShell(res: express.Response, file: string): void {
  if (!file.includes(`${path.sep}assets${path.sep}`)) res.setHeader('Cache-Control', 'no-cache');
}

function safeOrigin(url: string): string | null {
  try {
    return new URL(url.replace(/\{[a-z]\}/g, 'a')).origin;
  } catch {
    return null;
  }
}
