import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, screen } from '@testing-library/react';
import type { PermitSummary } from '@shared/schemas/permits';
import { renderAt } from '@client/test/render';
import { permitSummary } from '@client/test/permits';
import { DashboardPermits } from './DashboardPermits';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const permit = (id: number) => permitSummary(id);
const wait = { timeout: 5000 };

type PermitPage = { permits: PermitSummary[]; next: string | null; total?: number };
const part = <T,>(data: T | undefined, error: Error | null = null) => ({ data, error, retry: vi.fn() });
const renderPanel = (view: 'live' | 'review', list: ReturnType<typeof part<PermitPage>>) =>
  renderAt(<DashboardPermits siteId={3} view={view} intro="Permits of the site." timeZone="Europe/London" list={list} />);

describe('DashboardPermits', () => {
  it('shows the permits the dashboard was given, with a link to all of them when there are more', async () => {
    renderPanel('live', part({ permits: [1, 2, 3, 4, 5].map(permit), next: 'more', total: 312 }));
    expect(await screen.findByRole('link', { name: 'All 312' }, wait)).toBeTruthy();
    expect(screen.getAllByRole('listitem')).toHaveLength(5);
  });

  it('says "Open the list" when every permit is shown', async () => {
    renderPanel('review', part({ permits: [permit(7)], next: null, total: 1 }));
    expect(await screen.findByRole('link', { name: /TR-007/ }, wait)).toBeTruthy();
    expect(screen.getByRole('link', { name: 'Open the list' })).toBeTruthy();
    expect(screen.queryByRole('link', { name: /^All/ })).toBeNull();
  });

  it('says the list could not be loaded, and asks again when told to', async () => {
    const list = part<PermitPage>(undefined, new Error('The connection was lost.'));
    renderPanel('live', list);
    expect(await screen.findByRole('alert', undefined, wait)).toBeTruthy();
    expect(screen.queryByRole('listitem')).toBeNull();
    screen.getByRole('button', { name: 'Try again' }).click();
    expect(list.retry).toHaveBeenCalledOnce();
  });
});
