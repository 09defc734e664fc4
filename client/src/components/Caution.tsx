import { useFigures } from '@client/lib/units';

/** The standing caution on Brink's figures, in the footer of every page and beside every check (in US units it names OSHA's rule). */
export function Caution({ className = '' }: { className?: string }) {
  const { caution } = useFigures();
  return (
    <p className={`text-sm text-ink-soft ${className}`}>
      <strong className="font-semibold text-ink">Caution: </strong>
      {caution}
    </p>
  );
}
