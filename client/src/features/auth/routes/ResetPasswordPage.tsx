import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useSearchParams } from 'react-router-dom';
import { resetPasswordSchema } from '@shared/schemas/auth';
import { Button, ButtonLink } from '@client/components/Button';
import { FormSummary, TextField } from '@client/components/Fields';
import { isApiError } from '@client/lib/api';
import { applyServerErrors } from '@client/lib/forms';
import { useResetPassword } from '../api/auth';
import { AuthCard, BackToSignIn } from '../components/AuthCard';
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
  const [summary, setSummary] = useState<string | null>(null);
  const [invalid, setInvalid] = useState(false);
  const { register, handleSubmit, setError, formState } = useForm({
    resolver: zodResolver(schema),
    defaultValues: { token, password: '', confirm: '' },
  });

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

  const onSubmit = handleSubmit(async ({ password }) => {
    setSummary(null);
    try {
      await reset.mutateAsync({ token, password });
    } catch (error) {
      if (isApiError(error) && (error.code === 'invalid_token' || 'token' in error.fields)) setInvalid(true);
      else setSummary(applyServerErrors(error, setError, ['password']));
    }
  });

  return (
    <AuthCard title="Choose a new password" intro="At least 10 characters. A few unrelated words make a strong one.">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-5">
        <FormSummary message={summary} />
        <TextField
          label="New password"
          type="password"
          autoComplete="new-password"
          error={formState.errors.password?.message}
          {...register('password')}
        />
        <TextField
          label="New password again"
          type="password"
          autoComplete="new-password"
          error={formState.errors.confirm?.message}
          {...register('confirm')}
        />
        <Button type="submit" busy={formState.isSubmitting} busyText="Saving…">
          Save the new password
        </Button>
      </form>
      <BackToSignIn />
    </AuthCard>
  );
}
