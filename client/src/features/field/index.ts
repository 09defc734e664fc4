import type { RouteObject } from 'react-router-dom';
import { FieldLayout } from './components/FieldLayout';
import { FieldPermitPage } from './routes/FieldPermitPage';
import { MyPermitsPage } from './routes/MyPermitsPage';

export { registerServiceWorker } from './offline/serviceWorker';

/** The phone view, under /field, with its own frame (it works with no signal, so it has its own sign-in check). */
export const fieldRoutes: RouteObject[] = [
  {
    path: 'field',
    Component: FieldLayout,
    children: [
      { index: true, Component: MyPermitsPage },
      { path: 'permits/:permitId', Component: FieldPermitPage },
    ],
  },
];
