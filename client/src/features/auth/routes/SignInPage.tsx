import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Link, Navigate, useNavigate, useSearchParams } from 'react-router-dom';
import { signInSchema } from '@shared/schemas/auth';
import { Button } from '@client/components/Button';
import { FormSummary, TextField } from '@client/components/Fields';
import { applyServerErrors } from '@client/lib/forms';
import { useMe } from '@client/lib/session';
import { useSignIn } from '../api/auth';
import { AuthCard, safeNextPath } from '../components/AuthCard';
import { DemoSignIns } from '../components/DemoSignIns';

export function SignInPage() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const signIn = useSignIn();
  const [summary, setSummary] = useState<string | null>(null);
  const form = useForm({
    resolver: zodResolver(signInSchema),
    defaultValues: { email: '', password: '' },
  });
  const { register, handleSubmit, setError, setValue, formState } = form;
  const me = useMe();

  // Already signed in (another tab, the back button): go on rather than ask again.
  if (me.data && !formState.isSubmitting) return <Navigate to={safeNextPath(params.get('next'))} replace />;

  const onSubmit = handleSubmit(async (values) => {
    setSummary(null);
    try {
      await signIn.mutateAsync(values);
      void navigate(safeNextPath(params.get('next')), { replace: true });
    } catch (error) {
      setSummary(applyServerErrors(error, setError, ['email', 'password']));
    }
  });

  return (
    <AuthCard title="Sign in to Brink" intro={params.get('next') ? 'Sign in to carry on where you were.' : undefined}>
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
        <TextField
          label="Password"
          type="password"
          autoComplete="current-password"
          error={formState.errors.password?.message}
          {...register('password')}
        />
        <Button type="submit" busy={formState.isSubmitting} busyText="Signing in…">
          Sign in
        </Button>
      </form>
      <p>
        <Link to="/forgot-password">Forgotten your password?</Link>
      </p>
      <DemoSignIns
        onPick={(email, password) => {
          setValue('email', email);
          setValue('password', password);
        }}
      />
    </AuthCard>
  );
}
