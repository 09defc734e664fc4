import { useQuery } from '@tanstack/react-query';
import type { z } from 'zod';
import type { excavationsAnswer, planAnswer } from '@shared/schemas/excavations';
import { api, ApiError, errorFromResponse } from './api';

/**
 * The excavation register of a site, read by several pages (the site map, the register, and the
 * pages that place loads beside excavations). Changes invalidate `excavationKeys.site(siteId)`.
 */
export const excavationKeys = {
  site: (siteId: number) => ['excavations', siteId] as const,
  plan: (siteId: number) => ['site-plan', siteId] as const,
  history: (siteId: number, id: number) => ['excavations', siteId, id, 'history'] as const,
};

export function useExcavations(siteId: number) {
  return useQuery({
    queryKey: excavationKeys.site(siteId),
    queryFn: ({ signal }) =>
      api.get<z.output<typeof excavationsAnswer>>(`/api/sites/${siteId}/excavations`, signal).then((r) => r.excavations),
  });
}

/** The site plan image pinned to the map, or null. */
export function useSitePlan(siteId: number) {
  return useQuery({
    queryKey: excavationKeys.plan(siteId),
    queryFn: ({ signal }) => api.get<z.output<typeof planAnswer>>(`/api/sites/${siteId}/plan`, signal).then((r) => r.plan),
  });
}

/**
 * Sends a multipart form (file uploads) to the API; answers the parsed JSON. Throws ApiError with the
 * server's field reasons, as the JSON calls do.
 */
export async function postForm<T>(path: string, form: FormData, method: 'POST' | 'PUT' = 'POST'): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, { method, body: form, credentials: 'same-origin', headers: { Accept: 'application/json' } });
  } catch {
    throw new ApiError(0, 'network', 'Brink could not reach the server. Check the connection and try again.');
  }
  if (!res.ok) {
    const error = await errorFromResponse(res.clone());
    // Some answers carry more than the error (an import's report): keep the whole body on it.
    throw Object.assign(error, { body: await res.json().catch(() => null) });
  }
  return (await res.json()) as T;
}

/** Metres to 0.01 m, kPa to 0.1: the precision Brink shows figures with. */
export const fmt = {
  m: (v: number | null | undefined) => (v === null || v === undefined ? '—' : `${v.toFixed(2)} m`),
  kPa: (v: number | null | undefined) => (v === null || v === undefined ? '—' : `${v.toFixed(1)} kPa`),
};
