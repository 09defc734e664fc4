import request from 'supertest';
import { TEST_ORIGIN } from './helpers';

/**
 * The API refuses state-changing requests that do not come from Brink's own pages (server/src/csrf.ts).
 * A browser says where a request comes from; supertest does not, so every supertest request of the
 * API tests says it comes from the test app's PUBLIC_URL unless the test sets Origin or
 * Sec-Fetch-Site itself (as the cross-site tests do).
 */
type Headers = { get(field: string): string | undefined; set(field: string, value: string): unknown };
const proto = request.Test.prototype as unknown as { end: (...a: unknown[]) => unknown } & Headers;
const end = proto.end;
proto.end = function (this: Headers, ...args: unknown[]) {
  if (this.get('Origin') === undefined && this.get('Sec-Fetch-Site') === undefined) this.set('Origin', TEST_ORIGIN);
  return end.apply(this, args);
};
