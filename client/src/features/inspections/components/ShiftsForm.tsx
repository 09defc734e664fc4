import { useState } from 'react';
import { useFieldArray, useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { shiftSchema, shiftsInputSchema, type ShiftsInput } from '@shared/schemas/inspections';
import { Button } from '@client/components/Button';
import { FormSummary, TextField } from '@client/components/Fields';
import { Notice } from '@client/components/Status';
import { applyServerErrors, maxLengths } from '@client/lib/forms';

const max = maxLengths(shiftSchema.shape);
import { useSaveShifts, type ShiftsAnswer } from '../api/inspections';

/** The site's shift start times, for coordinators and administrators. */
export function ShiftsForm({ siteId, current }: { siteId: number; current: ShiftsAnswer }) {
  const save = useSaveShifts(siteId);
  const [summary, setSummary] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const { control, register, handleSubmit, setError, formState } = useForm<ShiftsInput>({
    resolver: zodResolver(shiftsInputSchema),
    defaultValues: { shifts: current.shifts },
  });
  const { fields, append, remove } = useFieldArray({ control, name: 'shifts' });
  const errors = formState.errors.shifts;

  const onSubmit = handleSubmit(async (values) => {
    setSummary(null);
    setSaved(null);
    try {
      await save.mutateAsync(values);
      setSaved('Shifts saved. Inspections are due from each start time.');
    } catch (error) {
      setSummary(
        applyServerErrors(
          error,
          setError,
          fields.flatMap((_f, i) => [`shifts.${i}.name`, `shifts.${i}.start`] as const),
        ),
      );
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Shifts">
      <FormSummary message={summary ?? (errors?.root?.message || errors?.message || null)} />
      <Notice>{saved}</Notice>
      <p className="text-ink-soft">
        Times on the site’s clock ({current.timeZone}). Each shift runs until the next one starts; an open excavation is due for inspection
        at each start and overdue 30 minutes later.
      </p>
      {fields.map((f, i) => (
        <div key={f.id} className="grid items-end gap-3 sm:grid-cols-[1fr_10rem_auto]">
          <TextField
            label={`Shift ${i + 1} name`}
            maxLength={max.name}
            error={errors?.[i]?.name?.message}
            {...register(`shifts.${i}.name`)}
          />
          <TextField label={`Shift ${i + 1} starts`} type="time" error={errors?.[i]?.start?.message} {...register(`shifts.${i}.start`)} />
          <Button variant="quiet" onClick={() => remove(i)} disabled={fields.length === 1} aria-label={`Remove shift ${i + 1}`}>
            Remove
          </Button>
        </div>
      ))}
      <div className="flex flex-wrap gap-3">
        {fields.length < 4 ? (
          <Button variant="secondary" onClick={() => append({ name: '', start: '' })}>
            Add a shift
          </Button>
        ) : null}
        <Button type="submit" busy={save.isPending} busyText="Saving…">
          Save shifts
        </Button>
      </div>
    </form>
  );
}
