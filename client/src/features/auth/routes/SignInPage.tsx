import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Link, Navigate, useNavigate, useSearchParams } from 'react-router-dom';
import { signInSchema } from '@shared/schemas/auth';
import { TextField } from '@client/components/Fields';
import { useMe } from '@client/lib/session';
import { useSignIn } from '../api/auth';
import { AuthCard, safeNextPath } from '../components/AuthCard';
import { AuthForm, EmailField, useAuthSubmit } from '../components/AuthForm';
import { DemoSignIns } from '../components/DemoSignIns';

export function SignInPage() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const signIn = useSignIn();
  const form = useForm({
    resolver: zodResolver(signInSchema),
    defaultValues: { email: '', password: '' },
  });
  const { register, setValue, formState } = form;
  const me = useMe();
  const submit = useAuthSubmit(form, ['email', 'password'], async (values) => {
    await signIn.mutateAsync(values);
    void navigate(safeNextPath(params.get('next')), { replace: true });
  });

  // Already signed in (another tab, the back button): go on rather than ask again.
  if (me.data && !formState.isSubmitting) return <Navigate to={safeNextPath(params.get('next'))} replace />;

  return (
    <AuthCard title="Sign in to Brink" intro={params.get('next') ? 'Sign in to carry on where you were.' : undefined}>
      <AuthForm {...submit} action="Sign in" busyText="Signing in…">
        <EmailField error={formState.errors.email?.message} {...register('email')} />
        <TextField
          label="Password"
          type="password"
          autoComplete="current-password"
          error={formState.errors.password?.message}
          {...register('password')}
        />
      </AuthForm>
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
