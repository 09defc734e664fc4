import type { RouteObject } from 'react-router-dom';

export { useMailCatcherOn } from './api/mail';

/** Routes under /admin (administrators only; the app guards the whole branch). Each page loads when first opened. */
export const adminRoutes: RouteObject[] = [
  { path: 'people', lazy: async () => ({ Component: (await import('./routes/PeoplePage')).PeoplePage }) },
  { path: 'sites', lazy: async () => ({ Component: (await import('./routes/SitesPage')).SitesPage }) },
  { path: 'sites/new', lazy: async () => ({ Component: (await import('./routes/SiteEditPage')).SiteEditPage }) },
  { path: 'sites/:siteId', lazy: async () => ({ Component: (await import('./routes/SiteEditPage')).SiteEditPage }) },
  { path: 'mail', lazy: async () => ({ Component: (await import('./routes/MailPage')).MailPage }) },
];
