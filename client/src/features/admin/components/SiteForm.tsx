import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { QuantityField } from '@client/components/QuantityField';
import { zodResolver } from '@hookform/resolvers/zod';
import { siteSchema, surchargeMethodLabels, surchargeMethods, type Site, type SiteInput } from '@shared/schemas/sites';
import { unitSystemLabels, unitSystems } from '@shared/units';
import { Button } from '@client/components/Button';
import { FormSummary, SelectField, TextField } from '@client/components/Fields';
import { applyServerErrors, maxLengths } from '@client/lib/forms';

const max = maxLengths(siteSchema.shape);
import { OriginMap } from './OriginMap';

const methodOptions = surchargeMethods.map((m) => ({ value: m, label: surchargeMethodLabels[m] }));
const unitOptions = unitSystems.map((u) => ({ value: u, label: unitSystemLabels[u] }));

function timeZones(): string[] {
  try {
    return Intl.supportedValuesOf('timeZone');
  } catch {
    return ['Europe/London', 'UTC'];
  }
}

const newSite: SiteInput = {
  name: '',
  latitude: Number.NaN,
  longitude: Number.NaN,
  timezone: Intl.DateTimeFormat().resolvedOptions().timeZone || 'Europe/London',
  minimumClearance: 0.6,
  defaultMethod: 'dispersion-45',
  units: 'metric',
};

interface SiteFormProps {
  site: Site | null;
  onSave: (values: SiteInput) => Promise<unknown>;
  saveLabel: string;
}

export function SiteForm({ site, onSave, saveLabel }: SiteFormProps) {
  const zones = useMemo(timeZones, []);
  const [summary, setSummary] = useState<string | null>(null);
  const { register, control, handleSubmit, setError, setValue, getValues, watch, formState } = useForm({
    resolver: zodResolver(siteSchema),
    defaultValues: site
      ? {
          name: site.name,
          latitude: site.latitude,
          longitude: site.longitude,
          timezone: site.timezone,
          minimumClearance: site.minimumClearance,
          defaultMethod: site.defaultMethod,
          units: site.units,
        }
      : newSite,
  });
  const { errors } = formState;
  const latitude = watch('latitude');
  const longitude = watch('longitude');

  const onSubmit = handleSubmit(async (values) => {
    setSummary(null);
    try {
      await onSave(values);
    } catch (error) {
      setSummary(
        applyServerErrors(error, setError, ['name', 'latitude', 'longitude', 'timezone', 'minimumClearance', 'defaultMethod', 'units']),
      );
    }
  });

  const number = { valueAsNumber: true } as const;
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-5">
      <FormSummary message={summary} />
      <TextField label="Site name" maxLength={max.name} error={errors.name?.message} {...register('name')} />

      <fieldset className="flex flex-col gap-4">
        <legend className="mb-2 text-lg font-semibold">Origin</legend>
        <p className="text-ink-soft">The point every plan on this site is measured from. Type it, or click the map to set it.</p>
        <div className="grid gap-4 sm:grid-cols-2">
          <TextField
            label="Latitude (°)"
            type="number"
            step="any"
            inputMode="decimal"
            hint="North positive, e.g. 52.204512"
            error={errors.latitude?.message}
            {...register('latitude', number)}
          />
          <TextField
            label="Longitude (°)"
            type="number"
            step="any"
            inputMode="decimal"
            hint="East positive, e.g. 0.121817"
            error={errors.longitude?.message}
            {...register('longitude', number)}
          />
        </div>
        <OriginMap
          latitude={latitude ?? Number.NaN}
          longitude={longitude ?? Number.NaN}
          onPick={(lat, lng) => {
            setValue('latitude', lat, { shouldValidate: true, shouldDirty: true });
            setValue('longitude', lng, { shouldValidate: true, shouldDirty: true });
          }}
        />
      </fieldset>

      <div className="grid gap-4 sm:grid-cols-2">
        <TextField
          label="Time zone"
          list="brink-time-zones"
          autoComplete="off"
          hint="Permit windows and shifts use this clock."
          error={errors.timezone?.message}
          {...register('timezone')}
        />
        <datalist id="brink-time-zones">
          {zones.map((z) => (
            <option key={z} value={z} />
          ))}
        </datalist>
        <QuantityField
          control={control}
          name="minimumClearance"
          quantity="length"
          label="Minimum edge clearance"
          hint="No load closer than this to any excavation edge, whatever the check says."
        />
        <SelectField
          label="Default surcharge method"
          options={methodOptions}
          hint="New checks on this site start with this method."
          error={errors.defaultMethod?.message}
          {...register('defaultMethod')}
        />
        <SelectField
          label="Default units"
          options={unitOptions}
          hint="What this site's people read and type, unless they choose their own. US customary starts the clearance at OSHA's 2 ft (0.61 m)."
          error={errors.units?.message}
          {...register('units', {
            onChange: (e: { target: { value: string } }) => {
              // A clearance still at the other system's default moves with the units (docs/calculation.md, "Units").
              const clearance = getValues('minimumClearance');
              const us = e.target.value === 'us';
              if (clearance === (us ? 0.6 : 0.6096)) setValue('minimumClearance', us ? 0.6096 : 0.6, { shouldDirty: true });
            },
          })}
        />
      </div>

      <div>
        <Button type="submit" busy={formState.isSubmitting} busyText="Saving…">
          {saveLabel}
        </Button>
      </div>
    </form>
  );
}
