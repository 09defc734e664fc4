import { useInfiniteQuery, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type {
  ExcavationInspections,
  InspectionData,
  recordedInspectionAnswer,
  ShiftsAnswer,
  ShiftsInput,
} from '@shared/schemas/inspections';
import { api, ApiError, isApiError, sendForm } from '@client/lib/api';
import { inspectionStatesKey } from '@client/lib/inspectionStates';

export type { ShiftsAnswer };
export type RecordedInspection = z.output<typeof recordedInspectionAnswer>;

const inspectionKeys = {
  excavation: (id: number) => ['inspections', 'excavation', id] as const,
  shifts: (siteId: number) => ['inspections', 'shifts', siteId] as const,
};

const inspectionPage = (excavationId: number | null, cursor: string | null, signal: AbortSignal) =>
  api.get<ExcavationInspections>(
    `/api/excavations/${excavationId}/inspections${cursor ? `?cursor=${encodeURIComponent(cursor)}` : ''}`,
    signal,
  );

/** The excavation, where it stands this shift, and its newest inspections (the first page). */
export function useExcavationInspections(excavationId: number | null) {
  return useQuery({
    queryKey: inspectionKeys.excavation(excavationId ?? 0),
    queryFn: ({ signal }) => inspectionPage(excavationId, null, signal),
    enabled: excavationId !== null,
  });
}

/** The same, with older inspections a page at a time, following the server's `next` cursor (`fetchNextPage`). */
export function useInspectionHistory(excavationId: number | null) {
  return useInfiniteQuery({
    queryKey: [...inspectionKeys.excavation(excavationId ?? 0), 'pages'],
    queryFn: ({ pageParam, signal }) => inspectionPage(excavationId, pageParam, signal),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.next,
    select: (data) => ({ ...data.pages[0], inspections: data.pages.flatMap((p) => p.inspections) }),
    enabled: excavationId !== null,
  });
}

/**
 * Sends the form and its photos as multipart/form-data (the JSON in `inspection`, files in
 * `photos`). Throws ApiError: status 0 when there is no connection (the draft stays on the phone).
 */
async function sendInspection(excavationId: number, data: InspectionData, photos: Blob[]): Promise<RecordedInspection> {
  const body = new FormData();
  body.append('inspection', JSON.stringify(data));
  photos.forEach((p, i) => body.append('photos', p, p instanceof File ? p.name : `photo-${i + 1}.jpg`));
  try {
    return await sendForm<typeof recordedInspectionAnswer>(`/api/excavations/${excavationId}/inspections`, body);
  } catch (error) {
    if (!isApiError(error, 0)) throw error;
    throw new ApiError(
      0,
      'network',
      'No connection: the inspection was not sent. Your answers and photos are kept on this phone; send again when you have signal.',
    );
  }
}

export function useRecordInspection(siteId: number, excavationId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ data, photos }: { data: InspectionData; photos: Blob[] }) => sendInspection(excavationId, data, photos),
    onSuccess: () => {
      void queryClient.invalidateQueries({ queryKey: inspectionKeys.excavation(excavationId) });
      void queryClient.invalidateQueries({ queryKey: inspectionStatesKey(siteId) });
      // Permits on this excavation may have been suspended.
      void queryClient.invalidateQueries({ queryKey: ['permits'] });
    },
  });
}

export function useShifts(siteId: number) {
  return useQuery({
    queryKey: inspectionKeys.shifts(siteId),
    queryFn: ({ signal }) => api.get<ShiftsAnswer>(`/api/sites/${siteId}/shifts`, signal),
  });
}

export function useSaveShifts(siteId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: ShiftsInput) => api.put<ShiftsAnswer>(`/api/sites/${siteId}/shifts`, body),
    onSuccess: (answer) => {
      queryClient.setQueryData(inspectionKeys.shifts(siteId), answer);
      void queryClient.invalidateQueries({ queryKey: inspectionStatesKey(siteId) });
    },
  });
}
