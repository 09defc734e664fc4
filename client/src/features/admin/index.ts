import type { RouteObject } from 'react-router-dom';
import { MailPage } from './routes/MailPage';
import { PeoplePage } from './routes/PeoplePage';
import { SiteEditPage } from './routes/SiteEditPage';
import { SitesPage } from './routes/SitesPage';

export { useMailCatcherOn } from './api/mail';

/** Routes under /admin (administrators only; the app guards the whole branch). */
export const adminRoutes: RouteObject[] = [
  { path: 'people', Component: PeoplePage },
  { path: 'sites', Component: SitesPage },
  { path: 'sites/new', Component: SiteEditPage },
  { path: 'sites/:siteId', Component: SiteEditPage },
  { path: 'mail', Component: MailPage },
];
