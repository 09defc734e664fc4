import { useState } from 'react';
import { errorMessage } from '@client/lib/api';
import { Button, type ButtonVariant } from './Button';

interface ConfirmActionProps {
  /** The first button ("Deactivate…"). */
  label: string;
  /** What will happen, asked in words before it does ("Deactivate Sam? They can no longer sign in."). */
  question: string;
  confirmLabel: string;
  cancelLabel?: string;
  /** An accessible name for the first button when its label alone is ambiguous in a list. */
  ariaLabel?: string;
  variant?: ButtonVariant;
  busy?: boolean;
  /** Runs on the second press; the question closes when it settles. */
  onConfirm: () => Promise<unknown> | void;
}

/** A consequential action in two presses: the button, then a plain question with yes and no. */
export function ConfirmAction({
  label,
  question,
  confirmLabel,
  cancelLabel = 'Cancel',
  ariaLabel,
  variant = 'secondary',
  busy = false,
  onConfirm,
}: ConfirmActionProps) {
  const [asking, setAsking] = useState(false);
  const [failed, setFailed] = useState<string | null>(null);
  if (!asking) {
    return (
      <>
        <Button
          variant={variant}
          aria-label={ariaLabel}
          disabled={busy}
          onClick={() => {
            setFailed(null);
            setAsking(true);
          }}
        >
          {label}
        </Button>
        {failed ? (
          <p role="alert" className="basis-full font-semibold text-error-text">
            {failed}
          </p>
        ) : null}
      </>
    );
  }
  return (
    <div role="group" aria-label={label} className="flex basis-full flex-wrap items-center gap-3 rounded-md border border-rule-strong p-3">
      <p className="basis-full">{question}</p>
      <Button
        busy={busy}
        onClick={async () => {
          try {
            await onConfirm();
          } catch (e) {
            // The server's reason stays on screen (e.g. why an excavation cannot be removed).
            setFailed(errorMessage(e));
          } finally {
            setAsking(false);
          }
        }}
      >
        {confirmLabel}
      </Button>
      <Button variant="quiet" onClick={() => setAsking(false)}>
        {cancelLabel}
      </Button>
    </div>
  );
}
