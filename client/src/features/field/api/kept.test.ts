import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { ApiError } from '@client/lib/api';
import { markKeptCopy } from '../../../../../vite.config';
import { ANSWER_LIMIT_MS, KEPT_COPY_HEADER, readKept } from './kept';

type Answer = { asOf: string; n: number };
const serverAnswer: Answer = { asOf: '2026-06-10T09:00:00.000Z', n: 1 };
const phoneCopy: Answer = { asOf: '2026-06-10T08:30:00.000Z', n: 2 };
const NOW = Date.parse('2026-06-10T09:00:05.000Z');

function setup(get: (signal: AbortSignal) => Promise<{ body: Answer; headers: Headers }>, copy: Answer | null = phoneCopy) {
  const saved = vi.fn(async () => copy);
  const save = vi.fn(async () => undefined);
  return { saved, save, read: (signal?: AbortSignal) => readKept<Answer>({ get, save, saved, signal, now: () => NOW }) };
}

/** A request that never answers (held), and ends only when the page gives up on it. */
function held() {
  const seen: AbortSignal[] = [];
  const get = (signal: AbortSignal) =>
    new Promise<{ body: Answer; headers: Headers }>((_, reject) => {
      seen.push(signal);
      signal.addEventListener('abort', () => reject(new DOMException('aborted', 'AbortError')));
    });
  return { get, seen };
}

describe('where a field answer came from', () => {
  beforeEach(() => vi.useFakeTimers());
  afterEach(() => vi.useRealTimers());

  it('an answer from the server is "server" and is kept on the phone', async () => {
    const { read, save } = setup(async () => ({ body: serverAnswer, headers: new Headers() }));
    await expect(read()).resolves.toEqual({ answer: serverAnswer, source: 'server', triedAt: NOW });
    expect(save).toHaveBeenCalledWith(serverAnswer);
  });

  it('an answer the service worker marked as its kept copy is "phone", is not kept again, and yields to a newer copy on the phone', async () => {
    const older = { asOf: '2026-06-10T08:00:00.000Z', n: 3 };
    const { read, save } = setup(async () => ({ body: older, headers: new Headers({ [KEPT_COPY_HEADER]: '1' }) }));
    await expect(read()).resolves.toEqual({ answer: phoneCopy, source: 'phone', triedAt: NOW });
    expect(save).not.toHaveBeenCalled();

    const newerInCache = { asOf: '2026-06-10T08:45:00.000Z', n: 4 };
    const second = setup(async () => ({ body: newerInCache, headers: new Headers({ [KEPT_COPY_HEADER]: '1' }) }));
    await expect(second.read()).resolves.toMatchObject({ answer: newerInCache, source: 'phone' });
  });

  it('no answer (status 0, 502, 503, 504) falls back to the phone copy', async () => {
    for (const status of [0, 502, 503, 504]) {
      const { read } = setup(async () => {
        throw new ApiError(status, 'x', 'no answer');
      });
      await expect(read()).resolves.toMatchObject({ answer: phoneCopy, source: 'phone' });
    }
  });

  it('a held request gives up at the page limit and shows the phone copy, whatever navigator.onLine says', async () => {
    expect(navigator.onLine).toBe(true);
    const { get, seen } = held();
    const { read } = setup(get);
    const result = read();
    await vi.advanceTimersByTimeAsync(ANSWER_LIMIT_MS - 1);
    expect(seen[0].aborted).toBe(false);
    await vi.advanceTimersByTimeAsync(1);
    await expect(result).resolves.toMatchObject({ answer: phoneCopy, source: 'phone' });
    expect(seen[0].aborted).toBe(true);
  });

  it('a held request with no copy on the phone fails as "no answer"', async () => {
    const { read } = setup(held().get, null);
    const result = read();
    const failed = expect(result).rejects.toMatchObject({ status: 0, code: 'no_answer' });
    await vi.advanceTimersByTimeAsync(ANSWER_LIMIT_MS);
    await failed;
  });

  it('a refusal from the server is not hidden behind the copy', async () => {
    for (const status of [401, 403, 404, 500]) {
      const { read } = setup(async () => {
        throw new ApiError(status, 'x', 'refused');
      });
      await expect(read()).rejects.toMatchObject({ status });
    }
  });

  it('a cancelled query is not turned into a copy', async () => {
    const { read, saved } = setup(held().get);
    const controller = new AbortController();
    const result = read(controller.signal);
    controller.abort();
    await expect(result).rejects.toThrow('aborted');
    expect(saved).not.toHaveBeenCalled();
  });
});

describe("the service worker's mark", () => {
  it('adds the header the page reads to a cached answer, keeping its body and status', async () => {
    const cached = new Response(JSON.stringify(serverAnswer), { status: 200, headers: { 'Content-Type': 'application/json' } });
    const marked = await markKeptCopy.cachedResponseWillBeUsed({ cachedResponse: cached });
    expect(marked?.headers.get(KEPT_COPY_HEADER)).toBe('1');
    expect(marked?.headers.get('Content-Type')).toBe('application/json');
    expect(marked?.status).toBe(200);
    expect(await marked?.json()).toEqual(serverAnswer);
    await expect(markKeptCopy.cachedResponseWillBeUsed({ cachedResponse: undefined })).resolves.toBeUndefined();
  });
});
