import { MutationCache, QueryCache, QueryClient } from '@tanstack/react-query';
import { isApiError } from './api';
import { sessionKeys } from './session';

/**
 * One client for the app. A 401 from any call means the session ended (expired, signed out in
 * another tab, deactivated): forget who was signed in, so the app shows the sign-in page.
 * Answers in the 400s are not retried; a lost connection or a 5xx is, twice.
 */
export function createQueryClient() {
  const client: QueryClient = new QueryClient({
    queryCache: new QueryCache({
      onError: (error, query) => {
        if (isApiError(error, 401) && query.queryKey[0] !== sessionKeys.me[0]) client.setQueryData(sessionKeys.me, null);
      },
    }),
    mutationCache: new MutationCache({
      onError: (error, _vars, _ctx, mutation) => {
        const signingIn = mutation.options.mutationKey?.[0] === 'sign-in';
        if (isApiError(error, 401) && !signingIn && client.getQueryData(sessionKeys.me)) client.setQueryData(sessionKeys.me, null);
      },
    }),
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        retry: (count, error) => !(isApiError(error) && error.status >= 400 && error.status < 500) && count < 2,
      },
      mutations: { retry: false },
    },
  });
  return client;
}
