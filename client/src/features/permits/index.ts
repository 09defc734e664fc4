import type { RouteObject } from 'react-router-dom';
import { NewPermitPage } from './routes/NewPermitPage';
import { PermitEditPage } from './routes/PermitEditPage';
import { PermitListPage } from './routes/PermitListPage';
import { PermitPage } from './routes/PermitPage';

/** Under /sites/:siteId. */
export const permitSiteRoutes: RouteObject[] = [
  { path: 'permits', Component: PermitListPage },
  { path: 'permits/new', Component: NewPermitPage },
];

/** Signed-in pages addressed by the permit alone (links in e-mails). */
export const permitRoutes: RouteObject[] = [
  { path: 'permits/:permitId', Component: PermitPage },
  { path: 'permits/:permitId/edit', Component: PermitEditPage },
];

export { DashboardPermits } from './components/DashboardPermits';
