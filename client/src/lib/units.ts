import { useContext } from 'react';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { signedInAnswer } from '@shared/schemas/auth';
import type { oneSiteAnswer, Site } from '@shared/schemas/sites';
import { inputText, type Figures, type Quantity, type UnitSystem } from '@shared/units';
import { api } from './api';
import { sessionKeys } from './session';
import { UnitsContext } from './unitsScope';

/**
 * The units the signed-in person reads and types (worked out by UnitsScope, which must be above).
 * The API's figures are always SI; convert only here.
 */
export function useUnits(): UnitSystem {
  return useUnitsScope().system;
}

/** The person's figures (see `useUnits`). */
export function useFigures(): Figures {
  return useUnitsScope().figures;
}

function useUnitsScope() {
  const scope = useContext(UnitsContext);
  if (!scope) throw new Error('useUnits and useFigures need a UnitsScope above them (the root route has one)');
  return scope;
}

/** The text a box starts with for a saved SI figure (plain digits in the person's unit). */
export function quantityText(quantity: Quantity, si: number | null | undefined, system: UnitSystem): string {
  return inputText(quantity, si, system);
}

/** Choose my units (null: follow each site's default). */
export function useChooseMyUnits() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (units: UnitSystem | null) => api.patch<z.output<typeof signedInAnswer>>('/api/auth/me', { units }).then((r) => r.user),
    onSuccess: (user) => queryClient.setQueryData(sessionKeys.me, user),
  });
}

/** Set a site's default units (its coordinators and administrators). */
export function useSetSiteUnits() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ siteId, units }: { siteId: number; units: UnitSystem }) =>
      api.put<z.output<typeof oneSiteAnswer>>(`/api/sites/${siteId}/units`, { units }).then((r) => r.site),
    onSuccess: (site) => {
      queryClient.setQueryData<Site[]>(sessionKeys.sites, (list) => list?.map((s) => (s.id === site.id ? site : s)));
      void queryClient.invalidateQueries({ queryKey: sessionKeys.sites });
    },
  });
}
