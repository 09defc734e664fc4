import { useQuery } from '@tanstack/react-query';
import type { Person } from '@shared/schemas/sites';
import { api } from '@client/lib/api';

/** Counts for the administrator's panels. */
export function usePeopleCount(enabled: boolean) {
  return useQuery({
    queryKey: ['users'],
    queryFn: ({ signal }) => api.get<{ users: Person[] }>('/api/users', signal).then((r) => r.users),
    select: (users) => ({ active: users.filter((u) => u.active).length, total: users.length }),
    enabled,
  });
}
