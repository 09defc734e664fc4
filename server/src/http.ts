import express, { type NextFunction, type Request, type RequestHandler, type Response, type Router } from 'express';
import { z, type ZodType } from 'zod';
import { idSchema, type SiteRole } from '@shared/schemas/common';
import type { Deps } from './deps';
import { bodyTypeProblem, crossSite } from './csrf';
import { Throttle } from './services/throttle';
import { discardUnkept } from './services/uploads';
import { refusalInReaderUnits } from './services/units';
import { sql } from 'kysely';
import { isDatabaseUnavailable, PREPARED } from '@db/database';
import { isOutOfRange } from './services/pg-errors';
import { promisify } from 'node:util';
import { brotliCompress, constants as zlibConstants, gzip as gzipCallback } from 'node:zlib';

const QUARTER_HOUR = 15 * 60_000;
/** The attempt limits (issue 12). Sign-in: SIGNIN_LIMIT_PER_ACCOUNT failures per account and address, five times that per account. */
function createThrottles(deps: Deps) {
  const now = () => deps.now().getTime();
  // Counted in PostgreSQL, shared by every server of one installation; the namespace keeps test apps on one database apart.
  const throttle = (name: string, limit: number, windowMs: number) =>
    new Throttle(deps.db, `${deps.namespace}:${name}`, limit, windowMs, now);
  return {
    /** Sign-in failures per address (express-rate-limit's store): SIGNIN_LIMIT_PER_IP a quarter hour. */
    signInPerIp: throttle('sign-in-ip', deps.config.signInLimitPerIp, QUARTER_HOUR),
    signIn: throttle('sign-in', deps.config.signInLimitPerAccount, QUARTER_HOUR),
    signInAccount: throttle('sign-in-account', deps.config.signInLimitPerAccount * 5, QUARTER_HOUR),
    /** Forgot-password: 10 requests per address a quarter hour; 3 mails per account an hour (quietly). */
    forgotPerIp: throttle('forgot-ip', 10, QUARTER_HOUR),
    forgotPerAccount: throttle('forgot-account', 3, 60 * 60_000),
    /** The password that signs a permit decision: SIGNIN_LIMIT_PER_ACCOUNT failures per person a quarter hour, then every session of theirs ends. */
    decisionPassword: throttle('decision-password', deps.config.signInLimitPerAccount, QUARTER_HOUR),
  };
}

/** An error with an HTTP status that the error handler turns into `{ error: { code, message, fields? } }`. */
export class HttpError extends Error {
  constructor(
    public readonly status: number,
    public readonly code: string,
    message: string,
    public readonly fields?: Record<string, string>,
  ) {
    super(message);
  }
}

export const notFound = (what = 'That') => new HttpError(404, 'not_found', `${what} was not found.`);
export const forbidden = (message = 'Your role does not allow this.') => new HttpError(403, 'forbidden', message);
export const conflict = (message: string) => new HttpError(409, 'conflict', message);
export const badRequest = (message: string, fields?: Record<string, string>) => new HttpError(400, 'invalid', message, fields);
/**
 * 400 naming each field (field → reason) when there is any; nothing when `fields` is empty.
 * `where` names what was sent ("request", "query", "path").
 */
export function refuseFields(fields: Record<string, string>, where = 'request'): void {
  if (Object.keys(fields).length) throw refusal(fields, where);
}

/** The 400 that names each field and its reason, in one sentence and by field. */
function refusal(fields: Record<string, string>, where: string): HttpError {
  const list = Object.entries(fields).map(([k, v]) => `${k} ${v}`);
  return badRequest(`Please correct the ${where}: ${list.join('; ')}`, fields);
}

/** Turns zod issues into a field → reason map, paths written as `a.b[0].c`. */
export function zodFields(error: z.ZodError): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) {
    const key =
      issue.path.reduce<string>((acc, p) => (typeof p === 'number' ? `${acc}[${p}]` : acc ? `${acc}.${String(p)}` : String(p)), '') ||
      '(body)';
    fields[key] ??= issue.message;
  }
  return fields;
}

