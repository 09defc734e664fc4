import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useNavigate, useSearchParams } from 'react-router-dom';
import { acceptInvitationSchema } from '@shared/schemas/auth';
import { roleLabels } from '@shared/schemas/common';
import { ButtonLink } from '@client/components/Button';
import { TextField } from '@client/components/Fields';
import { LoadError, Loading } from '@client/components/Status';
import { isApiError } from '@client/lib/api';
import { maxLengths } from '@client/lib/forms';
import { useAcceptInvitation, useInvitation, type InvitationSummary } from '../api/auth';
import { AuthCard } from '../components/AuthCard';
import { AuthForm, NewPasswordFields, useAuthSubmit } from '../components/AuthForm';
import { withPasswordConfirmation } from '../components/confirmPassword';

const max = maxLengths(acceptInvitationSchema.shape);
const schema = withPasswordConfirmation(acceptInvitationSchema);

function InvitationNotValid() {
  return (
    <AuthCard title="This invitation does not work any more">
      <p>Invitations work once, for 72 hours. Ask the administrator who invited you to send a new one.</p>
      <p>If you have already set your password, sign in instead.</p>
      <ButtonLink to="/sign-in" variant="primary">
        Sign in
      </ButtonLink>
    </AuthCard>
  );
}

export function AcceptInvitationPage() {
  const [params] = useSearchParams();
  const raw = params.get('token');
  const token = raw && raw.length >= 20 ? raw : null;
  const invitation = useInvitation(token);

  if (token === null) return <InvitationNotValid />;
  if (invitation.isPending) return <Loading what="Checking the invitation" />;
  if (invitation.isError) {
    if (isApiError(invitation.error, 404) || isApiError(invitation.error, 410)) return <InvitationNotValid />;
    return <LoadError error={invitation.error} retry={() => invitation.refetch()} />;
  }
  return <AcceptForm token={token} invitation={invitation.data} />;
}

function AcceptForm({ token, invitation }: { token: string; invitation: InvitationSummary }) {
  const navigate = useNavigate();
  const accept = useAcceptInvitation();
  const [invalid, setInvalid] = useState(false);
  const form = useForm({
    resolver: zodResolver(schema),
    defaultValues: { token, name: invitation.name, password: '', confirm: '' },
  });
  const submit = useAuthSubmit(
    form,
    ['name', 'password'],
    async ({ name, password }) => {
      await accept.mutateAsync({ token, name, password });
      void navigate('/', { replace: true });
    },
    (error) => {
      const dead = isApiError(error, 404) || isApiError(error, 410) || (isApiError(error) && error.code === 'invalid_token');
      if (dead) setInvalid(true);
      return dead;
    },
  );

  if (invalid) return <InvitationNotValid />;

  return (
    <AuthCard
      title="Join Brink"
      intro={
        <p>
          You have been invited as <strong className="text-ink">{invitation.email}</strong>
          {invitation.siteName && invitation.role ? `, as ${roleLabels[invitation.role].toLowerCase()} on ${invitation.siteName}` : ''}.
          Check your name and choose a password to finish.
        </p>
      }
    >
      <AuthForm {...submit} action="Set password and sign in" busyText="Setting up…">
        <TextField
          label="Your name"
          autoComplete="name"
          maxLength={max.name}
          error={form.formState.errors.name?.message}
          {...form.register('name')}
        />
        <NewPasswordFields
          label="Password"
          hint="At least 10 characters."
          password={form.register('password')}
          confirm={form.register('confirm')}
          errors={form.formState.errors}
        />
      </AuthForm>
    </AuthCard>
  );
}
