import { afterEach, describe, expect, it, vi } from 'vitest';
import { api, ApiError, sendForm } from './api';

function answer(status: number, body: string | null, contentType = 'application/json') {
  vi.stubGlobal(
    'fetch',
    vi.fn(async () => new Response(body, { status, headers: { 'Content-Type': contentType } })),
  );
}

afterEach(() => vi.unstubAllGlobals());

describe('api wrapper', () => {
  it('reads code, message and field reasons from an error body', async () => {
    answer(
      400,
      JSON.stringify({
        error: { code: 'invalid_body', message: 'Check the fields.', fields: { email: 'must be an e-mail address', age: 3 } },
      }),
    );
    const error = await api.post('/api/invitations', { email: 'x' }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect(error).toMatchObject({ status: 400, code: 'invalid_body', message: 'Check the fields.' });
    // Reasons that are not text are dropped rather than shown as "3".
    expect((error as ApiError).fields).toEqual({ email: 'must be an e-mail address' });
  });

  it('gives a plain message when the body is not the API error shape', async () => {
    answer(502, '<html>Bad gateway</html>', 'text/html');
    const error = (await api.get('/api/sites').catch((e: unknown) => e)) as ApiError;
    expect(error.status).toBe(502);
    expect(error.code).toBe('http_502');
    expect(error.message).toMatch(/could not do that/);
    expect(error.fields).toEqual({});
  });

  it('reports a lost connection as status 0', async () => {
    vi.stubGlobal(
      'fetch',
      vi.fn(async () => Promise.reject(new TypeError('Failed to fetch'))),
    );
    const error = (await api.get('/api/auth/me').catch((e: unknown) => e)) as ApiError;
    expect(error).toMatchObject({ status: 0, code: 'network' });
    expect(error.message).toMatch(/could not reach the server/);
  });

  it('gives the 429 sentence when rate-limited without a body', async () => {
    answer(429, null);
    const error = (await api.post('/api/auth/sign-in', {}).catch((e: unknown) => e)) as ApiError;
    expect(error.message).toMatch(/Too many attempts/);
  });

  it('sends JSON with the same-origin cookie and reads no body from 204', async () => {
    const fetchMock = vi.fn(async () => new Response(null, { status: 204 }));
    vi.stubGlobal('fetch', fetchMock);
    await expect(api.put('/api/users/4/memberships/2', { role: 'operator', canInspect: false })).resolves.toBeUndefined();
    expect(fetchMock).toHaveBeenCalledWith('/api/users/4/memberships/2', {
      method: 'PUT',
      headers: { Accept: 'application/json', 'Content-Type': 'application/json' },
      body: JSON.stringify({ role: 'operator', canInspect: false }),
      credentials: 'same-origin',
      signal: undefined,
    });
  });

  it('sends a multipart form as it is (the browser writes its boundary) with extra headers, and reads the answer', async () => {
    const fetchMock = vi.fn(async () => new Response(JSON.stringify({ plan: null }), { status: 200 }));
    vi.stubGlobal('fetch', fetchMock);
    const form = new FormData();
    form.append('opacity', '0.5');
    await expect(sendForm('/api/sites/1/plan', form, { method: 'PUT', headers: { 'Idempotency-Key': 'k1' } })).resolves.toEqual({
      plan: null,
    });
    expect(fetchMock).toHaveBeenCalledWith('/api/sites/1/plan', {
      method: 'PUT',
      headers: { Accept: 'application/json', 'Idempotency-Key': 'k1' },
      body: form,
      credentials: 'same-origin',
      signal: undefined,
    });
  });

  it('keeps the whole body of a refused upload on the error (an import refusal carries its report)', async () => {
    const refusal = {
      error: { code: 'invalid_body', message: 'One feature was refused.', fields: { 'features[0].depth': 'is required' } },
      report: { refused: [] },
    };
    answer(400, JSON.stringify(refusal));
    const error = (await sendForm('/api/sites/1/excavations/import', new FormData()).catch((e: unknown) => e)) as ApiError;
    expect(error).toMatchObject({ status: 400, fields: { 'features[0].depth': 'is required' } });
    expect(error.body).toEqual(refusal);
  });
});