const LONE_SURROGATE = /[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/;

/**
 * Text PostgreSQL cannot keep (and no person types): a NUL character, or half of a UTF-16
 * surrogate pair. Checked once for every request's body, query and path (`Api.route`), before any
 * schema, so every text field answers 400 naming its path instead of 500 from the database.
 */
export function badText(value: unknown): Record<string, string> {
  const out: Record<string, string> = {};
  const bad = (s: string) =>
    s.includes('\u0000')
      ? 'must not contain a NUL character (\\u0000)'
      : LONE_SURROGATE.test(s)
        ? 'must not contain half of a surrogate pair (e.g. \\ud800): send well-formed text'
        : null;
  // An explicit stack, not recursion: a deeply nested body cannot exhaust the call stack.
  const stack: [unknown, string][] = [[value, '']];
  while (stack.length) {
    const [v, path] = stack.pop()!;
    if (typeof v === 'string') {
      const why = bad(v);
      if (why) out[path || '(body)'] ??= why;
    } else if (Array.isArray(v)) {
      v.forEach((x, i) => stack.push([x, `${path}[${i}]`]));
    } else if (v && typeof v === 'object') {
      for (const [k, x] of Object.entries(v)) {
        if (bad(k)) out[`${path ? `${path}.` : ''}${JSON.stringify(k).slice(1, -1)}`] = 'is not an acceptable field name';
        else stack.push([x, path ? `${path}.${k}` : k]);
      }
    }
  }
  return out;
}

function refuseBadText(value: unknown, where: string): void {
  refuseFields(badText(value), where);
}

export function parseOr400<T>(schema: ZodType<T>, value: unknown, where: string): T {
  const r = schema.safeParse(value);
  if (!r.success) throw refusal(zodFields(r.error), where);
  return r.data;
}

export interface SessionUser {
  id: number;
  email: string;
  name: string;
  /** Administrator of their own organisation (never of another). */
  isAdmin: boolean;
  /** The organisation the person belongs to: everything they read or change is of it (services/organisation.ts). */
  organisationId: number;
}

/**
 * Who may call a route; decided before the body is read, so a forbidden call answers 403 whatever
 * it carries.
 * - `public`: anyone. `signedIn`: any active person. `admin`: administrators (of their own
 *   organisation: what such a route reads or changes is scoped with services/organisation.ts).
 * - `site`: members of the site that `siteId` names (from the path, or from the resource the path
 *   names; `null` there means the resource does not exist → 404) whose role is in `roles`;
 *   administrators of the site's organisation too when `admin` is true. A site of another
 *   organisation is not found (404).
 */
export type Access =
  | { kind: 'public' }
  | { kind: 'signedIn' }
  | { kind: 'admin' }
  | {
      kind: 'site';
      roles: readonly SiteRole[] | 'any';
      admin?: boolean;
      siteId: (req: Request, deps: Deps) => number | null | undefined | SiteOfRow | Promise<number | null>;
      /**
       * The site is a filter the caller may leave out (`siteId` answers undefined): then any
       * signed-in person passes, with no grant, and the handler scopes what it reads itself.
       * Without `optional`, undefined is no such site (404).
       */
      optional?: boolean;
      /** Optional extra rule on the membership, e.g. the inspection duty. */
      allow?: (m: { role: SiteRole; canInspect: boolean }) => boolean;
    };

/** The `site` access rule alone (for route files that share one). */
export type SiteAccess = Extract<Access, { kind: 'site' }>;

/** The site a route was authorised on, with the person's role there (null for administrators without one). */
interface SiteGrant {
  id: number;
  role: SiteRole | null;
  canInspect: boolean;
}

/** Who the handler sees: on public routes whoever is signed in, if anyone; behind any other rule, always someone. */
type UserOf<A extends Access> = A extends { kind: 'public' } ? SessionUser | null : SessionUser;
/** The site grant: present exactly on `site` routes. */
type SiteOf<A extends Access> = A extends { kind: 'site'; optional: true }
  ? SiteGrant | null
  : A extends { kind: 'site' }
    ? SiteGrant
    : null;

interface RouteContext<B, Q, P, A extends Access = Access> {
  req: Request;
  res: Response;
  body: B;
  query: Q;
  params: P;
  /** The signed-in person; its type follows the route's access rule (`UserOf`). */
  user: UserOf<A>;
  /** The site the route was authorised on; its type follows the route's access rule (`SiteOf`). */
  site: SiteOf<A>;
  deps: Deps;
}

export interface RouteSpec<
  B extends ZodType,
  Q extends ZodType,
  P extends ZodType,
  A extends Access = Access,
  R extends ZodType = ZodType,
> {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  summary: string;
  tag: string;
  access: A;
  body?: B;
  query?: Q;
  params?: P;
  /** Middleware run after authorisation and before validation (e.g. multer for uploads). */
  before?: RequestHandler[];
  /**
   * A further authorisation rule that needs the record the path names (e.g. the role a permit's
   * action needs), run after `access` and before the body is validated: a forbidden call answers
   * 403 whatever its body holds. It sees the raw body, untrusted.
   */
  beforeBody?: (ctx: Omit<RouteContext<unknown, unknown, Out<P>, A>, 'body' | 'query'> & { rawBody: unknown }) => void | Promise<void>;
  /**
   * The schema of the JSON answer (shared/schemas/responses): the OpenAPI document's success
   * answer, the handler's return type and, under NODE_ENV=test, checked against every answer sent.
   * Routes that answer 204 or a file (`produces`) have none.
   */
  response?: R;
  /** Documented answers besides the usual errors, e.g. { 201: 'Created' }. */
  responses?: Record<number, string>;
  /** The body is multipart/form-data with these file fields. */
  files?: string[];
  /** With `files`: a multipart text field holding JSON of this schema (also accepted alone as application/json). */
  formJson?: { field: string; schema: ZodType };
  /** The answer is not JSON (a file, a PDF, CSV). */
  produces?: string;
}

type Out<S> = S extends ZodType ? z.output<S> : undefined;
/**
 * What a handler returns: the answer its response schema describes (`undefined` for 204; `void` when
 * it answers through `res` itself, which the test-mode check still sees). Dates may stand where the
 * wire has ISO strings: `res.json` writes them so.
 */
type Answer<R> = [R] extends [never] ? unknown : R extends ZodType ? Dated<z.input<R>> | JsonText | void : unknown;

/**
 * An answer already written as JSON (stored answers joined: services/excavations.ts), sent as it is;
 * under NODE_ENV=test it is parsed and checked against the route's schema like any other answer.
 */
export class JsonText {
  private readonly encoded = new Map<'br' | 'gzip', Promise<Buffer>>();
  constructor(readonly text: string) {}
  /**
   * The text compressed as the compression middleware would (brotli quality 4, gzip level 6), made
   * once per answer off the request thread: an answer kept and sent again (a whole site's
   * excavations) is compressed once.
   */
  compressed(encoding: 'br' | 'gzip'): Promise<Buffer> {
    let out = this.encoded.get(encoding);
    if (!out) {
      out =
        encoding === 'br'
          ? brotli(this.text, { params: { [zlibConstants.BROTLI_PARAM_QUALITY]: 4 } })
          : gzip(this.text, { level: zlibConstants.Z_DEFAULT_COMPRESSION });
      this.encoded.set(encoding, out);
    }
    return out;
  }
}
const brotli = promisify(brotliCompress);
const gzip = promisify(gzipCallback);

/** Sends JSON text compressed in the encoding the compression middleware would choose (it leaves an encoded answer alone). */
async function sendJsonText(req: Request, res: Response, out: JsonText): Promise<void> {
  const encoding = out.text.length < 1024 ? null : req.acceptsEncodings('br') ? 'br' : req.acceptsEncodings('gzip') ? 'gzip' : null;
  res.type('json');
  if (!encoding) {
    res.send(out.text);
    return;
  }
  const body = await out.compressed(encoding);
  res.setHeader('Content-Encoding', encoding);
  res.send(body);
}
type Dated<T> = T extends string
  ? string extends T
    ? T | Date
    : T
  : T extends (infer E)[]
    ? Dated<E>[]
    : T extends object
      ? { [K in keyof T]: Dated<T[K]> }
      : T;

/** What the OpenAPI document reads of a route: its declaration without the code that runs. */
export type RouteDoc = Omit<RouteSpec<ZodType, ZodType, ZodType>, 'beforeBody' | 'before'>;

/**
 * A site found through the row a path names (`siteOfRow`): the guard reads that row's site with the
 * person and their membership in one query, instead of one query each.
 */
interface SiteOfRow {
  table: 'permits' | 'excavations' | 'uploads';
  id: number;
}

/** The site of the row of `table` whose id is the path parameter `param` (null: no such row → 404). */
export const siteOfRow =
  (table: SiteOfRow['table'], param = 'id') =>
  (req: Request): SiteOfRow | null => {
    const n = Number(req.params[param]);
    return Number.isInteger(n) && n > 0 ? { table, id: n } : null;
  };

/** Site ids from the path parameter `siteId` (null: not an id). */
export const siteFromParam = (req: Request) => idSchema.safeParse(req.params.siteId).data ?? null;

/**
 * Site ids from the query parameter `siteId`; undefined when it is absent or not an id (the query's
 * schema then names it), for a site that is a filter (`optional`).
 */
export const siteFromQuery = (req: Request) => (req.query.siteId === undefined ? undefined : idSchema.safeParse(req.query.siteId).data);

/**
 * One place where every API route is declared: authorisation, validation and the OpenAPI document
 * all come from the same declaration.
 */
export class Api {
  readonly router: Router = express.Router();
  readonly specs: RouteDoc[] = [];

  /** Attempt limits, counted in PostgreSQL (server/src/services/throttle.ts). */
  readonly throttles: ReturnType<typeof createThrottles>;

  /** Under NODE_ENV=test every JSON answer is checked against its route's response schema. */
  readonly checkAnswers: boolean;

  constructor(readonly deps: Deps) {
    this.throttles = createThrottles(deps);
    this.checkAnswers = deps.config.env === 'test';
  }

  route<A extends Access, B extends ZodType = never, Q extends ZodType = never, P extends ZodType = never, R extends ZodType = never>(
    spec: RouteSpec<B, Q, P, A, R>,
    handler: (ctx: RouteContext<Out<B>, Out<Q>, Out<P>, A>) => Answer<R> | Promise<Answer<R>>,
  ): void {
    this.specs.push(spec);
    const checkAnswers = this.checkAnswers;
    const deps = this.deps;
    const guard: RequestHandler = async (req, _res, next) => {
      const typeProblem = bodyTypeProblem(req, Boolean(spec.files));
      if (typeProblem) throw crossSite(typeProblem);
      // The path's ids are checked before the site is looked up through them (an id of 2³¹ is 400, not 500).
      refuseBadText(req.params, 'path');
      if (spec.params) parseOr400(spec.params, req.params, 'path');
      (req as AuthedRequest).siteAccess = await authorise(spec.access, req, deps);
      next();
    };
    const main = async (req: Request, res: Response) => {
      try {
        await answer(req, res);
      } catch (err) {
        if (!(err instanceof HttpError)) throw err;
        throw await refusalInReaderUnits(deps.db, err, req.user?.id ?? null, (req as AuthedRequest).siteAccess?.id ?? null);
      }
    };
    const answer = async (req: Request, res: Response) => {
      const params = (spec.params ? parseOr400(spec.params, req.params, 'path') : undefined) as Out<P>;
      if (checkAnswers) answerChecked(res, spec);
      // authorise() has refused every call these types do not allow (no one signed in behind a
      // non-public rule; no site grant on a site rule); the narrowing is checked there, not here.
      const user = (req.user ?? null) as UserOf<A>;
      const site = ((req as AuthedRequest).siteAccess ?? null) as SiteOf<A>;
      if (spec.beforeBody) await spec.beforeBody({ req, res, params, user, site, deps, rawBody: req.body });
      refuseBadText(req.body, 'request');
      refuseBadText(req.query, 'query');
      const ctx = {
        req,
        res,
        body: spec.body ? parseOr400(spec.body, req.body ?? {}, 'request') : undefined,
        query: spec.query ? parseOr400(spec.query, req.query, 'query') : undefined,
        params,
        user,
        site,
        deps,
      } as RouteContext<Out<B>, Out<Q>, Out<P>, A>;
      let out: unknown;
      try {
        out = await handler(ctx);
      } finally {
        // Files stored for this request that it did not keep (refused, rolled back) go. A failure
        // here (the database away) is logged, never put in place of the request's own answer.
        await discardUnkept(deps, req).catch((e: unknown) => console.error('[uploads] could not sweep unkept files', e));
      }
      if (res.headersSent) return;
      if (out === undefined) res.status(204).end();
      else if (out instanceof JsonText) {
        const mismatch = checkAnswers && res.statusCode < 300 ? answerMismatch(spec, JSON.parse(out.text)) : null;
        if (mismatch) res.status(500).json(mismatch);
        else await sendJsonText(req, res, out);
      } else res.json(out);
    };
    this.router[spec.method](spec.path.replace(/^\/api/, ''), guard, ...(spec.before ?? []), main);
  }
}

/**
 * Test mode: a success answer that its route's schema refuses becomes a 500 naming the fields, so
 * an API test that reads it fails loudly. (server/test/responses.test.ts holds every route to a schema.)
 */
function answerChecked(res: Response, spec: RouteDoc): void {
  if (!spec.response) return;
  const send = res.json.bind(res);
  res.json = (body: unknown) => {
    if (res.statusCode >= 300) return send(body);
    const mismatch = answerMismatch(spec, JSON.parse(JSON.stringify(body)));
    if (!mismatch) return send(body);
    res.status(500);
    return send(mismatch);
  };
}

/** Test mode: the 500's body when the answer (as the wire has it) is outside its route's schema; null when it fits. */
function answerMismatch(spec: RouteDoc, wire: unknown) {
  const r = spec.response?.safeParse(wire);
  if (!r || r.success) return null;
  const where = `${spec.method.toUpperCase()} ${spec.path}`;
  const fields = zodFields(r.error);
  console.error(`[answer] ${where} does not match its response schema`, fields);
  return {
    error: { code: 'answer_mismatch', message: `${where} answered outside its response schema: ${JSON.stringify(fields)}`, fields },
  };
}

interface AuthedRequest extends Request {
  siteAccess?: SiteGrant | null;
}

/** The site and role a route was authorised on (for `before` middleware, which runs ahead of validation). */
export function siteAccessOf(req: Request): SiteGrant | null {
  return (req as AuthedRequest).siteAccess ?? null;
}

declare module 'express-serve-static-core' {
  interface Request {
    user?: SessionUser;
  }
}

/** The person a session names, when the account exists and is active. */
async function readUser(deps: Deps, id: number): Promise<SessionUser | null> {
  const u = await deps.db
    .selectFrom('users')
    .select(['id', 'email', 'name', 'is_admin', 'active', 'organisation_id'])
    .where('id', '=', id)
    .executeTakeFirst();
  return u && u.active ? { id: u.id, email: u.email, name: u.name, isAdmin: u.is_admin, organisationId: u.organisation_id } : null;
}

/**
 * Who is asking, and on a `site` route their membership of the site, in one query: the person (read
 * fresh on every request, so a deactivated account stops at once), the site (through the row the
 * path names, for `siteOfRow`) and the membership.
 */
async function authorise(access: Access, req: Request, deps: Deps): Promise<SiteGrant | null> {
  const userId = req.session?.userId;
  if (access.kind !== 'site') {
    req.user = userId ? ((await readUser(deps, userId)) ?? undefined) : undefined;
    if (access.kind === 'public') return null;
    const user = req.user;
    if (!user) throw new HttpError(401, 'signed_out', 'Please sign in.');
    if (access.kind === 'admin' && !user.isAdmin) throw forbidden('Only an administrator may do this.');
    return null;
  }
  if (!userId) throw new HttpError(401, 'signed_out', 'Please sign in.');
  // Which site: a number, the row the path names, or null (no such row → 404). A person whose
  // account is gone or deactivated hears 401 first, as on every other route.
  const signedIn = async () => {
    const u = await readUser(deps, userId);
    if (!u) throw new HttpError(401, 'signed_out', 'Please sign in.');
    req.user = u;
  };
  let found: Awaited<ReturnType<typeof access.siteId>>;
  try {
    found = await access.siteId(req, deps);
  } catch (err) {
    await signedIn();
    throw err;
  }
  if (found === undefined && access.optional) {
    await signedIn();
    return null;
  }
  if (found === null || found === undefined) {
    await signedIn();
    throw notFound();
  }
  const siteExpr =
    typeof found === 'number'
      ? sql<number>`${found}::int`
      : sql<number>`(select site_id from ${sql.table(found.table)} where id = ${found.id})`;
  const { rows } = await sql<{
    id: number;
    email: string;
    name: string;
    is_admin: boolean;
    active: boolean;
    organisation_id: number;
    site_id: number | null;
    role: SiteRole | null;
    can_inspect: boolean | null;
  }>`select ${PREPARED} u.id, u.email, u.name, u.is_admin, u.active, u.organisation_id, s.id as site_id, m.role, m.can_inspect
    from users u
    left join sites s on s.id = ${siteExpr} and s.organisation_id = u.organisation_id
    left join site_members m on m.site_id = s.id and m.user_id = u.id
    where u.id = ${userId}`.execute(deps.db);
  const r = rows[0];
  if (!r || !r.active) throw new HttpError(401, 'signed_out', 'Please sign in.');
  const user: SessionUser = { id: r.id, email: r.email, name: r.name, isAdmin: r.is_admin, organisationId: r.organisation_id };
  req.user = user;
  // The row the path names does not exist, or its site is of another organisation: to this person
  // both are absent (404), so an id of another organisation tells nothing (services/organisation.ts).
  if (r.site_id === null) throw notFound(typeof found === 'number' ? 'That site' : undefined);
  if (r.role === null) {
    if (access.admin && user.isAdmin) return { id: r.site_id, role: null, canInspect: false };
    throw forbidden('You are not a member of this site.');
  }
  const membership = { role: r.role, canInspect: Boolean(r.can_inspect) };
  const roleOk = access.roles === 'any' || access.roles.includes(r.role) || (access.admin && user.isAdmin);
  if (!roleOk || (access.allow && !access.allow(membership))) throw forbidden();
  return { id: r.site_id, role: r.role, canInspect: membership.canInspect };
}

/** What every API call answers (503) while PostgreSQL cannot be reached. */
export const DATABASE_UNAVAILABLE =
  'Brink cannot reach its database just now. Please try again in a minute; if this was a change, check afterwards whether it was saved.';

/** The one error handler: known errors as JSON, anything else logged and answered without detail. */
export function errorHandler(err: unknown, req: Request, res: Response, next: NextFunction): void {
  // An error after the answer went out (a session that could not be saved): Express closes the connection.
  if (res.headersSent) return next(err);
  if (isDatabaseUnavailable(err)) {
    res.setHeader('Retry-After', '5');
    res.status(503).json({ error: { code: 'unavailable', message: DATABASE_UNAVAILABLE } });
    return;
  }
  if (err instanceof HttpError) {
    res.status(err.status).json({ error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) } });
    return;
  }
  if (isOutOfRange(err)) {
    // The schemas refuse ids of 2³¹ and more naming the field; this is the net under one they miss.
    console.error(`[error] ${req.method} ${req.originalUrl} sent a number out of range`, (err as Error).message);
    res.status(400).json({ error: { code: 'invalid', message: 'A number in the request is too large (record ids are below 2³¹).' } });
    return;
  }
  const e = err as { status?: number; type?: string; code?: string; field?: string; message?: string };
  if (e?.type === 'entity.parse.failed') {
    res.status(400).json({ error: { code: 'invalid', message: 'The request body is not valid JSON.' } });
    return;
  }
  if (e?.type === 'entity.too.large' || e?.code === 'LIMIT_FILE_SIZE') {
    res.status(413).json({
      error: {
        code: 'too_large',
        message: e.field ? `The file in ${e.field} is too large.` : 'The request is too large.',
        ...(e.field ? { fields: { [e.field]: 'is too large' } } : {}),
      },
    });
    return;
  }
  if (typeof e?.code === 'string' && e.code.startsWith('LIMIT_')) {
    res.status(400).json({
      error: {
        code: 'invalid',
        message: `Upload refused: ${e.message}`,
        ...(e.field ? { fields: { [e.field]: e.message ?? 'refused' } } : {}),
      },
    });
    return;
  }
  console.error(`[error] ${req.method} ${req.originalUrl}`, err);
  res.status(500).json({ error: { code: 'server_error', message: 'Something went wrong on the server; please try again.' } });
}
