import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { onePlantItemAnswer, PlantItemInput } from '@shared/schemas/plant';
import { api } from '@client/lib/api';
import { plantKey } from '@client/lib/plant';

export { usePlant } from '@client/lib/plant';

/** Add (id null) or change (with the version read) a machine. */
export function useSavePlant() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, version, values }: { id: number | null; version: number; values: PlantItemInput }) =>
      (id === null
        ? api.post<z.output<typeof onePlantItemAnswer>>('/api/plant', values)
        : api.patch<z.output<typeof onePlantItemAnswer>>(`/api/plant/${id}`, { ...values, version })
      ).then((r) => r.item),
    onSuccess: () => qc.invalidateQueries({ queryKey: plantKey }),
  });
}

export function useDeletePlant() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api.delete(`/api/plant/${id}`),
    onSuccess: () => qc.invalidateQueries({ queryKey: plantKey }),
  });
}
