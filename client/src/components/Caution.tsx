import { CAUTION } from '@shared/caution';

/** The standing caution on Brink's figures, in the footer of every page and beside every check. */
export function Caution({ className = '' }: { className?: string }) {
  return (
    <p className={`text-sm text-ink-soft ${className}`}>
      <strong className="font-semibold text-ink">Caution: </strong>
      {CAUTION}
    </p>
  );
}
