import { useState, type ComponentProps, type ReactNode } from 'react';
import type { FieldErrors, FieldValues, Path, UseFormRegisterReturn, UseFormReturn } from 'react-hook-form';
import { Button } from '@client/components/Button';
import { FormSummary, TextField } from '@client/components/Fields';
import { applyServerErrors } from '@client/lib/forms';

/**
 * The submit of a sign-in, password or invitation form: clears the last refusal, sends, and on a
 * refusal puts the server's reasons under the fields the form shows and the rest in the summary.
 * `handled` takes a refusal the page shows its own way (a link that no longer works) and says so.
 */
export function useAuthSubmit<T extends FieldValues, C, V extends FieldValues>(
  form: UseFormReturn<T, C, V>,
  shownFields: readonly Path<T>[],
  send: (values: V) => Promise<unknown>,
  handled: (error: unknown) => boolean = () => false,
) {
  const [summary, setSummary] = useState<string | null>(null);
  const onSubmit = form.handleSubmit(async (values) => {
    setSummary(null);
    try {
      await send(values);
    } catch (error) {
      if (!handled(error)) setSummary(applyServerErrors(error, form.setError, shownFields));
    }
  });
  return { summary, onSubmit, busy: form.formState.isSubmitting };
}

interface AuthFormProps extends ReturnType<typeof useAuthSubmit> {
  /** The submit button's words, and what it says while the form is sent. */
  action: string;
  busyText: string;
  children: ReactNode;
}

/** The form of an auth page: the refusal summary, the fields, the one submit button. */
export function AuthForm({ summary, onSubmit, busy, action, busyText, children }: AuthFormProps) {
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-5">
      <FormSummary message={summary} />
      {children}
      <Button type="submit" busy={busy} busyText={busyText}>
        {action}
      </Button>
    </form>
  );
}

/** The e-mail a person signs in with. Spread `register('email')` into it. */
export function EmailField(props: Omit<ComponentProps<typeof TextField>, 'label'>) {
  return <TextField label="E-mail" type="email" autoComplete="username" inputMode="email" {...props} />;
}

/** A new password and the same again (`withPasswordConfirmation` checks they match). */
export function NewPasswordFields({
  label,
  hint,
  password,
  confirm,
  errors,
}: {
  label: string;
  hint?: string;
  password: UseFormRegisterReturn<'password'>;
  confirm: UseFormRegisterReturn<'confirm'>;
  errors: FieldErrors<{ password: string; confirm: string }>;
}) {
  return (
    <>
      <TextField label={label} type="password" autoComplete="new-password" hint={hint} error={errors.password?.message} {...password} />
      <TextField label={`${label} again`} type="password" autoComplete="new-password" error={errors.confirm?.message} {...confirm} />
    </>
  );
}
