/**
 * One part of a site dashboard's answer (GET /api/sites/:siteId/dashboard) as the panel that shows
 * it has it: there, still coming, or failed with a way to ask again. The dashboard asks once and
 * hands each panel its part (features/dashboard/slots.ts).
 */
export interface DashboardPart<T> {
  data: T | undefined;
  error: Error | null;
  retry: () => void;
}
