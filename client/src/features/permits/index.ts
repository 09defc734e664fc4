import type { RouteObject } from 'react-router-dom';

/** Under /sites/:siteId. Each page loads when first opened. */
export const permitSiteRoutes: RouteObject[] = [
  { path: 'permits', lazy: async () => ({ Component: (await import('./routes/PermitListPage')).PermitListPage }) },
  { path: 'permits/new', lazy: async () => ({ Component: (await import('./routes/NewPermitPage')).NewPermitPage }) },
];

/** Signed-in pages addressed by the permit alone (links in e-mails). */
export const permitRoutes: RouteObject[] = [
  { path: 'permits/:permitId', lazy: async () => ({ Component: (await import('./routes/PermitPage')).PermitPage }) },
  { path: 'permits/:permitId/edit', lazy: async () => ({ Component: (await import('./routes/PermitEditPage')).PermitEditPage }) },
];
