import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import type { Site } from '@shared/schemas/sites';
import { fakeApi, renderAt } from '@client/test/render';
import { InviteForm } from './InviteForm';

const sites: Site[] = [
  {
    id: 3,
    name: 'Alder Marsh pumping station',
    latitude: 52.1,
    longitude: 0.2,
    timezone: 'Europe/London',
    minimumClearance: 0.6,
    defaultMethod: 'dispersion-45',
    units: 'metric',
    createdAt: '2026-01-05T08:00:00Z',
  },
];

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

function fill(label: string, value: string) {
  fireEvent.change(screen.getByLabelText(label), { target: { value } });
}

describe('InviteForm', () => {
  it('shows a server field reason under its field and keeps what was typed', async () => {
    const calls = fakeApi({
      'POST /api/invitations': {
        status: 400,
        body: {
          error: {
            code: 'invalid_body',
            message: 'The invitation was not sent.',
            fields: { email: 'already belongs to a person in Brink', tenant: 'is unknown' },
          },
        },
      },
    });
    renderAt(<InviteForm sites={sites} />);
    fill('E-mail', 'Pat.Digger@Example.test');
    fill('Name', 'Pat Digger');
    fill('Site', '3');
    fill('Role on that site', 'operator');
    fireEvent.click(screen.getByRole('button', { name: 'Send invitation' }));

    expect(await screen.findByText('E-mail already belongs to a person in Brink.')).toBeTruthy();
    // The summary says to correct the field marked below (its reason stands there, once); a reason for a
    // field the form does not show still reaches the person, in words, and the summary takes the focus.
    expect(screen.getByRole('alert').textContent).toBe('Correct the field marked below. Tenant is unknown.');
    expect(document.activeElement).toBe(screen.getByTestId('form-summary'));
    expect((screen.getByLabelText('E-mail') as HTMLInputElement).value).toBe('Pat.Digger@Example.test');
    expect((screen.getByLabelText('Name') as HTMLInputElement).value).toBe('Pat Digger');
    expect(screen.getByLabelText('E-mail').getAttribute('aria-invalid')).toBe('true');
    // The shared schema trimmed and lower-cased the address and turned the choices into a number and a role.
    const sent = calls.filter((c) => c.key === 'POST /api/invitations');
    expect(sent.map((c) => c.body)).toEqual([
      { email: 'pat.digger@example.test', name: 'Pat Digger', isAdmin: false, siteId: 3, role: 'operator' },
    ]);
  });

  it('refuses a site without a role before calling the server', async () => {
    const calls = fakeApi({});
    renderAt(<InviteForm sites={sites} />);
    fill('E-mail', 'sam@example.test');
    fill('Name', 'Sam');
    fill('Site', '3');
    fireEvent.click(screen.getByRole('button', { name: 'Send invitation' }));
    expect(await screen.findByText('Give both a site and a role, or neither.')).toBeTruthy();
    expect(calls.filter((c) => c.key === 'POST /api/invitations')).toHaveLength(0);
  });

  it('confirms a sent invitation and clears the form for the next one', async () => {
    fakeApi({ 'POST /api/invitations': { status: 201, body: { id: 12 } } });
    renderAt(<InviteForm sites={sites} />);
    fill('E-mail', 'lee@example.test');
    fill('Name', 'Lee');
    fireEvent.click(screen.getByRole('button', { name: 'Send invitation' }));
    expect(await screen.findByText(/Invitation sent to lee@example.test/)).toBeTruthy();
    await waitFor(() => expect((screen.getByLabelText('E-mail') as HTMLInputElement).value).toBe(''));
  });
});
