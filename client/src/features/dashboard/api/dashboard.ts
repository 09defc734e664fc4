import { useQuery } from '@tanstack/react-query';
import type { z } from 'zod';
import type { DashboardAnswer } from '@shared/schemas/dashboard';
import type { peopleAnswer } from '@shared/schemas/sites';
import { api } from '@client/lib/api';

/** Counts for the administrator's panels. */
export function usePeopleCount(enabled: boolean) {
  return useQuery({
    queryKey: ['users', 'counts'],
    queryFn: ({ signal }) => api.get<z.output<typeof peopleAnswer>>('/api/users?limit=1', signal).then((r) => r.counts),
    enabled,
  });
}

/**
 * What the site's dashboard panels show, in one request. Asked again each time the dashboard
 * opens (what was there shows meanwhile), since permits and inspections change on other pages,
 * and every minute, so that "due" turns "overdue" on time without a reload.
 */
export function useSiteDashboard(siteId: number | null) {
  return useQuery({
    queryKey: ['dashboard', siteId ?? 0],
    queryFn: ({ signal }) => api.get<DashboardAnswer>(`/api/sites/${siteId}/dashboard`, signal),
    enabled: siteId !== null,
    staleTime: 0,
    refetchInterval: 60_000,
  });
}
