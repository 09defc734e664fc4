import { useQuery } from '@tanstack/react-query';
import type { InspectionStatesAnswer } from '@shared/schemas/inspections';
import { api } from './api';

/** Query key of a site's inspection states; invalidate it after recording an inspection. */
export const inspectionStatesKey = (siteId: number) => ['inspection-states', siteId] as const;

/**
 * Where every open excavation of the site stands this shift (ok, due, overdue, unsafe), for the
 * map, the register and the dashboards. Refreshed every minute so that "due" turns "overdue" on
 * time without a reload.
 */
export function useInspectionStates(siteId: number | null) {
  return useQuery({
    queryKey: inspectionStatesKey(siteId ?? 0),
    queryFn: ({ signal }) => api.get<InspectionStatesAnswer>(`/api/sites/${siteId}/inspections/states`, signal),
    enabled: siteId !== null,
    refetchInterval: 60_000,
  });
}
