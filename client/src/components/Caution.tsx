/**
 * The standing caution on Brink's figures. Shown in the footer of every page and beside every check.
 */
export const cautionText =
  'The figures in Brink aid a competent temporary works designer or coordinator; they do not replace ' +
  "the support's design. Local regulations and licensed practice prevail.";

export function Caution({ className = '' }: { className?: string }) {
  return (
    <p className={`text-sm text-ink-soft ${className}`}>
      <strong className="font-semibold text-ink">Caution: </strong>
      {cautionText}
    </p>
  );
}
