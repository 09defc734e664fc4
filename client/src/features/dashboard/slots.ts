import { createContext, useContext, type ComponentType } from 'react';
import type { DashboardAnswer, DashboardList } from '@shared/schemas/dashboard';
import type { DashboardPart } from '@client/lib/dashboard';

/**
 * Panels that other features give the dashboard. The app fills them in (app/dashboardSlots.tsx), so the
 * dashboard does not import other features; a slot left empty shows its "not yet connected" panel.
 * The dashboard asks for what every panel shows in one request (GET /api/sites/:siteId/dashboard)
 * and hands each panel its part.
 */
export interface DashboardSlots {
  /** "Excavations due for inspection" for the site. */
  inspectionsDue?: ComponentType<{
    siteId: number;
    timeZone: string;
    canInspect: boolean;
    states: DashboardPart<NonNullable<DashboardAnswer['inspections']>>;
  }>;
  /** A list of the site's permits: awaiting my review, my requests or live now. */
  permits?: ComponentType<{
    siteId: number;
    view: DashboardList;
    intro: string;
    timeZone: string;
    list: DashboardPart<NonNullable<DashboardAnswer['live']>>;
  }>;
}

export const DashboardSlotsContext = createContext<DashboardSlots>({});
export const useDashboardSlots = () => useContext(DashboardSlotsContext);
