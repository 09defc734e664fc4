import { useState, type ChangeEvent } from 'react';
import { useController, type Control, type FieldPath, type FieldValues } from 'react-hook-form';
import { localizeWords, parseQuantity, unitLabel, type Quantity, type UnitSystem } from '@shared/units';
import { quantityText, useUnits } from './units';

// Boxes for figures typed in the person's units. Kept apart from ./units so that pages without forms
// (the phone view) read figures without loading react-hook-form.

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
