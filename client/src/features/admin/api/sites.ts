import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { oneSiteAnswer, Site, SiteInput } from '@shared/schemas/sites';
import { api } from '@client/lib/api';
import { sessionKeys } from '@client/lib/session';

export { useMySites as useSites } from '@client/lib/session';

export function useSaveSite(siteId: number | null) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SiteInput) =>
      (siteId === null
        ? api.post<z.output<typeof oneSiteAnswer>>('/api/sites', body)
        : api.patch<z.output<typeof oneSiteAnswer>>(`/api/sites/${siteId}`, body)
      ).then((r) => r.site),
    onSuccess: (site) => {
      queryClient.setQueryData<Site[]>(sessionKeys.sites, (list) =>
        list ? (list.some((s) => s.id === site.id) ? list.map((s) => (s.id === site.id ? site : s)) : [...list, site]) : list,
      );
      void queryClient.invalidateQueries({ queryKey: sessionKeys.sites });
      // People lists name the sites of each membership.
      void queryClient.invalidateQueries({ queryKey: ['users'] });
      void queryClient.invalidateQueries({ queryKey: sessionKeys.me });
    },
  });
}
