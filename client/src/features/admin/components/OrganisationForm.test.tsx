import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { fakeApi, renderAt } from '@client/test/render';
import { OrganisationForm } from './OrganisationForm';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const organisation = { id: 4, name: 'Invented Groundworks' };

describe('OrganisationForm', () => {
  it('renames, and shows a refusal under the organisation name, keeping what was typed', async () => {
    let taken = true;
    const calls = fakeApi({
      'PATCH /api/organisation': () =>
        taken
          ? {
              status: 409,
              body: {
                error: { code: 'conflict', message: 'Taken.', fields: { name: 'is already taken on this Brink' } },
              },
            }
          : { status: 200, body: { organisation: { id: 4, name: 'Invented Civils' } } },
    });
    renderAt(<OrganisationForm organisation={organisation} />);
    const box = screen.getByLabelText('Organisation name');
    expect((box as HTMLInputElement).value).toBe('Invented Groundworks');
    fireEvent.change(box, { target: { value: 'Invented Civils' } });
    fireEvent.click(screen.getByRole('button', { name: 'Rename' }));
    expect(await screen.findByText('Organisation name is already taken on this Brink.')).toBeTruthy();
    expect((screen.getByLabelText('Organisation name') as HTMLInputElement).value).toBe('Invented Civils');
    taken = false;
    fireEvent.click(screen.getByRole('button', { name: 'Rename' }));
    expect(await screen.findByText('The organisation is now called Invented Civils.')).toBeTruthy();
    await waitFor(() => expect(calls.filter((c) => c.key === 'PATCH /api/organisation')).toHaveLength(2));
    expect(calls.filter((c) => c.key === 'PATCH /api/organisation').at(-1)?.body).toEqual({ name: 'Invented Civils' });
  });

  it('refuses an empty name before sending, naming the field', async () => {
    const calls = fakeApi({});
    renderAt(<OrganisationForm organisation={organisation} />);
    fireEvent.change(screen.getByLabelText('Organisation name'), { target: { value: ' ' } });
    fireEvent.click(screen.getByRole('button', { name: 'Rename' }));
    expect(await screen.findByText(/required/)).toBeTruthy();
    expect(calls.filter((c) => c.key === 'PATCH /api/organisation')).toEqual([]);
  });
});
