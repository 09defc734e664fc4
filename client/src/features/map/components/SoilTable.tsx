import { useFieldArray, type Control, type FieldErrors, type UseFormRegister, type UseFormWatch } from 'react-hook-form';
import { Button } from '@client/components/Button';
import { ListErrors, listErrorMessages, RemoveRowButton } from '@client/components/ListErrors';
import type { ExcavationValues } from '@shared/schemas/excavations';
import { emptyRow, numberOrNull, type ExcavationFormValues, type SoilRow } from './excavationFormValues';

interface SoilTableProps {
  control: Control<ExcavationFormValues, unknown, ExcavationValues>;
  register: UseFormRegister<ExcavationFormValues>;
  watch: UseFormWatch<ExcavationFormValues>;
  errors: FieldErrors<ExcavationFormValues>;
  readOnly: boolean;
}

const columns: { key: keyof SoilRow; label: string; unit: string; only?: SoilRow['model'] }[] = [
  { key: 'top', label: 'Top', unit: 'm' },
  { key: 'unitWeight', label: 'γ', unit: 'kN/m³' },
  { key: 'saturatedUnitWeight', label: 'γsat', unit: 'kN/m³' },
  { key: 'frictionAngle', label: 'φ′', unit: '°', only: 'drained' },
  { key: 'cohesion', label: 'c′', unit: 'kPa', only: 'drained' },
  { key: 'undrainedShearStrength', label: 'cu', unit: 'kPa', only: 'undrained' },
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
  'w-20 rounded border border-rule-strong bg-sheet px-2 py-1.5 text-right aria-[invalid=true]:border-error-text disabled:bg-paper disabled:text-ink-soft';

/**
 * The soil layers, each from its top down to the next layer's top (the last runs to any depth).
 * A drained layer gives φ′ and c′ (effective stress); an undrained clay gives cu (total stress).
 * γsat is used below the water table; left empty it is taken as γ.
 */
export function SoilTable({ control, register, watch, errors, readOnly }: SoilTableProps) {
  const { fields, append, remove } = useFieldArray({ control, name: 'soil' });
  const rows = watch('soil');
  const messages = listErrorMessages(
    errors.soil as Parameters<typeof listErrorMessages>[0],
    fields.length,
    'Soil layers',
    (i, k) => `Layer ${i + 1} ${longNames[k] ?? k}`,
  );

  return (
    <fieldset className="flex flex-col gap-2">
      <legend className="mb-1 font-semibold">Soil layers</legend>
      <p className="text-sm text-ink-soft">
        From ground level down. γsat applies below the water table (empty: same as γ). Give φ′ and c′ for a drained layer, or cu for an
        undrained clay.
      </p>
      <div className="overflow-x-auto">
        <table className="text-sm">
          <thead>
            <tr>
              <th scope="col" className="px-1 text-left">
                Layer
              </th>
              {columns.map((c) => (
                <th key={c.key} scope="col" className="px-1 text-right font-semibold">
                  {c.label} <span className="font-normal text-ink-soft">({c.unit})</span>
                </th>
              ))}
              <th scope="col" className="px-1 text-left">
                Strength
              </th>
              <th scope="col">
                <span className="sr-only">Remove</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {fields.map((f, i) => {
              const model = rows?.[i]?.model ?? 'drained';
              return (
                <tr key={f.id}>
                  <th scope="row" className="px-1 text-left font-normal">
                    {i + 1}
                  </th>
                  {columns.map((c) => {
                    const off = c.only !== undefined && c.only !== model;
                    const invalid = Boolean((errors.soil?.[i] as Record<string, unknown> | undefined)?.[c.key]);
                    return (
                      <td key={c.key} className="px-1 py-1">
                        <input
                          type="number"
                          step="any"
                          inputMode="decimal"
                          aria-label={`Layer ${i + 1} ${longNames[c.key]} (${c.unit})`}
                          aria-invalid={invalid || undefined}
                          className={cell}
                          disabled={readOnly || off}
                          {...register(`soil.${i}.${c.key}` as `soil.${number}.top`, { setValueAs: numberOrNull })}
                        />
                      </td>
                    );
                  })}
                  <td className="px-1 py-1">
                    <select
                      aria-label={`Layer ${i + 1} strength`}
                      className="rounded border border-rule-strong bg-sheet px-1 py-1.5"
                      disabled={readOnly}
                      {...register(`soil.${i}.model`)}
                    >
                      <option value="drained">Drained (φ′, c′)</option>
                      <option value="undrained">Undrained (cu)</option>
                    </select>
                  </td>
                  <td className="px-1 py-1">
                    {!readOnly && fields.length > 1 ? <RemoveRowButton label={`Remove layer ${i + 1}`} onClick={() => remove(i)} /> : null}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
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
