import type { ButtonHTMLAttributes, ReactNode } from 'react';
import { Link, type LinkProps } from 'react-router-dom';

export type ButtonVariant = 'primary' | 'secondary' | 'quiet';

const base =
  'inline-flex min-h-11 items-center justify-center gap-2 rounded-md px-4 py-2 text-base font-semibold ' +
  'no-underline transition-colors disabled:cursor-not-allowed disabled:opacity-60';

const variants: Record<ButtonVariant, string> = {
  primary: 'bg-accent text-white hover:bg-accent-strong hover:text-white',
  secondary: 'border border-accent bg-sheet text-accent hover:bg-accent-wash hover:text-accent-strong',
  quiet: 'text-accent underline underline-offset-4 hover:bg-accent-wash hover:text-accent-strong',
};

export function buttonClass(variant: ButtonVariant = 'primary', extra = '') {
  return `${base} ${variants[variant]} ${extra}`.trim();
}

interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: ButtonVariant;
  /** While true the button is disabled and shows this text instead of its children. */
  busyText?: string;
  busy?: boolean;
  children: ReactNode;
}

/** Actions. Ordinary buttons never take the safety colours. Touch target at least 44 px tall. */
export function Button({
  variant = 'primary',
  busy = false,
  busyText,
  className = '',
  type = 'button',
  disabled,
  children,
  ...rest
}: ButtonProps) {
  return (
    <button type={type} className={buttonClass(variant, className)} disabled={disabled || busy} aria-busy={busy || undefined} {...rest}>
      {busy && busyText ? busyText : children}
    </button>
  );
}

interface ButtonLinkProps extends LinkProps {
  variant?: ButtonVariant;
}

/** A link that looks like a button, for moving to another page. */
export function ButtonLink({ variant = 'secondary', className = '', ...rest }: ButtonLinkProps) {
  return <Link className={buttonClass(variant, className)} {...rest} />;
}

/** "Show more" under a list that comes a page at a time (a TanStack infinite query); nothing on the last page. */
export function ShowMore({
  pages,
  label,
  busyText,
  className,
}: {
  pages: { hasNextPage: boolean; isFetchingNextPage: boolean; fetchNextPage: () => Promise<unknown> };
  label: string;
  busyText: string;
  className?: string;
}) {
  if (!pages.hasNextPage) return null;
  return (
    <div className={className}>
      <Button variant="secondary" busy={pages.isFetchingNextPage} busyText={busyText} onClick={() => void pages.fetchNextPage()}>
        {label}
      </Button>
    </div>
  );
}
