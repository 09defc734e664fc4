import type { RouteObject } from 'react-router-dom';
import { PlantPage } from './routes/PlantPage';

/** Signed-in routes (the library is shared by every site). */
export const plantRoutes: RouteObject[] = [{ path: 'plant', Component: PlantPage }];
