import { useQuery } from '@tanstack/react-query';
import type { z } from 'zod';
import type { excavationsAnswer, planAnswer } from '@shared/schemas/excavations';
import { api } from './api';

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
    queryFn: ({ signal }) => allExcavations(siteId, signal),
  });
}

/** Every excavation of a site: the map draws them all, so the pages are followed to the last. */
async function allExcavations(siteId: number, signal: AbortSignal) {
  const out: z.output<typeof excavationsAnswer>['excavations'] = [];
  let cursor: string | null = null;
  do {
    const qs: string = cursor ? `?cursor=${encodeURIComponent(cursor)}` : '';
    const page: z.output<typeof excavationsAnswer> = await api.get(`/api/sites/${siteId}/excavations${qs}`, signal);
    out.push(...page.excavations);
    cursor = page.next;
  } while (cursor);
  return out;
}

/** The site plan image pinned to the map, or null. */
export function useSitePlan(siteId: number) {
  return useQuery({
    queryKey: excavationKeys.plan(siteId),
    queryFn: ({ signal }) => api.get<z.output<typeof planAnswer>>(`/api/sites/${siteId}/plan`, signal).then((r) => r.plan),
  });
}
