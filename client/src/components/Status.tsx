import type { ReactNode } from 'react';
import { errorMessage } from '@client/lib/api';
import { Button } from './Button';

/** Shown while data loads. Polite, so a screen reader hears it without interruption. */
export function Loading({ what = 'Loading' }: { what?: string }) {
  return (
    <p role="status" className="text-ink-soft">
      {what}…
    </p>
  );
}

/** A failed load, with a way to try again. */
export function LoadError({ error, retry }: { error: unknown; retry?: () => void }) {
  return (
    <div role="alert" className="flex flex-col items-start gap-3 rounded-md border border-error-text/40 bg-sheet px-4 py-3">
      <p className="font-semibold text-error-text">{errorMessage(error)}</p>
      {retry ? (
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
