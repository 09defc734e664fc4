import { useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import type { FieldPermitAnswer, FieldPermitsAnswer } from '@shared/schemas/field';
import { apiGetWithHeaders } from '@client/lib/api';
import { saveMyPermits, savedMyPermits, savedPermit, savePermit } from '../offline/store';
import { reportTry } from '../hooks/useSignal';
import type { LastTry } from '../lib/copy';
import { noAnswer, readKept, type Kept } from './kept';

/** Query keys of the field view; everything under ['field'] is refreshed when the outbox has sent. */
export const fieldKeys = {
  all: ['field'] as const,
  mine: (userId: number) => ['field', 'mine', userId] as const,
  permit: (userId: number, id: number) => ['field', 'permit', userId, id] as const,
};

/**
 * Reads from the server and keeps a copy on the phone; with no answer (or none within the page's
 * limit, or the service worker's kept copy), shows the phone's copy with the source "phone". Runs
 * also when the browser says it is offline (networkMode 'always'), so the copy shows at once.
 */
function useKeptQuery<T extends { asOf: string }>(
  key: readonly unknown[],
  path: string,
  save: (answer: T) => Promise<void>,
  saved: () => Promise<T | null>,
) {
  const query = useQuery({
    queryKey: key,
    networkMode: 'always',
    // Every opening of a field page asks the server again (the app's default waits 30 s): what the
    // page says about the answer's source is then about this moment.
    staleTime: 0,
    refetchInterval: 60_000,
    queryFn: async ({ signal }): Promise<Kept<T>> => {
      try {
        const kept = await readKept<T>({ get: (s) => apiGetWithHeaders<T>(path, s), save, saved, signal });
        reportTry(kept.source === 'server');
        return kept;
      } catch (error) {
        if (!signal.aborted) reportTry(!noAnswer(error));
        throw error;
      }
    },
  });
  // While the first answer is on its way (one bar of signal can take a while), show the phone's copy.
  const [early, setEarly] = useState<T | null>(null);
  const keyText = JSON.stringify(key);
  useEffect(() => {
    let live = true;
    saved()
      .then((copy) => live && setEarly(copy))
      .catch(() => undefined);
    return () => {
      live = false;
    };
  }, [keyText]); // eslint-disable-line react-hooks/exhaustive-deps
  const shown: Kept<T> | undefined = query.data ?? (early ? { answer: early, source: 'phone', triedAt: null } : undefined);
  // The last try: a refusal or no answer after the last shown answer counts, else the shown answer's own.
  const lastTry: LastTry | null =
    query.errorUpdatedAt > (query.data?.triedAt ?? 0)
      ? { at: query.errorUpdatedAt, reached: !noAnswer(query.error) }
      : query.data?.triedAt
        ? { at: query.data.triedAt, reached: query.data.source === 'server' }
        : null;
  return { query, shown, lastTry };
}

export function useMyPermits(userId: number) {
  return useKeptQuery<FieldPermitsAnswer>(
    fieldKeys.mine(userId),
    '/api/field/permits',
    (a) => saveMyPermits(userId, a),
    () => savedMyPermits(userId),
  );
}

export function useFieldPermit(userId: number, permitId: number) {
  return useKeptQuery<FieldPermitAnswer>(
    fieldKeys.permit(userId, permitId),
    `/api/field/permits/${permitId}`,
    (a) => savePermit(userId, a),
    () => savedPermit(userId, permitId),
  );
}
