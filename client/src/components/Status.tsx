import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { errorMessage, isApiError } from '@client/lib/api';
import { Button } from './Button';

/** Shown while data loads. Polite, so a screen reader hears it without interruption. */
export function Loading({ what = 'Loading' }: { what?: string }) {
  return (
    <p role="status" className="text-ink-soft">
      {what}…
    </p>
  );
}

/** A failed load, with a way to try again (or, for a record that does not exist, a way back). */
export function LoadError({ error, retry }: { error: unknown; retry?: () => void }) {
  // A record that does not exist (or not for you): trying again will not help, a way back will.
  const missing = isApiError(error, 404);
  return (
    <div role="alert" className="flex flex-col items-start gap-3 rounded-md border border-error-text/40 bg-sheet px-4 py-3">
      <p className="font-semibold text-error-text">{errorMessage(error)}</p>
      {missing ? (
        <p className="flex flex-wrap gap-4">
          <button type="button" className="underline" onClick={() => window.history.back()}>
            Go back
          </button>
          <Link to="/">Go to your dashboard</Link>
        </p>
      ) : retry ? (
        <Button variant="secondary" onClick={retry}>
          Try again
        </Button>
      ) : null}
    </div>
  );
}

/** A confirmation that something was done ("Invitation sent"). */
export function Notice({ children }: { children: ReactNode }) {
  return (
    <div role="status" aria-live="polite">
      {children ? <p className="rounded-md border border-accent/40 bg-accent-wash px-4 py-3">{children}</p> : null}
    </div>
  );
}
