import type { RouteObject } from 'react-router-dom';

/** Routes under /sites/:siteId. The map page (with the drawing tools) loads when first opened. */
export const mapRoutes: RouteObject[] = [
  { path: 'map', lazy: async () => ({ Component: (await import('./routes/SiteMapPage')).SiteMapPage }) },
];
