import { ApiError } from '@client/lib/api';

/**
 * Where an answer of the field API came from, found out from the answer itself and never from the
 * browser's online flag (which stays true on one bar of signal or behind a site gateway with no
 * onward connection): the server just now, or a copy kept on this phone (the service worker's cache,
 * which marks what it serves with KEPT_COPY_HEADER, or the phone's IndexedDB copy).
 */
export type Source = 'server' | 'phone';

/**
 * The header the service worker adds to an answer it served from its cache. The worker's plugin in
 * vite.config.ts (`brink-field-api`) writes the same name as a literal: keep the two the same.
 */
export const KEPT_COPY_HEADER = 'X-Brink-Kept-Copy';

/**
 * How long the page waits for an answer before it shows the phone's own copy (ms). Longer than the
 * service worker's 8 s, so that the worker's kept answer, when it has one, comes first.
 */
export const ANSWER_LIMIT_MS = 10_000;

/** What the page shows: the answer, where it came from, and when the page asked (phone clock, ms; null for the copy shown while the first answer is on its way). */
export interface Kept<T> {
  answer: T;
  source: Source;
  triedAt: number | null;
}

/** No answer from the server (no signal, or a gateway with none): the phone's copy serves instead. */
export function noAnswer(error: unknown): boolean {
  return error instanceof ApiError && (error.status === 0 || error.status === 502 || error.status === 503 || error.status === 504);
}

/** The newer of two answers by the server's time on them. */
function newer<T extends { asOf: string }>(a: T, b: T | null): T {
  return b && Date.parse(b.asOf) > Date.parse(a.asOf) ? b : a;
}

interface ReadKeptOptions<T> {
  /** Asks the server (through the service worker when there is one). */
  get: (signal: AbortSignal) => Promise<{ body: T; headers: Headers }>;
  /** Keeps a server answer on the phone. */
  save: (answer: T) => Promise<void>;
  /** The phone's own copy, or null. */
  saved: () => Promise<T | null>;
  /** The query's own signal (the query was cancelled: no copy, the cancellation goes on). */
  signal?: AbortSignal;
  limitMs?: number;
  now?: () => number;
}

class OverLimit extends Error {}

/**
 * One read of the field API: the server's answer (kept on the phone), else the phone's copy with
 * the source "phone" when the answer is the service worker's kept copy, when there is no answer, or
 * when none comes within the page's limit. Other refusals (401, 403, 404, 500) are thrown.
 */
export async function readKept<T extends { asOf: string }>(o: ReadKeptOptions<T>): Promise<Kept<T>> {
  const now = o.now ?? Date.now;
  const controller = new AbortController();
  const cancel = () => controller.abort();
  o.signal?.addEventListener('abort', cancel);
  let timer: ReturnType<typeof setTimeout> | undefined;
  const limit = new Promise<never>((_, reject) => {
    timer = setTimeout(() => {
      reject(new OverLimit());
      controller.abort();
    }, o.limitMs ?? ANSWER_LIMIT_MS);
  });
  const phoneCopy = async (error: unknown): Promise<Kept<T>> => {
    const copy = await o.saved().catch(() => null);
    if (!copy)
      throw error instanceof OverLimit
        ? new ApiError(0, 'no_answer', 'Brink could not reach the server in time. Check the connection and try again.')
        : error;
    return { answer: copy, source: 'phone', triedAt: now() };
  };
  try {
    let got: { body: T; headers: Headers };
    try {
      got = await Promise.race([o.get(controller.signal), limit]);
    } catch (error) {
      if (o.signal?.aborted) throw error;
      if (error instanceof OverLimit || noAnswer(error)) return await phoneCopy(error);
      throw error;
    }
    if (got.headers.has(KEPT_COPY_HEADER)) {
      // The worker's cached answer: show the newer of it and the phone's own copy; keep nothing.
      const copy = await o.saved().catch(() => null);
      return { answer: newer(got.body, copy), source: 'phone', triedAt: now() };
    }
    await o.save(got.body).catch(() => undefined);
    return { answer: got.body, source: 'server', triedAt: now() };
  } finally {
    clearTimeout(timer);
    limit.catch(() => undefined);
    o.signal?.removeEventListener('abort', cancel);
  }
}
