import { useInfiniteQuery, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type {
  AttachmentAdded,
  attachmentAddedAnswer,
  BriefingAnswer,
  CheckProposal,
  commentAddedAnswer,
  onePermitAnswer,
  oneRevisionAnswer,
  PermitAction,
  PermitCheck,
  PermitCheckAnswer,
  PermitCreateInput,
  PermitDetail,
  permitsAnswer,
  PermitUpdate,
  SiteOperators,
  TransitionInput,
} from '@shared/schemas/permits';
import type { oneSiteAnswer } from '@shared/schemas/sites';
import { api, ApiError, sendForm } from '@client/lib/api';

export const permitKeys = {
  all: ['permits'] as const,
  list: (q: Record<string, string>) => ['permits', 'list', q] as const,
  one: (id: number) => ['permits', 'one', id] as const,
  revision: (id: number, revision: number) => ['permits', 'one', id, 'revision', revision] as const,
};

type PermitAnswer = z.output<typeof onePermitAnswer>;

function permitPage(query: Record<string, string>, cursor: string | null, signal: AbortSignal) {
  const qs = new URLSearchParams(Object.entries({ ...query, cursor: cursor ?? '' }).filter(([, v]) => v !== '')).toString();
  return api.get<z.output<typeof permitsAnswer>>(`/api/permits?${qs}`, signal);
}

/** A permit list a page at a time, following the server's `next` cursor (`fetchNextPage`). */
export function usePermitPages(query: Record<string, string>) {
  return useInfiniteQuery({
    queryKey: [...permitKeys.list(query), 'pages'],
    queryFn: ({ pageParam, signal }) => permitPage(query, pageParam, signal),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.next,
    select: (data) => data.pages.flatMap((p) => p.permits),
  });
}

export function usePermit(id: number) {
  return useQuery({
    queryKey: permitKeys.one(id),
    queryFn: ({ signal }) => api.get<PermitAnswer>(`/api/permits/${id}`, signal).then((r) => r.permit),
  });
}

export function useRevision(id: number, revision: number | null) {
  return useQuery({
    queryKey: permitKeys.revision(id, revision ?? 0),
    queryFn: ({ signal }) =>
      api.get<z.output<typeof oneRevisionAnswer>>(`/api/permits/${id}/revisions/${revision}`, signal).then((r) => r.revision),
    enabled: revision !== null,
  });
}

export function useSite(siteId: number) {
  return useQuery({
    queryKey: ['sites', siteId],
    queryFn: ({ signal }) => api.get<z.output<typeof oneSiteAnswer>>(`/api/sites/${siteId}`, signal).then((r) => r.site),
  });
}

// The register and the plant library are read through the shared hooks, so a change made on the
// map or the library page refreshes the pages that place loads too.
export { useExcavations } from '@client/lib/excavations';
export { usePlant } from '@client/lib/plant';

export function useOperators(siteId: number, enabled = true) {
  return useQuery({
    queryKey: ['sites', siteId, 'operators'],
    queryFn: ({ signal }) => api.get<SiteOperators>(`/api/sites/${siteId}/operators`, signal),
    enabled,
  });
}

/** Puts the permit an answer carries (also a 409's) into the cache, so the page shows it as it now is. */
function usePermitAnswer() {
  const qc = useQueryClient();
  return {
    onSuccess: (permit: PermitDetail) => {
      qc.setQueryData(permitKeys.one(permit.id), permit);
      void qc.invalidateQueries({ queryKey: ['permits', 'list'] });
    },
    onError: (error: unknown, id: number) => {
      if (error instanceof ApiError && error.status === 409) void qc.invalidateQueries({ queryKey: permitKeys.one(id) });
    },
  };
}

export function useCreatePermit() {
  const { onSuccess } = usePermitAnswer();
  return useMutation({
    mutationFn: (body: PermitCreateInput) => api.post<PermitAnswer>('/api/permits', body).then((r) => r.permit),
    onSuccess,
  });
}

export function useUpdatePermit(id: number) {
  const { onSuccess, onError } = usePermitAnswer();
  return useMutation({
    mutationFn: (body: PermitUpdate) => api.patch<PermitAnswer>(`/api/permits/${id}`, body).then((r) => r.permit),
    onSuccess,
    onError: (e) => onError(e, id),
  });
}

export function useTransition(id: number) {
  const { onSuccess, onError } = usePermitAnswer();
  return useMutation({
    mutationFn: (body: TransitionInput & { action: PermitAction }) =>
      api.post<PermitAnswer>(`/api/permits/${id}/transitions`, body).then((r) => r.permit),
    onSuccess,
    onError: (e) => onError(e, id),
  });
}

/** The server's check of a request not yet saved (the other permits it counts, above all). */
export function checkRequestOnServer(siteId: number, proposal: CheckProposal): Promise<PermitCheck> {
  return api.post<PermitCheckAnswer>(`/api/sites/${siteId}/permits/check`, proposal).then((r) => r.check);
}

/** The server's (authoritative) check of proposed changes, without saving them. */
export function checkOnServer(id: number, proposal: CheckProposal): Promise<PermitCheck> {
  return api.post<PermitCheckAnswer>(`/api/permits/${id}/check`, proposal).then((r) => r.check);
}

export function useComment(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (text: string) => api.post<z.output<typeof commentAddedAnswer>>(`/api/permits/${id}/comments`, { text }),
    onSuccess: () => qc.invalidateQueries({ queryKey: permitKeys.one(id) }),
  });
}

export function useBriefing(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<BriefingAnswer>(`/api/permits/${id}/briefing`),
    onSuccess: () => qc.invalidateQueries({ queryKey: permitKeys.one(id) }),
  });
}

export function useAttach(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async ({ file, kind }: { file: File; kind: string }): Promise<AttachmentAdded> => {
      const form = new FormData();
      form.append('kind', kind);
      form.append('file', file);
      return (await sendForm<typeof attachmentAddedAnswer>(`/api/permits/${id}/attachments`, form)).attachment;
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: permitKeys.one(id) }),
  });
}
