import { QueryClientProvider } from '@tanstack/react-query';
import { RouterProvider } from 'react-router-dom';
import { createQueryClient } from '@client/lib/queryClient';
import { DashboardSlotsContext, type DashboardSlots } from '@client/features/dashboard/slots';
import { DuePanel } from '@client/features/inspections';
import { DashboardPermits } from '@client/features/permits';
import { router } from './router';

const queryClient = createQueryClient();

/** Panels the features lend the dashboard. */
const dashboardSlots: DashboardSlots = { inspectionsDue: DuePanel, permits: DashboardPermits };

export function App() {
  return (
    <QueryClientProvider client={queryClient}>
      <DashboardSlotsContext.Provider value={dashboardSlots}>
        <RouterProvider router={router} />
      </DashboardSlotsContext.Provider>
    </QueryClientProvider>
  );
}
