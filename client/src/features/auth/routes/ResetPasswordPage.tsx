import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useSearchParams } from 'react-router-dom';
import { resetPasswordSchema } from '@shared/schemas/auth';
import { ButtonLink } from '@client/components/Button';
import { isApiError } from '@client/lib/api';
import { useResetPassword } from '../api/auth';
import { AuthCard, BackToSignIn } from '../components/AuthCard';
import { AuthForm, NewPasswordFields, useAuthSubmit } from '../components/AuthForm';
import { withPasswordConfirmation } from '../components/confirmPassword';

const schema = withPasswordConfirmation(resetPasswordSchema);

function LinkNotValid() {
  return (
    <AuthCard title="This link does not work any more">
      <p>Password links work once, for one hour. Ask for a new one and use the newest e-mail.</p>
      <ButtonLink to="/forgot-password" variant="primary">
        Ask for a new link
      </ButtonLink>
    </AuthCard>
  );
}

export function ResetPasswordPage() {
  const [params] = useSearchParams();
  const token = params.get('token') ?? '';
  const reset = useResetPassword();
  const [invalid, setInvalid] = useState(false);
  const form = useForm({
    resolver: zodResolver(schema),
    defaultValues: { token, password: '', confirm: '' },
  });
  const submit = useAuthSubmit(
    form,
    ['password'],
    ({ password }) => reset.mutateAsync({ token, password }),
    (error) => {
      const dead = isApiError(error) && (error.code === 'invalid_token' || 'token' in error.fields);
      if (dead) setInvalid(true);
      return dead;
    },
  );

  if (reset.isSuccess) {
    return (
      <AuthCard title="Password changed">
        <p role="status">Your new password is set. Sign in with it now.</p>
        <ButtonLink to="/sign-in" variant="primary">
          Sign in
        </ButtonLink>
      </AuthCard>
    );
  }
  if (token.length < 20 || invalid) return <LinkNotValid />;

  return (
    <AuthCard title="Choose a new password" intro="At least 10 characters. A few unrelated words make a strong one.">
      <AuthForm {...submit} action="Save the new password" busyText="Saving…">
        <NewPasswordFields
          label="New password"
          password={form.register('password')}
          confirm={form.register('confirm')}
          errors={form.formState.errors}
        />
      </AuthForm>
      <BackToSignIn />
    </AuthCard>
  );
}
