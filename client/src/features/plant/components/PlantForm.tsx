import { useState } from 'react';
import { useFieldArray, useForm, type DefaultValues } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import {
  plantCategories,
  plantCategoryLabels,
  plantElementKindLabels,
  plantElementKinds,
  plantElementSchema,
  plantItemSchema,
  type PlantItemInput,
  type PlantItemValues,
} from '@shared/schemas/plant';
import { Button } from '@client/components/Button';
import { FormSummary, SelectField, TextField } from '@client/components/Fields';
import { ListErrors, listErrorMessages, RemoveRowButton } from '@client/components/ListErrors';
import { QuantityCell, QuantityField } from '@client/components/QuantityField';
import { applyServerErrors, maxLengths } from '@client/lib/forms';
import { useFigures } from '@client/lib/units';

const max = maxLengths(plantItemSchema.shape);
const elementMax = maxLengths(plantElementSchema.shape);
import { Footprint } from './Footprint';

const num = { setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? undefined : Number(v)) } as const;
/** The figures of a bearing element: four lengths in the person's units, then a share (no unit). */
const elementLengths = [
  ['x', 'x'],
  ['y', 'y'],
  ['length', 'Length along x'],
  ['width', 'Width along y'],
] as const;
const cell = 'w-24 rounded border border-rule-strong bg-sheet px-2 py-1.5 text-right aria-[invalid=true]:border-error-text';

interface PlantFormProps {
  initial: DefaultValues<PlantItemInput>;
  saveLabel: string;
  onSave: (values: PlantItemValues) => Promise<void>;
  onCancel: () => void;
}

/** A machine of the library: its mass, design factor and the rectangles it stands on, with a live footprint. */
export function PlantForm({ initial, saveLabel, onSave, onCancel }: PlantFormProps) {
  const [summary, setSummary] = useState<string | null>(null);
  const { register, handleSubmit, control, watch, setError, formState } = useForm<PlantItemInput, unknown, PlantItemValues>({
    resolver: zodResolver(plantItemSchema),
    defaultValues: initial,
  });
  const { fields, append, remove } = useFieldArray({ control, name: 'elements' });
  const figures = useFigures();
  const { errors } = formState;
  const elements = watch('elements') ?? [];
  const drawable = elements.filter(
    (e) => [e.x, e.y, e.length, e.width].every((v) => typeof v === 'number' && Number.isFinite(v)) && e.length > 0 && e.width > 0,
  );
  const shareTotal = elements.reduce((s, e) => s + (Number.isFinite(e.share) ? e.share : 0), 0);

  const elementMessages = listErrorMessages(
    errors.elements as Parameters<typeof listErrorMessages>[0],
    fields.length,
    'Bearing elements',
    (i, k) => `Element ${i + 1} ${k}`,
  ).map(figures.words);

  const submit = handleSubmit(
    async (values) => {
      setSummary(null);
      try {
        await onSave(values);
      } catch (error) {
        setSummary(applyServerErrors(error, setError, ['name', 'category', 'operatingMass', 'designFactor', 'notes', 'elements']));
      }
    },
    () => setSummary('Some details need correcting: see the fields marked below.'),
  );

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-4" aria-label="Machine">
      <FormSummary message={summary} />
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Name" maxLength={max.name} error={errors.name?.message} {...register('name')} />
        <SelectField
          label="Kind of machine"
          options={plantCategories.map((c) => ({ value: c, label: plantCategoryLabels[c] }))}
          error={errors.category?.message}
          {...register('category')}
        />
        <QuantityField
          control={control}
          name="operatingMass"
          quantity="mass"
          label="Operating mass"
          hint="As it stands beside the excavation: laden, with its attachment"
        />
        <TextField
          label="Design factor"
          type="number"
          step="0.05"
          min={1}
          inputMode="decimal"
          hint="Multiplies every element's load (dynamic effects, uneven loading); 1 for none"
          error={errors.designFactor?.message}
          {...register('designFactor', num)}
        />
      </div>

      <fieldset className="flex flex-col gap-2">
        <legend className="font-semibold">Bearing elements</legend>
        <p className="text-sm text-ink-soft">
          Rectangles the machine stands on, centred at x (forward) and y (to the left) from its origin, with the share of its weight each
          carries. Shares now add up to {shareTotal.toFixed(3)}.
        </p>
        <div className="overflow-x-auto">
          <table className="text-sm">
            <thead>
              <tr>
                <th scope="col" className="px-1 text-left">
                  #
                </th>
                <th scope="col" className="px-1 text-left">
                  Name
                </th>
                <th scope="col" className="px-1 text-left">
                  Kind
                </th>
                {elementLengths.map(([, label]) => (
                  <th key={label} scope="col" className="px-1 text-right">
                    {label} ({figures.unit('length')})
                  </th>
                ))}
                <th scope="col" className="px-1 text-right">
                  Share of weight
                </th>
                <th scope="col">
                  <span className="sr-only">Remove</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {fields.map((f, i) => (
                <tr key={f.id}>
                  <td className="px-1">{i + 1}</td>
                  <td className="px-1 py-1">
                    <input
                      aria-label={`Element ${i + 1} name`}
                      className="w-36 rounded border border-rule-strong bg-sheet px-2 py-1.5"
                      maxLength={elementMax.name}
                      {...register(`elements.${i}.name`)}
                    />
                  </td>
                  <td className="px-1 py-1">
                    <select
                      aria-label={`Element ${i + 1} kind`}
                      className="rounded border border-rule-strong bg-sheet px-1 py-1.5"
                      {...register(`elements.${i}.kind`)}
                    >
                      {plantElementKinds.map((k) => (
                        <option key={k} value={k}>
                          {plantElementKindLabels[k]}
                        </option>
                      ))}
                    </select>
                  </td>
                  {elementLengths.map(([key, label]) => (
                    <td key={key} className="px-1 py-1">
                      <QuantityCell
                        control={control}
                        name={`elements.${i}.${key}`}
                        quantity="length"
                        label={(unit) => `Element ${i + 1} ${label} (${unit})`}
                        className={cell}
                      />
                    </td>
                  ))}
                  <td className="px-1 py-1">
                    <input
                      type="number"
                      step="any"
                      inputMode="decimal"
                      aria-label={`Element ${i + 1} Share of weight`}
                      aria-invalid={Boolean(errors.elements?.[i]?.share) || undefined}
                      className={cell}
                      {...register(`elements.${i}.share`, num)}
                    />
                  </td>
                  <td className="px-1">
                    {fields.length > 1 ? <RemoveRowButton label={`Remove element ${i + 1}`} onClick={() => remove(i)} /> : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <ListErrors messages={elementMessages} />
        <div>
          <Button
            variant="secondary"
            onClick={() => append({ name: `Element ${fields.length + 1}`, kind: 'pad', x: 0, y: 0, length: 0.6, width: 0.6, share: 0 })}
          >
            Add an element
          </Button>
        </div>
      </fieldset>
      {drawable.length ? (
        <Footprint elements={drawable as PlantItemValues['elements']} name={watch('name') || 'this machine'} figures={figures} />
      ) : null}
      <div className="flex flex-col gap-1">
        <label htmlFor="plant-notes" className="font-semibold">
          Notes
        </label>
        <textarea
          id="plant-notes"
          rows={3}
          className="rounded-md border border-rule-strong bg-sheet px-3 py-2"
          maxLength={max.notes}
          {...register('notes')}
        />
      </div>
      <div className="flex flex-wrap gap-3">
        <Button type="submit" busy={formState.isSubmitting} busyText="Saving…">
          {saveLabel}
        </Button>
        <Button variant="quiet" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
