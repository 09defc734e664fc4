import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import type { SiteRole } from '@shared/schemas/common';
import { membershipSchema, type Person, type Site } from '@shared/schemas/sites';
import { Button } from '@client/components/Button';
import { CheckboxField, FormSummary, SelectField } from '@client/components/Fields';
import { applyServerErrors } from '@client/lib/forms';
import { roleOptions, siteOptions } from './InviteForm';

/** The site is part of the address (PUT …/memberships/:siteId), so only this form asks for it. */
const schema = membershipSchema.extend({ siteId: z.number({ error: 'is required' }).int().positive() });

interface AddMembershipFormProps {
  person: Person;
  sites: readonly Site[];
  onAdd: (values: { siteId: number; role: SiteRole; canInspect: boolean }) => Promise<unknown>;
}

export function AddMembershipForm({ person, sites, onAdd }: AddMembershipFormProps) {
  const [open, setOpen] = useState(false);
  const [summary, setSummary] = useState<string | null>(null);
  const { register, handleSubmit, setError, reset, formState } = useForm({
    resolver: zodResolver(schema),
    defaultValues: { siteId: undefined, role: 'operator', canInspect: false },
  });

  if (sites.length === 0) return null;
  if (!open) {
    return (
      <div className="mt-3">
        <Button variant="secondary" onClick={() => setOpen(true)} aria-label={`Add ${person.name} to a site`}>
          Add to a site
        </Button>
      </div>
    );
  }

  const onSubmit = handleSubmit(async (values) => {
    setSummary(null);
    try {
      await onAdd(values);
      reset();
      setOpen(false);
    } catch (error) {
      setSummary(applyServerErrors(error, setError, ['siteId', 'role', 'canInspect']));
    }
  });

  return (
    <form
      onSubmit={onSubmit}
      noValidate
      aria-label={`Add ${person.name} to a site`}
      className="mt-4 flex flex-col gap-4 rounded-md border border-rule p-4"
    >
      <FormSummary message={summary} />
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField
          label="Site"
          emptyLabel="Choose a site"
          options={siteOptions(sites)}
          error={formState.errors.siteId?.message}
          {...register('siteId', { setValueAs: (v: string) => (v === '' ? undefined : Number(v)) })}
        />
        <SelectField label="Role" options={roleOptions} error={formState.errors.role?.message} {...register('role')} />
      </div>
      <CheckboxField label="Inspects excavations on this site" {...register('canInspect')} />
      <div className="flex flex-wrap gap-3">
        <Button type="submit" busy={formState.isSubmitting} busyText="Adding…">
          Add
        </Button>
        <Button variant="quiet" onClick={() => setOpen(false)}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
