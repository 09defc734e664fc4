import type { RouteObject } from 'react-router-dom';
import { DashboardPage } from './routes/DashboardPage';

/** Routes under /sites/:siteId. */
export const dashboardRoutes: RouteObject[] = [{ index: true, Component: DashboardPage }];
