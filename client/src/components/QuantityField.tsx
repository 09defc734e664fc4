import type { Control, FieldPath, FieldValues } from 'react-hook-form';
import type { ReactNode } from 'react';
import type { Quantity } from '@shared/units';
import { useQuantityInput } from '@client/lib/units';
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
