import type { RouteObject } from 'react-router-dom';
import { SiteMapPage } from './routes/SiteMapPage';

/** Routes under /sites/:siteId. */
export const mapRoutes: RouteObject[] = [{ path: 'map', Component: SiteMapPage }];
