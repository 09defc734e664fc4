import { exclusionDistance, exclusionSentence } from '@shared/permits/exclusion';
import { useFigures } from '@client/lib/units';

interface NamedExcavation {
  id: number;
  reference: string;
  depth: number;
}

/**
 * The exclusion distance of each named excavation as the operator's phone shows it, with why it is
 * that figure: the one computation (shared/permits/exclusion.ts) serves both, so an approval "as
 * placed" shows on the desktop the same figure the phone draws, never a different one (in the
 * reader's units, rounded up like the phone's).
 */
export function ExclusionsOnTheGround({
  rev,
  excavations,
  minimumClearance,
}: {
  /** The revision shown: its named excavations, decision and check. */
  rev: Parameters<typeof exclusionDistance>[0] & { excavationIds: readonly number[] };
  excavations: readonly NamedExcavation[];
  minimumClearance: number;
}) {
  const figures = useFigures();
  const rows = rev.excavationIds.flatMap((id) => {
    const x = excavations.find((e) => e.id === id);
    const exclusion = x ? exclusionDistance(rev, id, minimumClearance, x.depth) : null;
    return x && exclusion ? [{ x, exclusion }] : [];
  });
  if (!rows.length) return null;
  return (
    <div data-testid="exclusions-on-the-ground">
      <p className="font-semibold">On the ground (the operator’s phone shows the same):</p>
      <ul className="list-disc pl-6">
        {rows.map(({ x, exclusion }) => (
          <li key={x.id}>{exclusionSentence(x.reference, figures.length(exclusion.distance, { rounding: 'up' }), exclusion.basis)}</li>
        ))}
      </ul>
    </div>
  );
}
