import {
  useEffect,
  useId,
  useRef,
  type InputHTMLAttributes,
  type ReactNode,
  type Ref,
  type SelectHTMLAttributes,
  type TextareaHTMLAttributes,
} from 'react';
import { fieldSentence } from '@client/lib/sentences';

const controlClass =
  'block w-full min-h-11 rounded-md border border-rule-strong bg-sheet px-3 py-2 text-base text-ink ' +
  'placeholder:text-ink-soft/70 focus-visible:border-accent aria-[invalid=true]:border-error-text';

function FieldHint({ id, hint }: { id: string; hint?: ReactNode }) {
  return hint ? (
    <p id={`${id}-hint`} className="text-sm text-ink-soft">
      {hint}
    </p>
  ) : null;
}

function FieldError({ id, label, error }: { id: string; label: string; error?: string }) {
  return error ? (
    <p id={`${id}-error`} className="text-sm font-semibold text-error-text">
      {fieldSentence(label, error)}
    </p>
  ) : null;
}

interface FieldFrameProps {
  id: string;
  label: string;
  hint?: ReactNode;
  error?: string;
  children: ReactNode;
}

function FieldFrame({ id, label, hint, error, children }: FieldFrameProps) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-semibold">
        {label}
      </label>
      <FieldHint id={id} hint={hint} />
      {children}
      <FieldError id={id} label={label} error={error} />
    </div>
  );
}

function describedBy(id: string, hint: unknown, error: unknown) {
  const ids = [hint ? `${id}-hint` : '', error ? `${id}-error` : ''].filter(Boolean);
  return ids.length ? ids.join(' ') : undefined;
}

interface TextFieldProps extends Omit<InputHTMLAttributes<HTMLInputElement>, 'id'> {
  label: string;
  hint?: ReactNode;
  /** The reason from the form's validation or the server ("is required"); shown under the field. */
  error?: string;
  ref?: Ref<HTMLInputElement>;
}

/** A labelled input. Spread react-hook-form's register() into it: `<TextField label="E-mail" {...register('email')} />`. */
export function TextField({ label, hint, error, className = '', ...input }: TextFieldProps) {
  const id = useId();
  return (
    <FieldFrame id={id} label={label} hint={hint} error={error}>
      <input
        id={id}
        className={`${controlClass} ${className}`}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(id, hint, error)}
        {...input}
      />
    </FieldFrame>
  );
}

interface TextAreaFieldProps extends Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, 'id'> {
  label: string;
  hint?: ReactNode;
  error?: string;
  ref?: Ref<HTMLTextAreaElement>;
}

/** A labelled text box of several lines (notes, remarks). */
export function TextAreaField({ label, hint, error, className = '', rows = 2, ...textarea }: TextAreaFieldProps) {
  const id = useId();
  return (
    <FieldFrame id={id} label={label} hint={hint} error={error}>
      <textarea
        id={id}
        rows={rows}
        className={`${controlClass} ${className}`}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(id, hint, error)}
        {...textarea}
      />
    </FieldFrame>
  );
}

interface SelectFieldProps extends Omit<SelectHTMLAttributes<HTMLSelectElement>, 'id'> {
  label: string;
  hint?: ReactNode;
  error?: string;
  options: readonly { value: string | number; label: string }[];
  /** Text of a first, empty choice ("No site"), when the field may be left empty. */
  emptyLabel?: string;
  ref?: Ref<HTMLSelectElement>;
}

export function SelectField({ label, hint, error, options, emptyLabel, className = '', ...select }: SelectFieldProps) {
  const id = useId();
  return (
    <FieldFrame id={id} label={label} hint={hint} error={error}>
      <select
        id={id}
        className={`${controlClass} ${className}`}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(id, hint, error)}
        {...select}
      >
        {emptyLabel !== undefined ? <option value="">{emptyLabel}</option> : null}
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </FieldFrame>
  );
}

interface CheckboxFieldProps extends Omit<InputHTMLAttributes<HTMLInputElement>, 'id' | 'type'> {
  label: string;
  hint?: ReactNode;
  error?: string;
  ref?: Ref<HTMLInputElement>;
}

export function CheckboxField({ label, hint, error, ...input }: CheckboxFieldProps) {
  const id = useId();
  return (
    <div className="flex flex-col gap-1">
      <div className="flex min-h-11 items-center gap-3">
        <input
          id={id}
          type="checkbox"
          className="size-6 shrink-0 accent-accent"
          aria-invalid={error ? true : undefined}
          aria-describedby={describedBy(id, hint, error)}
          {...input}
        />
        <label htmlFor={id} className="font-semibold">
          {label}
        </label>
      </div>
      <FieldHint id={id} hint={hint} />
      <FieldError id={id} label={label} error={error} />
    </div>
  );
}

/**
 * The form's own message above the fields: why the last save failed. It takes the focus when it
 * appears (and again for each new refusal), so the person, and a screen reader, start from it.
 */
export function FormSummary({ message }: { message: string | null | undefined }) {
  const ref = useRef<HTMLParagraphElement>(null);
  useEffect(() => {
    if (message) ref.current?.focus();
  }, [message]);
  return (
    <div role="alert" aria-live="assertive">
      {message ? (
        <p
          ref={ref}
          tabIndex={-1}
          data-testid="form-summary"
          className="rounded-md border border-error-text/40 bg-sheet px-4 py-3 font-semibold text-error-text"
        >
          {message}
        </p>
      ) : null}
    </div>
  );
}
