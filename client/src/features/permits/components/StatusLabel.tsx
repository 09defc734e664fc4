import { statusLabels, type PermitStatus } from '@shared/schemas/permits';

/**
 * A permit's status in words. Only the two statuses that say whether work may go on carry a safety
 * colour beside the words (ISO 3864): Live green (work may go on), Suspended red (stop).
 */
const marks: Partial<Record<PermitStatus, string>> = { live: '#00804a', suspended: '#c1121f' };

export function StatusLabel({ status }: { status: PermitStatus }) {
  const mark = marks[status];
  return (
    <span className="inline-flex items-center gap-2 font-semibold" data-status={status}>
      {mark ? <span aria-hidden className="inline-block size-3 rounded-full" style={{ background: mark }} /> : null}
      {statusLabels[status]}
    </span>
  );
}
