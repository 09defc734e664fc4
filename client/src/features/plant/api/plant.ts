import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { PlantItem, PlantItemInput } from '@shared/schemas/plant';
import { api } from '@client/lib/api';

const key = ['plant'] as const;

/** The plant library (shared by every site). */
export function usePlant() {
  return useQuery({ queryKey: key, queryFn: ({ signal }) => api.get<{ plant: PlantItem[] }>('/api/plant', signal).then((r) => r.plant) });
}

/** Add (id null) or change (with the version read) a machine. */
export function useSavePlant() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, version, values }: { id: number | null; version: number; values: PlantItemInput }) =>
      (id === null ? api.post<{ item: PlantItem }>('/api/plant', values) : api.patch<{ item: PlantItem }>(`/api/plant/${id}`, { ...values, version })).then((r) => r.item),
    onSuccess: () => qc.invalidateQueries({ queryKey: key }),
  });
}

export function useDeletePlant() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api.delete(`/api/plant/${id}`),
    onSuccess: () => qc.invalidateQueries({ queryKey: key }),
  });
}
