import { createBrowserRouter, type RouteObject } from 'react-router-dom';
import { adminRoutes } from '@client/features/admin';
import { authRoutes } from '@client/features/auth';
import { dashboardRoutes } from '@client/features/dashboard';
import { fieldRoutes } from '@client/features/field';
import { permitRoutes, permitSiteRoutes } from '@client/features/permits';
import { inspectionRoutes } from '@client/features/inspections';
import { mapRoutes } from '@client/features/map';
import { plantRoutes } from '@client/features/plant';
import { registerRoutes } from '@client/features/register';
import { Loading } from '@client/components/Status';
import { UnitsScope } from '@client/lib/unitsScope';
import { ErrorPage, NotFound } from './ErrorPage';
import { RequireAdmin, RequireAuth } from './RequireAuth';

/**
 * Pages of one site, under /sites/:siteId (members of that site and administrators only).
 * Add one with a line, e.g. `{ path: 'map', Component: SiteMapPage },`, and its link in nav.ts.
 */
const siteRoutes: RouteObject[] = [...dashboardRoutes, ...mapRoutes, ...registerRoutes, ...permitSiteRoutes, ...inspectionRoutes];

/** Other signed-in pages, e.g. `{ path: 'permits/:permitId', Component: PermitPage },`. */
const signedInRoutes: RouteObject[] = [...plantRoutes, ...permitRoutes];

const routes: RouteObject[] = [
  {
    // The person's units, worked out once for every page (useUnits, useFigures).
    Component: UnitsScope,
    errorElement: <ErrorPage />,
    // Shown while the first page's code arrives (each page loads when first opened).
    HydrateFallback: () => <Loading what="Opening Brink" />,
    children: [
      { lazy: async () => ({ Component: (await import('./Layout')).PublicLayout }), children: authRoutes },
      // The phone view has its own frame and sign-in check (it opens with no signal).
      ...fieldRoutes,
      {
        Component: RequireAuth,
        children: [
          {
            // The desktop frame and its menus load with the first signed-in page (the phone view has its own).
            lazy: async () => ({ Component: (await import('./Layout')).Layout }),
            children: [
              {
                errorElement: <ErrorPage />,
                children: [
                  { index: true, lazy: async () => ({ Component: (await import('./SiteScope')).HomeRedirect }) },
                  {
                    path: 'sites/:siteId',
                    lazy: async () => ({ Component: (await import('./SiteScope')).SiteScope }),
                    children: siteRoutes,
                  },
                  ...signedInRoutes,
                  { path: 'admin', Component: RequireAdmin, children: adminRoutes },
                  { path: '*', Component: NotFound },
                ],
              },
            ],
          },
        ],
      },
    ],
  },
];

export const router = createBrowserRouter(routes);
