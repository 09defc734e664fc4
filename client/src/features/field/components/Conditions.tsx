import { deviceTimeZone, formatSiteTime } from '@shared/time/shifts';
import { exclusionReason } from '@shared/permits/exclusion';
import type { FieldPermit } from '@shared/schemas/field';
import { useFigures } from '@client/lib/units';

/** The standoff and the conditions in large type, with the caution beside the figures. */
export function Conditions({ permit }: { permit: FieldPermit }) {
  const figures = useFigures();
  const zoned = permit.excavations.filter((e) => e.standoff !== null);
  return (
    <section aria-labelledby="conditions-title" className="flex flex-col gap-3 rounded-md border-2 border-ink bg-sheet p-4">
      <h2 id="conditions-title" className="text-2xl font-bold">
        Standoff and conditions
      </h2>
      {zoned.length ? (
        <ul className="flex flex-col gap-2 text-2xl font-semibold leading-snug">
          {zoned.map((e) => (
            <li key={e.id}>
              Keep every part of the load at least <span className="font-bold">{figures.length(e.standoff!, { rounding: 'up' })}</span> from
              the edge of {e.reference} ({e.name}).
              {e.standoffBasis ? (
                <span className="block text-lg font-normal" data-testid="standoff-why">
                  Why {figures.length(e.standoff!, { rounding: 'up' })}: {figures.words(exclusionReason(e.standoffBasis))}.
                </span>
              ) : null}
            </li>
          ))}
        </ul>
      ) : (
        <p className="text-xl font-semibold">
          No standoff is set: this permit is not approved yet, so no load may go beside the excavation under it.
        </p>
      )}
      {permit.minimumClearance > 0 && zoned.length ? (
        <p>
          No standoff is less than the site’s least clearance from any edge, {figures.length(permit.minimumClearance, { rounding: 'up' })}.
        </p>
      ) : null}
      {permit.conditions.length ? (
        <ol className="flex list-decimal flex-col gap-2 pl-7 text-xl leading-snug">
          {permit.conditions.map((c, i) => (
            <li key={i}>{c}</li>
          ))}
        </ol>
      ) : zoned.length ? (
        <p className="text-xl">No further conditions.</p>
      ) : null}
      {permit.decidedBy ? (
        <p className="text-lg">
          Decided by {permit.decidedBy.name}, {formatSiteTime(permit.decidedBy.at, deviceTimeZone())}.
        </p>
      ) : null}
      <p className="text-lg font-semibold" data-testid="caution">
        Caution: {permit.caution}
      </p>
    </section>
  );
}
