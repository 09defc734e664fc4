import { Link } from 'react-router-dom';
import type { FieldPermit } from '@shared/schemas/field';
import { useFigures } from '@client/lib/units';
import { windowText } from '../lib/format';

/** One permit in my list: a large link to it, with what an operator needs to know at a glance. */
export function PermitCard({ permit, briefingWaiting }: { permit: FieldPermit; briefingWaiting: boolean }) {
  const figures = useFigures();
  const briefing = permit.myBriefedAt
    ? 'Briefing confirmed'
    : briefingWaiting
      ? 'Briefing recorded on this phone, waiting to send'
      : permit.briefingDue
        ? 'Briefing to confirm'
        : null;
  return (
    <Link
      to={`/field/permits/${permit.id}`}
      className="block rounded-md border-2 border-ink bg-sheet p-4 text-ink no-underline hover:bg-accent-wash hover:text-ink focus-visible:bg-accent-wash"
    >
      <span className="flex flex-wrap items-baseline justify-between gap-2">
        <span className="text-2xl font-bold">{permit.number}</span>
        <span className="rounded border-2 border-ink px-2 text-lg font-semibold">{permit.statusLabel}</span>
      </span>
      {permit.description ? <span className="mt-1 block">{permit.description}</span> : null}
      <span className="mt-1 block font-semibold">{windowText(permit.windowStart, permit.windowEnd)}</span>
      <span className="block">
        {permit.excavations.map((e) => e.reference).join(', ') || 'No excavation named'}
        {permit.standoff !== null ? ` · standoff ${figures.length(permit.standoff, { rounding: 'up' })}` : ''}
      </span>
      {briefing ? <span className="mt-1 block font-bold underline underline-offset-4">{briefing}</span> : null}
    </Link>
  );
}
