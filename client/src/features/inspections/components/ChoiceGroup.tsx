import { useId, type ReactNode } from 'react';
import type { UseFormRegisterReturn } from 'react-hook-form';
import { namedSentence } from './named';

interface Choice {
  value: string;
  label: string;
  /** Classes for the chosen state (safety colours for verdicts only). */
  chosen?: string;
}

const defaultChosen = 'peer-checked:border-accent peer-checked:bg-accent-wash peer-checked:text-accent-strong';

/**
 * A set of radio buttons drawn as large, thumb-sized choices (at least 48 px tall), in a fieldset
 * whose legend names the question. The error, when there is one, is read with the group.
 */
export function ChoiceGroup({
  legend,
  hint,
  choices,
  error,
  registration,
  columns = 3,
  children,
}: {
  legend: string;
  hint?: ReactNode;
  choices: readonly Choice[];
  error?: string;
  registration: UseFormRegisterReturn;
  columns?: 1 | 2 | 3;
  children?: ReactNode;
}) {
  const id = useId();
  const cols = columns === 3 ? 'grid-cols-3' : columns === 2 ? 'grid-cols-2' : 'grid-cols-1';
  return (
    <fieldset className="flex flex-col gap-2" aria-describedby={error ? `${id}-error` : hint ? `${id}-hint` : undefined}>
      <legend className="mb-1 text-lg font-semibold">{legend}</legend>
      {hint ? (
        <p id={`${id}-hint`} className="text-ink-soft">
          {hint}
        </p>
      ) : null}
      <div className={`grid gap-2 ${cols}`}>
        {choices.map((c) => (
          <label key={c.value} className="relative">
            <input type="radio" value={c.value} className="peer sr-only" aria-invalid={error ? true : undefined} {...registration} />
            <span
              className={`flex min-h-12 cursor-pointer items-center justify-center rounded-md border-2 border-rule-strong bg-sheet px-2 py-2 text-center font-semibold peer-focus-visible:outline peer-focus-visible:outline-3 peer-focus-visible:outline-accent ${c.chosen ?? defaultChosen}`}
            >
              {c.label}
            </span>
          </label>
        ))}
      </div>
      {error ? (
        <p id={`${id}-error`} className="text-sm font-semibold text-error-text">
          {namedSentence(legend, error)}
        </p>
      ) : null}
      {children}
    </fieldset>
  );
}
