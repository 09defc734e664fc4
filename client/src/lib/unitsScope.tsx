import { createContext, useMemo, type ReactNode } from 'react';
import { Outlet } from 'react-router-dom';
import { figuresIn, type Figures, type UnitSystem } from '@shared/units';
import { useCurrentSite } from './currentSite';
import { useMe } from './session';

/** The person's units and their figures, worked out once by UnitsScope for every page below it. */
export const UnitsContext = createContext<{ system: UnitSystem; figures: Figures } | null>(null);

/**
 * Works out the units the signed-in person reads and types, once for the page (the root route has
 * one; tests' renderAt too): their own choice, else the current site's default, else metric
 * (docs/calculation.md, "Units"). Every figure on a page reads it through useUnits and useFigures,
 * so a drag frame that redraws twenty figures asks the session and the site list once, not twenty times.
 */
export function UnitsScope({ children }: { children?: ReactNode }) {
  const me = useMe().data;
  const { site } = useCurrentSite();
  const system: UnitSystem = me?.units ?? site?.units ?? 'metric';
  const value = useMemo(() => ({ system, figures: figuresIn(system) }), [system]);
  // The same element each time, so that the session, the site list or the address changing here
  // redraws only what reads the units (when they change), not every page below.
  const content = useMemo(() => children ?? <Outlet />, [children]);
  return <UnitsContext.Provider value={value}>{content}</UnitsContext.Provider>;
}
