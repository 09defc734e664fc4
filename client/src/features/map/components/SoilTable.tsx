import { useFieldArray, type Control, type FieldErrors, type UseFormRegister, type UseFormWatch } from 'react-hook-form';
import { Button } from '@client/components/Button';
import { ListErrors, listErrorMessages, RemoveRowButton } from '@client/components/ListErrors';
import type { ExcavationValues } from '@shared/schemas/excavations';
import type { Quantity } from '@shared/units';
import { QuantityCell } from '@client/components/QuantityField';
import { useFigures } from '@client/lib/units';
import { emptyRow, numberOrNull, type ExcavationFormValues, type SoilRow } from './excavationFormValues';

interface SoilTableProps {
  control: Control<ExcavationFormValues, unknown, ExcavationValues>;
  register: UseFormRegister<ExcavationFormValues>;
  watch: UseFormWatch<ExcavationFormValues>;
  errors: FieldErrors<ExcavationFormValues>;
  readOnly: boolean;
}

type Column = { key: Exclude<keyof SoilRow, 'model'>; label: string; quantity: Quantity | null; only?: SoilRow['model'] };

/** Each figure of a layer and what it measures (null: an angle, in degrees whatever the units). */
const columns: Column[] = [
  { key: 'top', label: 'Top', quantity: 'length' },
  { key: 'unitWeight', label: 'γ', quantity: 'unitWeight' },
  { key: 'saturatedUnitWeight', label: 'γsat', quantity: 'unitWeight' },
  { key: 'frictionAngle', label: 'φ′', quantity: null, only: 'drained' },
  { key: 'cohesion', label: 'c′', quantity: 'pressure', only: 'drained' },
  { key: 'undrainedShearStrength', label: 'cu', quantity: 'pressure', only: 'undrained' },
];

const longNames: Record<string, string> = {
  top: 'top',
  unitWeight: 'unit weight γ',
  saturatedUnitWeight: 'saturated unit weight γsat',
  frictionAngle: 'friction angle φ′',
  cohesion: 'cohesion c′',
  undrainedShearStrength: 'undrained shear strength cu',
};

const cell =
  'w-full min-w-0 rounded border border-rule-strong bg-sheet px-2 py-1.5 text-right aria-[invalid=true]:border-error-text disabled:bg-paper disabled:text-ink-soft';

/**
 * The soil layers, each from its top down to the next layer's top (the last runs to any depth).
 * A drained layer gives φ′ and c′ (effective stress); an undrained clay gives cu (total stress).
 * γsat is used below the water table; left empty it is taken as γ. Only the strength figures of
 * the layer's model are shown.
 */
export function SoilTable({ control, register, watch, errors, readOnly }: SoilTableProps) {
  const { fields, append, remove } = useFieldArray({ control, name: 'soil' });
  const rows = watch('soil');
  const figures = useFigures();
  const messages = listErrorMessages(
    errors.soil as Parameters<typeof listErrorMessages>[0],
    fields.length,
    'Soil layers',
    (i, k) => `Layer ${i + 1} ${longNames[k] ?? k}`,
  ).map(figures.words);

  return (
    <fieldset className="flex flex-col gap-2">
      <legend className="mb-1 font-semibold">Soil layers</legend>
      <p className="text-sm text-ink-soft">
        From ground level down. γsat applies below the water table (empty: same as γ). Give φ′ and c′ for a drained layer, or cu for an
        undrained clay.
      </p>
      {/* One block per layer, its figures three to a row: it fits the site map's side panel (27rem) without a sideways scroll. */}
      <ol className="flex flex-col gap-3">
        {fields.map((f, i) => {
          const model = rows?.[i]?.model ?? 'drained';
          return (
            <li key={f.id} className="rounded border border-rule p-2" aria-label={`Layer ${i + 1}`}>
              <div className="mb-1 flex flex-wrap items-center gap-2">
                <span className="font-semibold">Layer {i + 1}</span>
                <select
                  aria-label={`Layer ${i + 1} strength`}
                  className="min-w-0 rounded border border-rule-strong bg-sheet px-1 py-1.5 text-sm"
                  disabled={readOnly}
                  {...register(`soil.${i}.model`)}
                >
                  <option value="drained">Drained (φ′, c′)</option>
                  <option value="undrained">Undrained (cu)</option>
                </select>
                <span className="ml-auto">
                  {!readOnly && fields.length > 1 ? <RemoveRowButton label={`Remove layer ${i + 1}`} onClick={() => remove(i)} /> : null}
                </span>
              </div>
              <div className="grid grid-cols-3 gap-2 text-sm">
                {columns
                  .filter((c) => c.only === undefined || c.only === model)
                  .map((c) => {
                    const invalid = Boolean((errors.soil?.[i] as Record<string, unknown> | undefined)?.[c.key]);
                    const name = `soil.${i}.${c.key}` as const;
                    return c.quantity ? (
                      <label key={c.key} className="flex min-w-0 flex-col gap-0.5">
                        <span aria-hidden="true">
                          {c.label} <span className="text-ink-soft">({figures.unit(c.quantity)})</span>
                        </span>
                        <QuantityCell
                          control={control}
                          name={name}
                          quantity={c.quantity}
                          label={(unit) => `Layer ${i + 1} ${longNames[c.key]} (${unit})`}
                          className={cell}
                          disabled={readOnly}
                        />
                      </label>
                    ) : (
                      <label key={c.key} className="flex min-w-0 flex-col gap-0.5">
                        <span aria-hidden="true">
                          {c.label} <span className="text-ink-soft">(°)</span>
                        </span>
                        <input
                          type="number"
                          step="any"
                          inputMode="decimal"
                          aria-label={`Layer ${i + 1} ${longNames[c.key]} (°)`}
                          aria-invalid={invalid || undefined}
                          className={cell}
                          disabled={readOnly}
                          {...register(name, { setValueAs: numberOrNull })}
                        />
                      </label>
                    );
                  })}
              </div>
            </li>
          );
        })}
      </ol>
      <ListErrors messages={messages} />
      {!readOnly ? (
        <div>
          <Button variant="secondary" onClick={() => append(emptyRow(null))}>
            Add a layer
          </Button>
        </div>
      ) : null}
    </fieldset>
  );
}
