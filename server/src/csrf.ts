/**
 * Cross-site request defence (issue 12, beyond SameSite=Lax cookies). Every state-changing request
 * (anything but GET, HEAD and OPTIONS) to the API must come from Brink's own pages:
 *
 * - `Origin` present: it must be Brink's own origin: the origin of PUBLIC_URL, or the origin the
 *   request was addressed to (its scheme and Host, which a cross-site page cannot choose). `null`
 *   and any other origin are refused.
 * - `Origin` absent: `Sec-Fetch-Site` must be `same-origin`.
 * - Neither: refused. Every browser Brink supports sends one of them on a POST; a script that sends
 *   neither is not a page of Brink's (tests set Origin: server/test/setup-origin.ts).
 *
 * And the body must carry the type the route declares (checked in Api.route with `bodyTypeProblem`):
 * JSON, or multipart/form-data where the route takes files. A body of any other type (text/plain,
 * a form post) is refused, so no HTML form on another site can make one. Refusals are 403
 * `cross_site`. Request bodies are read only without a Content-Encoding (identity): others are 415.
 *
 * The phone's offline outbox (client/src/features/field/offline/outbox.ts) sends from the page or
 * the service worker of Brink's own origin, with JSON or multipart bodies: it passes.
 */
import type { Request, RequestHandler } from 'express';
import { HttpError } from './http';

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

export const crossSite = (why: string) =>
  new HttpError(403, 'cross_site', `Refused: ${why}. Changes are accepted only from Brink's own pages.`);

function ownOrigins(req: Request, publicUrl: string): string[] {
  const out = [new URL(publicUrl).origin];
  const host = req.get('host');
  if (host) out.push(`${req.protocol}://${host}`.toLowerCase());
  return out;
}

/** The origin rule above, as Express middleware for /api. */
export function sameOrigin(publicUrl: string): RequestHandler {
  return (req, _res, next) => {
    const encoding = req.get('content-encoding');
    if (encoding !== undefined && encoding.trim().toLowerCase() !== 'identity') {
      next(
        new HttpError(
          415,
          'unsupported_encoding',
          `Content-Encoding ${JSON.stringify(encoding)} is not accepted; send the body uncompressed.`,
        ),
      );
      return;
    }
    if (SAFE.has(req.method)) return next();
    const origin = req.get('origin');
    if (origin !== undefined) {
      if (!ownOrigins(req, publicUrl).includes(origin.toLowerCase()))
        return next(crossSite(`the request came from ${origin === 'null' ? 'an opaque origin' : origin}`));
      return next();
    }
    const site = req.get('sec-fetch-site');
    if (site === 'same-origin') return next();
    next(
      crossSite(
        site ? `the request came from a ${site} page` : 'the request says neither where it came from (Origin) nor how (Sec-Fetch-Site)',
      ),
    );
  };
}

/** Whether the request carries a body (a length above 0, or chunks). */
function hasBody(req: Request): boolean {
  const len = req.get('content-length');
  return (len !== undefined && len !== '0') || req.get('transfer-encoding') !== undefined;
}

/**
 * The declared-type rule: a state-changing request with a body (or a Content-Type) must be JSON,
 * or multipart/form-data when the route takes files. Null when fine, else the reason.
 */
export function bodyTypeProblem(req: Request, takesFiles: boolean): string | null {
  if (SAFE.has(req.method)) return null;
  const type = (req.get('content-type') ?? '').split(';')[0].trim().toLowerCase();
  if (!type && !hasBody(req)) return null;
  if (type === 'application/json') return null;
  if (takesFiles && type === 'multipart/form-data') return null;
  return `a body of type ${type ? JSON.stringify(type) : '(none)'} where this address takes ${takesFiles ? 'multipart/form-data or application/json' : 'application/json'}`;
}
