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
/** Typing is sent once it pauses (300 ms): room for that on a busy machine. */
const wait = { timeout: 5000 };

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
    expect(await screen.findByRole('heading', { name: 'Ben Bank' }, wait)).toBeTruthy();
    expect(screen.getByRole('heading', { name: 'Everyone in Invented Groundworks' })).toBeTruthy();
    expect(screen.queryByRole('heading', { name: 'Cy Crane' })).toBeNull();
    fireEvent.click(screen.getByRole('button', { name: 'Show more people' }));
    expect(await screen.findByRole('heading', { name: 'Cy Crane' }, wait)).toBeTruthy();
    expect(screen.getAllByRole('heading', { level: 3 }).map((h) => h.textContent)).toEqual(['Ada Admin (you)', 'Ben Bank', 'Cy Crane']);
    expect(screen.queryByRole('button', { name: 'Show more people' })).toBeNull();
    expect(calls.map((c) => c.key).filter((k) => k.startsWith('GET /api/users'))).toEqual([
      'GET /api/users',
      'GET /api/users?cursor=page-2',
    ]);
  });

  const me = {
    status: 200,
    body: { user: { ...person(1, 'Ada Admin'), organisation: { id: 4, name: 'Invented Groundworks' }, units: null } },
  };

  it('searches by what is typed, pages within the search, and says when nobody matches', async () => {
    const calls = fakeApi({
      'GET /api/auth/me': me,
      'GET /api/sites': { status: 200, body: { sites: [] } },
      'GET /api/users': { status: 200, body: { users: [person(1, 'Ada Admin'), person(2, 'Ben Bank')], next: 'page-2', counts } },
      'GET /api/users?q=crane': { status: 200, body: { users: [person(3, 'Cy Crane')], next: 'crane-2', counts } },
      'GET /api/users?q=crane&cursor=crane-2': { status: 200, body: { users: [person(4, 'Di Crane')], next: null, counts } },
      'GET /api/users?q=zz': { status: 200, body: { users: [], next: null, counts } },
    });
    renderAt(<PeoplePage />);
    expect(await screen.findByRole('heading', { name: 'Ben Bank' }, wait)).toBeTruthy();
    fireEvent.change(screen.getByLabelText('Search people'), { target: { value: ' crane ' } });
    expect(await screen.findByRole('heading', { name: 'Cy Crane' }, wait)).toBeTruthy();
    expect(screen.queryByRole('heading', { name: 'Ben Bank' })).toBeNull();
    fireEvent.click(screen.getByRole('button', { name: 'Show more people' }));
    expect(await screen.findByRole('heading', { name: 'Di Crane' }, wait)).toBeTruthy();
    fireEvent.change(screen.getByLabelText('Search people'), { target: { value: 'zz' } });
    expect(await screen.findByText('Nobody’s name or e-mail address holds “zz”.', {}, wait)).toBeTruthy();
    expect(calls.map((c) => c.key).filter((k) => k.startsWith('GET /api/users'))).toEqual([
      'GET /api/users',
      'GET /api/users?q=crane',
      'GET /api/users?q=crane&cursor=crane-2',
      'GET /api/users?q=zz',
    ]);
  });

  it('tells a search the server refuses beside the box, naming it', async () => {
    const long = 'a'.repeat(101);
    fakeApi({
      'GET /api/auth/me': me,
      'GET /api/sites': { status: 200, body: { sites: [] } },
      [`GET /api/users?q=${long}`]: {
        status: 400,
        body: { error: { code: 'invalid', message: 'Some details are not right.', fields: { q: 'must be at most 100 characters' } } },
      },
    });
    renderAt(<PeoplePage />, `/?q=${long}`);
    expect(await screen.findByText('Search people must be at most 100 characters.', {}, wait)).toBeTruthy();
    expect(screen.getByLabelText('Search people').getAttribute('aria-invalid')).toBe('true');
  });
});
