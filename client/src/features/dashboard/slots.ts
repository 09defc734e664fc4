import { createContext, useContext, type ComponentType } from 'react';

/**
 * Panels that other features give the dashboard. The app fills them in (app/App.tsx), so the
 * dashboard does not import other features; a slot left empty shows its "not yet connected" panel.
 */
export interface DashboardSlots {
  /** "Excavations due for inspection" for the site. */
  inspectionsDue?: ComponentType<{ siteId: number; timeZone: string; canInspect: boolean }>;
  /** A list of the site's permits: awaiting my review, my requests or live now. */
  permits?: ComponentType<{ siteId: number; view: 'review' | 'mine' | 'live'; intro: string; timeZone: string }>;
}

export const DashboardSlotsContext = createContext<DashboardSlots>({});
export const useDashboardSlots = () => useContext(DashboardSlotsContext);
