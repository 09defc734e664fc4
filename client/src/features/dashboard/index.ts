import type { RouteObject } from 'react-router-dom';

/** Routes under /sites/:siteId (loaded when first opened). */
export const dashboardRoutes: RouteObject[] = [
  { index: true, lazy: async () => ({ Component: (await import('./routes/DashboardPage')).DashboardPage }) },
];
