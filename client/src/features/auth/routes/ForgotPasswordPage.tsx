import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { forgotPasswordSchema } from '@shared/schemas/auth';
import { Notice } from '@client/components/Status';
import { useForgotPassword } from '../api/auth';
import { AuthCard, BackToSignIn } from '../components/AuthCard';
import { AuthForm, EmailField, useAuthSubmit } from '../components/AuthForm';

export function ForgotPasswordPage() {
  const forgot = useForgotPassword();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const form = useForm({
    resolver: zodResolver(forgotPasswordSchema),
    defaultValues: { email: '' },
  });
  const submit = useAuthSubmit(form, ['email'], async (values) => {
    await forgot.mutateAsync(values);
    setSentTo(values.email);
  });

  return (
    <AuthCard title="Reset your password" intro="Give the e-mail address you sign in with. We will send a link to choose a new password.">
      <Notice>
        {sentTo
          ? `If an account uses ${sentTo}, a link is on its way. The link works for one hour and only once. Check the spam folder if it has not arrived in a few minutes.`
          : null}
      </Notice>
      <AuthForm {...submit} action={sentTo ? 'Send the link again' : 'Send the link'} busyText="Sending…">
        <EmailField error={form.formState.errors.email?.message} {...form.register('email')} />
      </AuthForm>
      <BackToSignIn />
    </AuthCard>
  );
}
