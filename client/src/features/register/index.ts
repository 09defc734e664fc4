import type { RouteObject } from 'react-router-dom';
import { RegisterPage } from './routes/RegisterPage';

/** Routes under /sites/:siteId. */
export const registerRoutes: RouteObject[] = [{ path: 'register', Component: RegisterPage }];
