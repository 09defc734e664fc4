import type { ReactElement } from 'react';
import { QueryClientProvider } from '@tanstack/react-query';
import { render } from '@testing-library/react';
import { createMemoryRouter, RouterProvider } from 'react-router-dom';
import { vi } from 'vitest';
import { createQueryClient } from '@client/lib/queryClient';
import { configureFormMessages } from '@client/lib/forms';
import { UnitsScope } from '@client/lib/unitsScope';

configureFormMessages();

interface FakeAnswer {
  status: number;
  body?: unknown;
}

/**
 * Replaces fetch with a table of answers keyed by "METHOD /path". Unknown calls answer 404.
 * Returns the list of calls made, with their parsed JSON bodies.
 */
export function fakeApi(answers: Record<string, FakeAnswer | (() => FakeAnswer)>) {
  const calls: { key: string; body: unknown }[] = [];
  vi.stubGlobal(
    'fetch',
    vi.fn(async (url: string, init: RequestInit = {}) => {
      const key = `${init.method ?? 'GET'} ${url}`;
      calls.push({ key, body: typeof init.body === 'string' ? JSON.parse(init.body) : undefined });
      const entry = answers[key];
      const answer =
        typeof entry === 'function' ? entry() : (entry ?? { status: 404, body: { error: { code: 'not_found', message: 'Not found' } } });
      return new Response(answer.body === undefined ? null : JSON.stringify(answer.body), {
        status: answer.status,
        headers: { 'Content-Type': 'application/json' },
      });
    }),
  );
  return calls;
}

/**
 * A signed-in person who reads figures in `units` (null: their sites' defaults) and is a member of
 * `sites` (none unless given); the rest of the API answers 404.
 */
export function fakePersonIn(units: 'us' | 'metric' | null, sites: unknown[] = []) {
  return fakeApi({
    'GET /api/auth/me': {
      status: 200,
      body: {
        user: {
          id: 1,
          email: 'a@b.test',
          name: 'A',
          isAdmin: false,
          organisation: { id: 1, name: 'Invented Groundworks' },
          units,
          memberships: [],
        },
      },
    },
    'GET /api/sites': { status: 200, body: { sites } },
  });
}

/** Renders one element at a path inside the app's query client, a memory router and a UnitsScope. */
export function renderAt(element: ReactElement, path = '/') {
  const router = createMemoryRouter([{ path: '*', element: <UnitsScope>{element}</UnitsScope> }], { initialEntries: [path] });
  const queryClient = createQueryClient();
  return {
    queryClient,
    ...render(
      <QueryClientProvider client={queryClient}>
        <RouterProvider router={router} />
      </QueryClientProvider>,
    ),
  };
}
