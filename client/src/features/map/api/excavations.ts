import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type {
  changedExcavationAnswer,
  Excavation,
  ExcavationInput,
  oneExcavationAnswer,
  PlanBounds,
  planAnswer,
  SitePlan,
} from '@shared/schemas/excavations';
import { api, sendForm } from '@client/lib/api';
import { excavationKeys } from '@client/lib/excavations';

/** Put one saved excavation into the cached list, then refetch it. */
function useSettle(siteId: number) {
  const qc = useQueryClient();
  return (saved: Excavation | null, removedId?: number) => {
    qc.setQueryData<Excavation[]>(excavationKeys.site(siteId), (list) => {
      if (!list) return list;
      const rest = list.filter((e) => e.id !== (saved?.id ?? removedId));
      return saved ? [...rest, saved].sort((a, b) => a.reference.localeCompare(b.reference)) : rest;
    });
    void qc.invalidateQueries({ queryKey: excavationKeys.site(siteId) });
  };
}

/** Create (id null) or change (with the version read) an excavation. */
export function useSaveExcavation(siteId: number) {
  const settle = useSettle(siteId);
  return useMutation({
    mutationFn: ({ id, version, values }: { id: number | null; version: number; values: ExcavationInput }) =>
      (id === null
        ? api.post<z.output<typeof oneExcavationAnswer>>(`/api/sites/${siteId}/excavations`, values)
        : api.patch<z.output<typeof changedExcavationAnswer>>(`/api/sites/${siteId}/excavations/${id}`, { ...values, version })
      ).then((r) => r.excavation),
    onSuccess: (e) => settle(e),
  });
}

export function useDeleteExcavation(siteId: number) {
  const settle = useSettle(siteId);
  return useMutation({
    mutationFn: (id: number) => api.delete(`/api/sites/${siteId}/excavations/${id}`).then(() => id),
    onSuccess: (id) => settle(null, id),
  });
}

/** Attach (a File) or detach (null) the design drawing. */
export function useDrawing(siteId: number) {
  const settle = useSettle(siteId);
  return useMutation({
    mutationFn: ({ id, file }: { id: number; file: File | null }) => {
      const path = `/api/sites/${siteId}/excavations/${id}/drawing`;
      if (!file) return api.delete<z.output<typeof oneExcavationAnswer>>(path).then((r) => r.excavation);
      const form = new FormData();
      form.append('file', file);
      return sendForm<typeof oneExcavationAnswer>(path, form).then((r) => r.excavation);
    },
    onSuccess: (e) => settle(e),
  });
}

export function historyPath(siteId: number, id: number) {
  return `/api/sites/${siteId}/excavations/${id}/history`;
}

/** Upload a new site plan image with its corners, change its corners or opacity, or take it off. */
export function useSitePlanChanges(siteId: number) {
  const qc = useQueryClient();
  const done = (plan: SitePlan | null) => qc.setQueryData(excavationKeys.plan(siteId), plan);
  const upload = useMutation({
    mutationFn: ({ file, bounds, opacity }: { file: File; bounds: PlanBounds; opacity: number }) => {
      const form = new FormData();
      for (const [k, v] of Object.entries(bounds)) form.append(k, String(v));
      form.append('opacity', String(opacity));
      form.append('file', file);
      return sendForm<typeof planAnswer>(`/api/sites/${siteId}/plan`, form, { method: 'PUT' }).then((r) => r.plan);
    },
    onSuccess: done,
  });
  const change = useMutation({
    mutationFn: (body: { bounds?: PlanBounds; opacity?: number }) =>
      api.patch<z.output<typeof planAnswer>>(`/api/sites/${siteId}/plan`, body).then((r) => r.plan),
    onSuccess: done,
  });
  const remove = useMutation({
    mutationFn: () => api.delete(`/api/sites/${siteId}/plan`).then(() => null),
    onSuccess: done,
  });
  return { upload, change, remove };
}
