import type { PermitSummary } from '@shared/schemas/permits';

/** A permit of an invented site as the permit list summarises it, for tests of the panels that show one. */
export function permitSummary(id: number, status: PermitSummary['status'] = 'live'): PermitSummary {
  return {
    id,
    siteId: 3,
    siteName: 'Invented Wharf',
    number: `TR-${String(id).padStart(3, '0')}`,
    kind: 'load',
    status,
    statusLabel: status,
    version: 1,
    revision: 1,
    description: `Crane pad ${id}`,
    windowStart: '2026-12-03T07:00:00.000Z',
    windowEnd: '2026-12-03T17:00:00.000Z',
    excavationIds: [1],
    requestedBy: { id: 2, name: 'Sam Supervisor' },
    utilisation: 0.5,
    passes: true,
    updatedAt: '2026-12-03T06:00:00.000Z',
  };
}
