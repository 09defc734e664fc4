import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Site, SiteInput } from '@shared/schemas/sites';
import { api } from '@client/lib/api';
import { sessionKeys } from '@client/lib/session';

export { useMySites as useSites } from '@client/lib/session';

export function useSaveSite(siteId: number | null) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SiteInput) =>
      (siteId === null ? api.post<{ site: Site }>('/api/sites', body) : api.patch<{ site: Site }>(`/api/sites/${siteId}`, body)).then(
        (r) => r.site,
      ),
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
