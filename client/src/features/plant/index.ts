import type { RouteObject } from 'react-router-dom';

/** Signed-in routes (the library is shared by every site); loaded when first opened. */
export const plantRoutes: RouteObject[] = [
  { path: 'plant', lazy: async () => ({ Component: (await import('./routes/PlantPage')).PlantPage }) },
];
