import { lazy, Suspense, type ComponentProps } from 'react';
import { Loading } from '@client/components/Status';
import type { DashboardSlots } from '@client/features/dashboard/slots';

// The dashboard's panels load with the dashboard, not with every page.
const DuePanel = lazy(async () => ({ default: (await import('@client/features/inspections/components/DuePanel')).DuePanel }));
const DashboardPermits = lazy(async () => ({
  default: (await import('@client/features/permits/components/DashboardPermits')).DashboardPermits,
}));

/** Panels the features lend the dashboard, each shown with its part of the dashboard's one answer. */
export const dashboardSlots: DashboardSlots = {
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
