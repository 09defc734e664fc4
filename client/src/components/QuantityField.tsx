import type { Control, FieldPath, FieldValues } from 'react-hook-form';
import type { ReactNode } from 'react';
import type { Quantity } from '@shared/units';
import { localizeWords } from '@shared/units';
import { quantityInputProps, useQuantityInput, useQuantityText } from '@client/lib/quantityInput';
import { TextField } from './Fields';

interface QuantityFieldProps<T extends FieldValues, Out extends FieldValues> {
  control: Control<T, unknown, Out>;
  name: FieldPath<T>;
  quantity: Quantity;
  /** The label without its unit ("Depth H"): the person's unit is added ("Depth H (ft)"). */
  label: string;
  hint?: ReactNode;
  readOnly?: boolean;
}

/** A labelled box for a figure in the person's units, held by the form in SI (see `useQuantityInput`). */
export function QuantityField<T extends FieldValues, Out extends FieldValues>({
  control,
  name,
  quantity,
  label,
  hint,
  readOnly,
}: QuantityFieldProps<T, Out>) {
  const { unit, error, input } = useQuantityInput(control, name, quantity);
  return <TextField label={`${label} (${unit})`} hint={hint} error={error} readOnly={readOnly} {...input} />;
}

interface QuantityBoxProps {
  /** The label without its unit ("Height"): the person's unit is added ("Height (ft)"). */
  label: string;
  quantity: Quantity;
  /** The SI figure held by the page (NaN: what was typed could not be read). */
  value: number | null;
  onChange: (si: number | null) => void;
  /** The reason from the page's own check or the server, in SI words: restated in the person's units. */
  error?: string;
  hint?: ReactNode;
}

/** A labelled box for a figure in the person's units whose page keeps the SI figure in its own state. */
export function QuantityBox({ label, quantity, value, onChange, error, hint }: QuantityBoxProps) {
  const box = useQuantityText(value, onChange, quantity);
  const shownError = error ? (box.reason ?? localizeWords(error, box.system)) : undefined;
  return (
    <TextField
      label={`${label} (${box.unit})`}
      hint={hint}
      error={shownError}
      {...quantityInputProps}
      value={box.text}
      onChange={box.onChange}
    />
  );
}

interface QuantityCellProps<T extends FieldValues, Out extends FieldValues> {
  control: Control<T, unknown, Out>;
  name: FieldPath<T>;
  quantity: Quantity;
  /** The cell's accessible name, given the person's unit ("Layer 1 top (ft)"). */
  label: (unit: string) => string;
  className: string;
  disabled?: boolean;
}

/** A table cell's box for a figure in the person's units (the form keeps SI); its refusal is listed under the table. */
export function QuantityCell<T extends FieldValues, Out extends FieldValues>({
  control,
  name,
  quantity,
  label,
  className,
  disabled,
}: QuantityCellProps<T, Out>) {
  const { unit, error, input } = useQuantityInput(control, name, quantity);
  return <input aria-label={label(unit)} aria-invalid={error ? true : undefined} className={className} disabled={disabled} {...input} />;
}
