import { QueryClientProvider } from '@tanstack/react-query';
import { RouterProvider } from 'react-router-dom';
import { createQueryClient } from '@client/lib/queryClient';
import { askWhoIsSignedIn } from '@client/lib/session';
import { DashboardSlotsContext } from '@client/features/dashboard/slots';
import { dashboardSlots } from './dashboardSlots';
import { router } from './router';

const queryClient = createQueryClient();
askWhoIsSignedIn(queryClient);

export function App() {
  return (
    <QueryClientProvider client={queryClient}>
      <DashboardSlotsContext.Provider value={dashboardSlots}>
        <RouterProvider router={router} />
      </DashboardSlotsContext.Provider>
    </QueryClientProvider>
  );
}
