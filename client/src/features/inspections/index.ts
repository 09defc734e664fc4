import type { RouteObject } from 'react-router-dom';
import { HistoryPage } from './routes/HistoryPage';
import { InspectionsPage } from './routes/InspectionsPage';
import { InspectPage } from './routes/InspectPage';

export { DuePanel } from './components/DuePanel';

/** Routes under /sites/:siteId. */
export const inspectionRoutes: RouteObject[] = [
  { path: 'inspections', Component: InspectionsPage },
  { path: 'excavations/:excavationId/inspect', Component: InspectPage },
  { path: 'excavations/:excavationId/inspections', Component: HistoryPage },
];
