import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { organisationUpdateSchema, type Organisation } from '@shared/schemas/auth';
import { Button } from '@client/components/Button';
import { FormSummary, TextField } from '@client/components/Fields';
import { Notice } from '@client/components/Status';
import { applyServerErrors, maxLengths } from '@client/lib/forms';
import { useRenameOrganisation } from '../api/people';

const max = maxLengths(organisationUpdateSchema.shape);

/** An administrator renames their own organisation (the name everyone in it sees by their own name). */
export function OrganisationForm({ organisation }: { organisation: Organisation }) {
  const rename = useRenameOrganisation();
  const [summary, setSummary] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const { register, handleSubmit, setError, formState } = useForm({
    resolver: zodResolver(organisationUpdateSchema),
    values: { name: organisation.name },
  });

  const onSubmit = handleSubmit(async (values) => {
    setSummary(null);
    setSaved(null);
    try {
      const r = await rename.mutateAsync(values);
      setSaved(`The organisation is now called ${r.name}.`);
    } catch (error) {
      setSummary(applyServerErrors(error, setError, ['name'], { name: 'Organisation name' }));
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Rename the organisation">
      <Notice>{saved}</Notice>
      <FormSummary message={summary} />
      <TextField
        label="Organisation name"
        hint="Everyone in your organisation sees it beside their own name."
        autoComplete="organization"
        maxLength={max.name}
        error={formState.errors.name?.message}
        {...register('name')}
      />
      <div>
        <Button type="submit" busy={rename.isPending} busyText="Saving…">
          Rename
        </Button>
      </div>
    </form>
  );
}
