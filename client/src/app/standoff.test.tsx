import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, screen } from '@testing-library/react';
import type { ReactNode } from 'react';
import { MemoryRouter } from 'react-router-dom';
import { describe, expect, it } from 'vitest';
import { exclusionDistance } from '@shared/permits/exclusion';
import type { FieldPermit } from '@shared/schemas/field';
import { Conditions } from '@client/features/field/components/Conditions';
import { ExclusionsOnTheGround } from '@client/features/permits/components/ExclusionsOnTheGround';
import { UnitsScope } from '@client/lib/unitsScope';

// The operator's phone and the permit page on the desktop show one standoff for a permit approved
// "as placed" (no standoff set): the check's 1.48 m for TR-9, with the same reason, never "at
// least 1.48 m" on one and nothing on the other. (Figures invented; the rule is shared/permits/exclusion.ts.)
const rev = {
  excavationIds: [9],
  decision: { action: 'approve' as const, standoff: null },
  check: { computedStandoff: 1.48, excavations: [{ excavationId: 9, standoff: 1.48 }] },
};
const minimumClearance = 0.5;

// Both screens read the person's units through the session and the current site: nobody is signed in
// here and no site is open, so metric.
function withQueries({ children }: { children: ReactNode }) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false, enabled: false } } });
  return (
    <QueryClientProvider client={client}>
      <MemoryRouter>
        <UnitsScope>{children}</UnitsScope>
      </MemoryRouter>
    </QueryClientProvider>
  );
}

describe('the standoff on the phone and on the desktop', () => {
  it('is the same figure with the same reason for a permit approved as placed', () => {
    const desktop = render(
      <ExclusionsOnTheGround rev={rev} excavations={[{ id: 9, reference: 'TR-9', depth: 2 }]} minimumClearance={minimumClearance} />,
      { wrapper: withQueries },
    );
    const onDesktop = screen.getByTestId('exclusions-on-the-ground').textContent ?? '';
    desktop.unmount();

    // What the server sends the phone, from the same function.
    const exclusion = exclusionDistance(rev, 9, minimumClearance, 2)!;
    const permit = {
      excavations: [{ id: 9, reference: 'TR-9', name: 'Duct trench', standoff: exclusion.distance, standoffBasis: exclusion.basis }],
      minimumClearance,
      conditions: [],
      decidedBy: null,
      caution: 'aids a competent temporary works designer',
    } as unknown as FieldPermit;
    render(<Conditions permit={permit} />, { wrapper: withQueries });
    const onPhone = screen.getByTestId('standoff-why').textContent ?? '';

    expect(onPhone).toBe(
      'Why 1.48 m: no standoff was set (approved as placed), so this is the standoff the check computed for this excavation.',
    );
    expect(onDesktop).toContain('at least 1.48 m from the edge of TR-9');
    expect(onDesktop).toContain(onPhone);
    expect(screen.getByText(/at least/).textContent).toContain('1.48 m');
  });
});
