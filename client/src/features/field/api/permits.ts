import { useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import type { FieldPermitAnswer, FieldPermitsAnswer } from '@shared/schemas/field';
import { api, ApiError } from '@client/lib/api';
import { saveMyPermits, savedMyPermits, savedPermit, savePermit } from '../offline/store';

/** Query keys of the field view; everything under ['field'] is refreshed when the outbox has sent. */
export const fieldKeys = {
  all: ['field'] as const,
  mine: (userId: number) => ['field', 'mine', userId] as const,
  permit: (userId: number, id: number) => ['field', 'permit', userId, id] as const,
};

/** Where an answer came from: the server just now, or the copy kept on this phone. */
export type Source = 'server' | 'phone';

/** No answer from the server (no signal, or a gateway with none): read the phone's copy instead. */
function noAnswer(error: unknown): boolean {
  return error instanceof ApiError && (error.status === 0 || error.status === 502 || error.status === 503 || error.status === 504);
}

/**
 * Reads from the server and keeps a copy on the phone; with no answer, reads the copy. Runs also when
 * the browser says it is offline (networkMode 'always'), so the copy shows at once.
 */
function useKeptQuery<T>(key: readonly unknown[], path: string, save: (answer: T) => Promise<void>, saved: () => Promise<T | null>) {
  const query = useQuery({
    queryKey: key,
    networkMode: 'always',
    refetchInterval: 60_000,
    queryFn: async ({ signal }): Promise<{ answer: T; source: Source }> => {
      try {
        const answer = await api.get<T>(path, signal);
        await save(answer).catch(() => undefined);
        // With the browser offline, an answer can only be the service worker's kept copy.
        return { answer, source: navigator.onLine ? 'server' : 'phone' };
      } catch (error) {
        const copy = noAnswer(error) ? await saved().catch(() => null) : null;
        if (!copy) throw error;
        return { answer: copy, source: 'phone' };
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
  const shown = query.data ?? (early ? { answer: early, source: 'phone' as const } : undefined);
  return { query, shown };
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
