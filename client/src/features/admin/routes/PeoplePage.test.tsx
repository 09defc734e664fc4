import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, screen } from '@testing-library/react';
import { fakeApi, renderAt } from '@client/test/render';
import { PeoplePage } from './PeoplePage';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const person = (id: number, name: string) => ({ id, email: `p${id}@example.test`, name, isAdmin: id === 1, active: true, memberships: [] });
const counts = { active: 3, total: 3 };

describe('PeoplePage', () => {
  it('shows the first page of people, then the next on "Show more people", until the last', async () => {
    const calls = fakeApi({
      'GET /api/auth/me': {
        status: 200,
        body: {
          user: { ...person(1, 'Ada Admin'), organisation: { id: 4, name: 'Invented Groundworks' }, units: null },
        },
      },
      'GET /api/sites': { status: 200, body: { sites: [] } },
      'GET /api/users': { status: 200, body: { users: [person(1, 'Ada Admin'), person(2, 'Ben Bank')], next: 'page-2', counts } },
      'GET /api/users?cursor=page-2': { status: 200, body: { users: [person(3, 'Cy Crane')], next: null, counts } },
    });
    renderAt(<PeoplePage />);
    expect(await screen.findByRole('heading', { name: 'Ben Bank' })).toBeTruthy();
    expect(screen.getByRole('heading', { name: 'Everyone in Invented Groundworks' })).toBeTruthy();
    expect(screen.queryByRole('heading', { name: 'Cy Crane' })).toBeNull();
    fireEvent.click(screen.getByRole('button', { name: 'Show more people' }));
    expect(await screen.findByRole('heading', { name: 'Cy Crane' })).toBeTruthy();
    expect(screen.getAllByRole('heading', { level: 3 }).map((h) => h.textContent)).toEqual(['Ada Admin (you)', 'Ben Bank', 'Cy Crane']);
    expect(screen.queryByRole('button', { name: 'Show more people' })).toBeNull();
    expect(calls.map((c) => c.key).filter((k) => k.startsWith('GET /api/users'))).toEqual([
      'GET /api/users',
      'GET /api/users?cursor=page-2',
    ]);
  });
});
