import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { invitationSchema } from '@shared/schemas/auth';
import { roleLabels, siteRoles, type SiteRole } from '@shared/schemas/common';
import type { Site } from '@shared/schemas/sites';
import { Button } from '@client/components/Button';
import { CheckboxField, FormSummary, SelectField, TextField } from '@client/components/Fields';
import { Notice } from '@client/components/Status';
import { applyServerErrors, maxLengths } from '@client/lib/forms';

const max = maxLengths(invitationSchema.shape);
import { useInvite } from '../api/people';

export const roleOptions = siteRoles.map((r) => ({ value: r, label: roleLabels[r] }));

export function siteOptions(sites: readonly Site[]) {
  return sites.map((s) => ({ value: s.id, label: s.name }));
}

const emptyInvitation = { email: '', name: '', isAdmin: false, siteId: null, role: null };

export function InviteForm({ sites }: { sites: readonly Site[] }) {
  const invite = useInvite();
  const [summary, setSummary] = useState<string | null>(null);
  const [sent, setSent] = useState<string | null>(null);
  const { register, handleSubmit, setError, reset, formState } = useForm({
    resolver: zodResolver(invitationSchema),
    defaultValues: emptyInvitation,
  });
  const { errors } = formState;

  const onSubmit = handleSubmit(async (values) => {
    setSummary(null);
    setSent(null);
    try {
      await invite.mutateAsync(values);
      setSent(`Invitation sent to ${values.email}. The link in it works for 72 hours.`);
      reset(emptyInvitation);
    } catch (error) {
      setSummary(applyServerErrors(error, setError, ['email', 'name', 'isAdmin', 'siteId', 'role']));
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-5" aria-label="Invite a person">
      <Notice>{sent}</Notice>
      <FormSummary message={summary} />
      <div className="grid gap-5 sm:grid-cols-2">
        <TextField
          label="E-mail"
          type="email"
          autoComplete="off"
          inputMode="email"
          maxLength={max.email}
          error={errors.email?.message}
          {...register('email')}
        />
        <TextField label="Name" autoComplete="off" maxLength={max.name} error={errors.name?.message} {...register('name')} />
        <SelectField
          label="Site"
          hint="Optional. Give a site and a role together."
          emptyLabel="No site yet"
          options={siteOptions(sites)}
          error={errors.siteId?.message}
          {...register('siteId', { setValueAs: (v: string) => (v === '' || v === null ? null : Number(v)) })}
        />
        <SelectField
          label="Role on that site"
          emptyLabel="No role yet"
          options={roleOptions}
          error={errors.role?.message}
          {...register('role', { setValueAs: (v: string) => (v === '' || v === null ? null : (v as SiteRole)) })}
        />
      </div>
      <CheckboxField
        label="Administrator"
        hint="Administrators manage people, invitations and sites, on every site."
        error={errors.isAdmin?.message}
        {...register('isAdmin')}
      />
      <div>
        <Button type="submit" busy={formState.isSubmitting} busyText="Sending…">
          Send invitation
        </Button>
      </div>
    </form>
  );
}
