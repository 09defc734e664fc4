import { useMemo, useState, type ChangeEvent } from 'react';
import { useController, type Control, type FieldPath, type FieldValues } from 'react-hook-form';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { signedInAnswer } from '@shared/schemas/auth';
import type { oneSiteAnswer, Site } from '@shared/schemas/sites';
import { cautionFor } from '@shared/caution';
import {
  formatQuantity,
  inputText,
  localizeWords,
  parseQuantity,
  unitLabel,
  type FormatOptions,
  type Quantity,
  type UnitSystem,
} from '@shared/units';
import { api } from './api';
import { useCurrentSite } from './currentSite';
import { sessionKeys, useMe } from './session';

/**
 * The units the signed-in person reads and types: their own choice, else the current site's default,
 * else metric (docs/calculation.md, "Units"). The API's figures are always SI; convert only here.
 */
export function useUnits(): UnitSystem {
  const me = useMe().data;
  const { site } = useCurrentSite();
  return me?.units ?? site?.units ?? 'metric';
}

export interface Figures {
  system: UnitSystem;
  /** A length in metres as the person reads it; `up` for standoffs, clearances and zones. */
  length: (m: number, options?: FormatOptions) => string;
  pressure: (kPa: number, options?: FormatOptions) => string;
  /** A point load (kN). */
  force: (kN: number, options?: FormatOptions) => string;
  /** A line load or a force per run of support (kN/m). */
  lineForce: (kNm: number, options?: FormatOptions) => string;
  unitWeight: (kNm3: number, options?: FormatOptions) => string;
  moment: (kNmm: number, options?: FormatOptions) => string;
  /** The unit shown for a quantity (`ft`, `psf`), for labels and table heads. */
  unit: (q: Quantity) => string;
  /** A sentence written in SI (a warning, a refusal) restated in the person's units. */
  words: (text: string) => string;
  /** The caution in the person's units (US: names OSHA 29 CFR 1926 Subpart P). */
  caution: string;
}

/** Figures in a given system: the one formatter every screen uses at its edge. */
export function figuresIn(system: UnitSystem): Figures {
  const f = (q: Quantity) => (si: number, options?: FormatOptions) => formatQuantity(q, si, system, options);
  return {
    system,
    length: f('length'),
    pressure: f('pressure'),
    force: f('force'),
    lineForce: f('lineForce'),
    unitWeight: f('unitWeight'),
    moment: f('moment'),
    unit: (q) => unitLabel(q, system),
    words: (text) => localizeWords(text, system),
    caution: cautionFor(system),
  };
}

/** The person's figures (see `useUnits`). */
export function useFigures(): Figures {
  const system = useUnits();
  return useMemo(() => figuresIn(system), [system]);
}

/** A figure's text as typed and the SI value it was read as (NaN: unreadable, null: empty). */
interface QuantityState {
  text: string;
  value: number | null;
  system: UnitSystem;
}

/** Reads a box's text as an SI figure: null when empty, NaN when it cannot be read (with the reason). */
export function readQuantity(text: string, quantity: Quantity, system: UnitSystem): { value: number | null; reason: string | null } {
  if (text.trim() === '') return { value: null, reason: null };
  const r = parseQuantity(text, quantity, system);
  return r.ok ? { value: r.value, reason: null } : { value: Number.NaN, reason: r.reason };
}

/**
 * A box for an SI figure (m, kPa, kN/m³ …) that the person reads and types in their units: `2 ft 6 in`,
 * `500 psf`, `1.5 m` or a bare figure in their system's unit. The box keeps what was typed; `onValue`
 * receives SI (null when empty, NaN when unreadable, which the shared schemas refuse). `reason` is why
 * the text cannot be read ("must be a number, with a unit if you like: …"), else null.
 */
export function useQuantityText(value: number | null, onValue: (si: number | null) => void, quantity: Quantity) {
  const system = useUnits();
  const [state, setState] = useState<QuantityState>(() => ({ text: quantityText(quantity, value, system), value, system }));
  let shown = state;
  // The figure changed from outside (a reset, a load dragged, the person changed units): show it afresh.
  if (!Object.is(state.value, value) || state.system !== system) {
    shown = { text: quantityText(quantity, value, system), value, system };
    setState(shown);
  }
  return {
    system,
    unit: unitLabel(quantity, system),
    reason: readQuantity(shown.text, quantity, system).reason,
    text: shown.text,
    onChange: (event: ChangeEvent<HTMLInputElement>) => {
      const text = event.target.value;
      const next = readQuantity(text, quantity, system).value;
      setState({ text, value: next, system });
      onValue(next);
    },
  };
}

/** What every box of a figure in the person's units sets on its input. */
export const quantityInputProps = { type: 'text', inputMode: 'decimal', autoComplete: 'off' } as const;

/**
 * `useQuantityText` for a react-hook-form field that holds the SI figure. `error` is the reason to
 * show: the box's own reading first, else the schema's or the server's, restated in the person's units.
 */
export function useQuantityInput<T extends FieldValues, Out extends FieldValues>(
  control: Control<T, unknown, Out>,
  name: FieldPath<T>,
  quantity: Quantity,
) {
  const { field, fieldState } = useController({ control, name });
  const box = useQuantityText(typeof field.value === 'number' ? field.value : null, field.onChange, quantity);
  return {
    unit: box.unit,
    error: fieldState.error ? (box.reason ?? localizeWords(fieldState.error.message ?? '', box.system)) : undefined,
    input: { ...quantityInputProps, name: field.name, ref: field.ref, value: box.text, onBlur: field.onBlur, onChange: box.onChange },
  };
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
