import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { forgotPasswordSchema } from '@shared/schemas/auth';
import { Button } from '@client/components/Button';
import { FormSummary, TextField } from '@client/components/Fields';
import { Notice } from '@client/components/Status';
import { applyServerErrors } from '@client/lib/forms';
import { useForgotPassword } from '../api/auth';
import { AuthCard, BackToSignIn } from '../components/AuthCard';

export function ForgotPasswordPage() {
  const forgot = useForgotPassword();
  const [summary, setSummary] = useState<string | null>(null);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const { register, handleSubmit, setError, formState } = useForm({
    resolver: zodResolver(forgotPasswordSchema),
    defaultValues: { email: '' },
  });

  const onSubmit = handleSubmit(async (values) => {
    setSummary(null);
    try {
      await forgot.mutateAsync(values);
      setSentTo(values.email);
    } catch (error) {
      setSummary(applyServerErrors(error, setError, ['email']));
    }
  });

  return (
    <AuthCard title="Reset your password" intro="Give the e-mail address you sign in with. We will send a link to choose a new password.">
      <Notice>
        {sentTo
          ? `If an account uses ${sentTo}, a link is on its way. The link works for one hour and only once. Check the spam folder if it has not arrived in a few minutes.`
          : null}
      </Notice>
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-5">
        <FormSummary message={summary} />
        <TextField
          label="E-mail"
          type="email"
          autoComplete="username"
          inputMode="email"
          error={formState.errors.email?.message}
          {...register('email')}
        />
        <Button type="submit" busy={formState.isSubmitting} busyText="Sending…">
          {sentTo ? 'Send the link again' : 'Send the link'}
        </Button>
      </form>
      <BackToSignIn />
    </AuthCard>
  );
}
