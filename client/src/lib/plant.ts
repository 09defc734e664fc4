import { useQuery } from '@tanstack/react-query';
import type { z } from 'zod';
import type { plantLibraryAnswer } from '@shared/schemas/plant';
import { api } from './api';

/** The plant library's query key: the library page's changes invalidate it for every page. */
export const plantKey = ['plant'] as const;

/** The plant library (shared by every site), read by the library page and the pages that place loads. */
export function usePlant() {
  return useQuery({
    queryKey: plantKey,
    queryFn: ({ signal }) => api.get<z.output<typeof plantLibraryAnswer>>('/api/plant', signal).then((r) => r.plant),
  });
}
