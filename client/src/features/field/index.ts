import type { RouteObject } from 'react-router-dom';

export { registerServiceWorker } from './offline/serviceWorker';

const pages = () => import('./pages');

/**
 * The phone view, under /field, with its own frame (it works with no signal, so it has its own sign-in
 * check). Its frame and both pages are one chunk (see pages.ts), which the service worker precaches.
 */
export const fieldRoutes: RouteObject[] = [
  {
    path: 'field',
    lazy: async () => ({ Component: (await pages()).FieldLayout }),
    children: [
      { index: true, lazy: async () => ({ Component: (await pages()).MyPermitsPage }) },
      { path: 'permits/:permitId', lazy: async () => ({ Component: (await pages()).FieldPermitPage }) },
    ],
  },
];
