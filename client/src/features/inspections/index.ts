import type { RouteObject } from 'react-router-dom';

/** Routes under /sites/:siteId. Each page loads when first opened. */
export const inspectionRoutes: RouteObject[] = [
  { path: 'inspections', lazy: async () => ({ Component: (await import('./routes/InspectionsPage')).InspectionsPage }) },
  { path: 'excavations/:excavationId/inspect', lazy: async () => ({ Component: (await import('./routes/InspectPage')).InspectPage }) },
  { path: 'excavations/:excavationId/inspections', lazy: async () => ({ Component: (await import('./routes/HistoryPage')).HistoryPage }) },
];
