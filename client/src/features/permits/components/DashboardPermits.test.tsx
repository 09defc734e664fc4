import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, screen } from '@testing-library/react';
import { fakeApi, renderAt } from '@client/test/render';
import { DashboardPermits } from './DashboardPermits';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const permit = (id: number) => ({
  id,
  siteId: 3,
  siteName: 'Invented Wharf',
  number: `TR-${String(id).padStart(3, '0')}`,
  kind: 'load',
  status: 'live',
  statusLabel: 'Live',
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
});
const wait = { timeout: 5000 };

describe('DashboardPermits', () => {
  it('asks only for the permits it shows, with the count of all, and links to all of them', async () => {
    const calls = fakeApi({
      'GET /api/permits?siteId=3&view=live&sort=windowStart&order=asc&limit=5&total=true': {
        status: 200,
        body: { permits: [1, 2, 3, 4, 5].map(permit), next: 'more', total: 312 },
      },
    });
    renderAt(<DashboardPermits siteId={3} view="live" intro="Every live permit on this site." timeZone="Europe/London" />);
    expect(await screen.findByRole('link', { name: 'All 312' }, wait)).toBeTruthy();
    expect(screen.getAllByRole('listitem')).toHaveLength(5);
    expect(calls.map((c) => c.key)).toEqual(['GET /api/permits?siteId=3&view=live&sort=windowStart&order=asc&limit=5&total=true']);
  });

  it('says "Open the list" when every permit is shown', async () => {
    fakeApi({
      'GET /api/permits?siteId=3&view=review&sort=updated&order=asc&limit=20&total=true': {
        status: 200,
        body: { permits: [permit(7)], next: null, total: 1 },
      },
    });
    renderAt(<DashboardPermits siteId={3} view="review" intro="Requests sent to you." timeZone="Europe/London" />);
    expect(await screen.findByRole('link', { name: /TR-007/ }, wait)).toBeTruthy();
    expect(screen.getByRole('link', { name: 'Open the list' })).toBeTruthy();
    expect(screen.queryByRole('link', { name: /^All/ })).toBeNull();
  });
});
