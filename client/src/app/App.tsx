import { QueryClientProvider } from '@tanstack/react-query';
import { lazy, Suspense, type ComponentProps } from 'react';
import { RouterProvider } from 'react-router-dom';
import { Loading } from '@client/components/Status';
import { createQueryClient } from '@client/lib/queryClient';
import { askWhoIsSignedIn } from '@client/lib/session';
import { DashboardSlotsContext, type DashboardSlots } from '@client/features/dashboard/slots';
import { router } from './router';

const queryClient = createQueryClient();
askWhoIsSignedIn(queryClient);

// The dashboard's panels load with the dashboard, not with every page.
const DuePanel = lazy(async () => ({ default: (await import('@client/features/inspections/components/DuePanel')).DuePanel }));
const DashboardPermits = lazy(async () => ({
  default: (await import('@client/features/permits/components/DashboardPermits')).DashboardPermits,
}));

/** Panels the features lend the dashboard. */
const dashboardSlots: DashboardSlots = {
  inspectionsDue: (props: ComponentProps<typeof DuePanel>) => (
    <Suspense fallback={<Loading what="Loading the inspections due" />}>
      <DuePanel {...props} />
    </Suspense>
  ),
  permits: (props: ComponentProps<typeof DashboardPermits>) => (
    <Suspense fallback={<Loading what="Loading the permits" />}>
      <DashboardPermits {...props} />
    </Suspense>
  ),
};

export function App() {
  return (
    <QueryClientProvider client={queryClient}>
      <DashboardSlotsContext.Provider value={dashboardSlots}>
        <RouterProvider router={router} />
      </DashboardSlotsContext.Provider>
    </QueryClientProvider>
  );
}
