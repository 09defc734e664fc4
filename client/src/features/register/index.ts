import type { RouteObject } from 'react-router-dom';

/** Routes under /sites/:siteId (the register and its table library load when first opened). */
export const registerRoutes: RouteObject[] = [
  { path: 'register', lazy: async () => ({ Component: (await import('./routes/RegisterPage')).RegisterPage }) },
];
