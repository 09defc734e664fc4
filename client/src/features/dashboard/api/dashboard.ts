import { useQuery } from '@tanstack/react-query';
import type { z } from 'zod';
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
