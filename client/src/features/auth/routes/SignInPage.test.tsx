import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { fakeApi, renderAt } from '@client/test/render';
import { SignInPage } from './SignInPage';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

function signIn(email: string, password: string) {
  fireEvent.change(screen.getByLabelText('E-mail'), { target: { value: email } });
  fireEvent.change(screen.getByLabelText('Password'), { target: { value: password } });
  fireEvent.click(screen.getByRole('button', { name: 'Sign in' }));
}

describe('SignInPage', () => {
  it('says why a sign-in failed and keeps the e-mail', async () => {
    fakeApi({
      'GET /api/auth/me': { status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in first.' } } },
      'POST /api/auth/sign-in': {
        status: 401,
        body: { error: { code: 'bad_credentials', message: 'That e-mail and password do not match.' } },
      },
    });
    renderAt(<SignInPage />, '/sign-in');
    signIn('coordinator@demo.brink.test', 'wrong-password');
    expect((await screen.findByRole('alert')).textContent).toMatch(/That e-mail and password do not match/);
    expect((screen.getByLabelText('E-mail') as HTMLInputElement).value).toBe('coordinator@demo.brink.test');
  });

  it('lists the demo sign-ins only when the server runs the demo', async () => {
    fakeApi({ 'GET /api/health': { status: 200, body: { ok: true, demo: true } } });
    renderAt(<SignInPage />, '/sign-in');
    expect(await screen.findByRole('heading', { name: 'Demo sign-ins' })).toBeTruthy();
    fireEvent.click(screen.getByRole('button', { name: 'Fill in the Plant operator demo sign-in' }));
    expect((screen.getByLabelText('E-mail') as HTMLInputElement).value).toBe('operator@demo.brink.test');
  });

  it('shows no demo list on a real server', async () => {
    fakeApi({ 'GET /api/health': { status: 200, body: { ok: true, demo: false } } });
    const { queryClient } = renderAt(<SignInPage />, '/sign-in');
    await screen.findByRole('button', { name: 'Sign in' });
    // The page has its answer (demo: false) once the health query succeeded; then nothing more comes.
    await waitFor(() => expect(queryClient.getQueryState(['health'])?.status).toBe('success'));
    expect(screen.queryByRole('heading', { name: 'Demo sign-ins' })).toBeNull();
  });
});
