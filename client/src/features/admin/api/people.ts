import { useInfiniteQuery, useMutation, useQueryClient, type InfiniteData } from '@tanstack/react-query';
import type { InvitationInput, oneOrganisationAnswer } from '@shared/schemas/auth';
import type { SiteRole } from '@shared/schemas/common';
import type { z } from 'zod';
import type { createdAnswer, onePersonAnswer, peopleAnswer, Person } from '@shared/schemas/sites';
import { api } from '@client/lib/api';
import { sessionKeys } from '@client/lib/session';

const peopleKey = ['users'] as const;
const peoplePagesKey = [...peopleKey, 'pages'] as const;
type PeoplePage = z.output<typeof peopleAnswer>;

/**
 * The organisation's people, by name, a page at a time, following the server's `next` cursor
 * (`fetchNextPage`); with `q`, those whose name or e-mail address holds it.
 */
export function usePeople(q = '') {
  return useInfiniteQuery({
    queryKey: [...peoplePagesKey, q],
    queryFn: ({ pageParam, signal }) => {
      const params = new URLSearchParams();
      if (q) params.set('q', q);
      if (pageParam) params.set('cursor', pageParam);
      const query = params.toString();
      return api.get<PeoplePage>(`/api/users${query ? `?${query}` : ''}`, signal);
    },
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.next,
    select: (data) => data.pages.flatMap((p) => p.users),
  });
}

/** After a change to a person: put the fresh copy in the list, and refresh my own roles in case it was me. */
function usePersonSaved() {
  const queryClient = useQueryClient();
  return (person?: Person) => {
    if (person) {
      queryClient.setQueriesData<InfiniteData<PeoplePage>>({ queryKey: peoplePagesKey }, (data) =>
        data
          ? { ...data, pages: data.pages.map((page) => ({ ...page, users: page.users.map((p) => (p.id === person.id ? person : p)) })) }
          : data,
      );
    }
    void queryClient.invalidateQueries({ queryKey: peopleKey });
    void queryClient.invalidateQueries({ queryKey: sessionKeys.me });
  };
}

export function useInvite() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: InvitationInput) => api.post<z.output<typeof createdAnswer>>('/api/invitations', body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: peopleKey }),
  });
}

export function useUpdatePerson(id: number) {
  const saved = usePersonSaved();
  return useMutation({
    mutationFn: (body: { name?: string; isAdmin?: boolean; active?: boolean }) =>
      api.patch<z.output<typeof onePersonAnswer>>(`/api/users/${id}`, body).then((r) => r.user),
    onSuccess: saved,
  });
}

export function useSetMembership(id: number) {
  const saved = usePersonSaved();
  return useMutation({
    mutationFn: ({ siteId, role, canInspect }: { siteId: number; role: SiteRole; canInspect: boolean }) =>
      api.put<z.output<typeof onePersonAnswer>>(`/api/users/${id}/memberships/${siteId}`, { role, canInspect }).then((r) => r.user),
    onSuccess: saved,
  });
}

export function useRemoveMembership(id: number) {
  const saved = usePersonSaved();
  return useMutation({
    mutationFn: (siteId: number) => api.delete(`/api/users/${id}/memberships/${siteId}`),
    onSuccess: () => saved(),
  });
}

/** An administrator renames their own organisation; who-am-I carries its name, so it is asked again. */
export function useRenameOrganisation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { name: string }) =>
      api.patch<z.output<typeof oneOrganisationAnswer>>('/api/organisation', body).then((r) => r.organisation),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: sessionKeys.me }),
  });
}
