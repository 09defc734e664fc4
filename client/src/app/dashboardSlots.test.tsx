import { afterEach, describe, expect, it, vi } from 'vitest';
import { QueryClientProvider } from '@tanstack/react-query';
import { cleanup, render, screen } from '@testing-library/react';
import { createMemoryRouter, RouterProvider } from 'react-router-dom';
import { createQueryClient } from '@client/lib/queryClient';
import { fakeApi } from '@client/test/render';
import { permitSummary } from '@client/test/permits';
import { DashboardSlotsContext } from '@client/features/dashboard/slots';
import { DashboardPage } from '@client/features/dashboard/routes/DashboardPage';
import { dashboardSlots } from './dashboardSlots';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

// An invented site and its people.
const site = {
  id: 3,
  name: 'Invented Wharf',
  latitude: 51.5,
  longitude: -0.1,
  timezone: 'Europe/London',
  minimumClearance: 0.6,
  defaultMethod: 'dispersion-45',
  units: 'metric',
  createdAt: '2026-11-01T08:00:00.000Z',
};
const me = (role: 'coordinator' | 'operator', canInspect = false) => ({
  user: {
    id: 9,
    email: 'pat@invented.test',
    name: 'Pat Invented',
    isAdmin: false,
    organisation: { id: 1, name: 'Invented Groundworks' },
    units: null,
    memberships: [{ siteId: 3, siteName: site.name, role, canInspect }],
  },
});
const shift = {
  name: 'Day shift',
  start: '2026-12-03T07:00:00.000Z',
  overdueFrom: '2026-12-03T09:00:00.000Z',
  end: '2026-12-03T19:00:00.000Z',
};

function renderDashboard({ retry = true } = {}) {
  const router = createMemoryRouter([{ path: '/sites/:siteId', element: <DashboardPage /> }], { initialEntries: ['/sites/3'] });
  const client = createQueryClient();
  // The app asks twice more after a 5xx on its own; a test of the panels' own "Try again" goes without.
  if (!retry) client.setDefaultOptions({ queries: { ...client.getDefaultOptions().queries, retry: false } });
  render(
    <QueryClientProvider client={client}>
      <DashboardSlotsContext.Provider value={dashboardSlots}>
        <RouterProvider router={router} />
      </DashboardSlotsContext.Provider>
    </QueryClientProvider>,
  );
}
const wait = { timeout: 5000 };

describe('the site dashboard', () => {
  it("asks for every panel in one request and shows each panel's part", async () => {
    const calls = fakeApi({
      'GET /api/auth/me': { status: 200, body: me('coordinator') },
      'GET /api/sites': { status: 200, body: { sites: [site] } },
      'GET /api/sites/3/dashboard': {
        status: 200,
        body: {
          review: { permits: [permitSummary(7, 'submitted')], next: null, total: 1 },
          live: { permits: [1, 2, 3, 4, 5].map((id) => permitSummary(id, 'live')), next: 'more', total: 41 },
          inspections: {
            shift,
            excavations: [{ excavationId: 12, reference: 'TR-12', name: 'Outfall trench', state: 'overdue', lastInspection: null }],
            open: 3,
          },
        },
      },
    });
    renderDashboard();
    expect(await screen.findByRole('link', { name: /TR-007: Crane pad 7/ }, wait)).toBeTruthy();
    expect(await screen.findByRole('link', { name: 'All 41' }, wait)).toBeTruthy();
    expect(await screen.findByText('Outfall trench', undefined, wait)).toBeTruthy();
    expect(calls.map((c) => c.key).filter((k) => !['GET /api/auth/me', 'GET /api/sites'].includes(k))).toEqual([
      'GET /api/sites/3/dashboard',
    ]);
  });

  it('says every open excavation is safe when none is waiting, and names none', async () => {
    fakeApi({
      'GET /api/auth/me': { status: 200, body: me('operator', true) },
      'GET /api/sites': { status: 200, body: { sites: [site] } },
      'GET /api/sites/3/dashboard': { status: 200, body: { inspections: { shift, excavations: [], open: 4 } } },
    });
    renderDashboard();
    expect(await screen.findByText('Every open excavation has a safe inspection this shift.', undefined, wait)).toBeTruthy();
    expect(screen.queryByRole('link', { name: /^Inspect/ })).toBeNull();
  });

  it('an operator without the inspection duty has no panel that needs it, and it is not asked for', async () => {
    const calls = fakeApi({
      'GET /api/auth/me': { status: 200, body: me('operator') },
      'GET /api/sites': { status: 200, body: { sites: [site] } },
    });
    renderDashboard();
    expect(await screen.findByRole('link', { name: 'Open my permits' }, wait)).toBeTruthy();
    expect(screen.queryByText('Excavations due for inspection')).toBeNull();
    expect(calls.map((c) => c.key)).not.toContain('GET /api/sites/3/dashboard');
  });

  it('a failed answer shows in each panel with a way to ask again, which asks once for all of them', async () => {
    let answers = 0;
    const calls = fakeApi({
      'GET /api/auth/me': { status: 200, body: me('operator', true) },
      'GET /api/sites': { status: 200, body: { sites: [site] } },
      'GET /api/sites/3/dashboard': () =>
        ++answers === 1
          ? { status: 503, body: { error: { code: 'database_unavailable', message: 'Brink cannot reach its database just now.' } } }
          : { status: 200, body: { inspections: { shift, excavations: [], open: 0 } } },
    });
    renderDashboard({ retry: false });
    (await screen.findByRole('button', { name: 'Try again' }, wait)).click();
    expect(await screen.findByText('No excavation is open.', undefined, wait)).toBeTruthy();
    expect(calls.filter((c) => c.key === 'GET /api/sites/3/dashboard')).toHaveLength(2);
  });
});
