import { randomUUID } from 'node:crypto';
import { expect, type APIRequest, type APIRequestContext, type Page } from '@playwright/test';
import { DEMO_PASSWORD } from '../shared/demo';

/** Every demo person's password (README). */
export const demoPassword = DEMO_PASSWORD;

/** Signs in through the page, waits for the site dashboard and answers its site's id. */
export async function signIn(page: Page, email: string): Promise<number> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL(/\/sites\/\d+/);
  return Number(/\/sites\/(\d+)/.exec(page.url())![1]);
}

/**
 * An API client signed in as a demo person, saying Brink's origin (the API takes changes only from
 * it). With `storageState` (a page's session) it acts as that page's person instead of signing in.
 */
export async function apiAs(
  requests: APIRequest,
  baseURL: string,
  email: string | null,
  storageState?: Awaited<ReturnType<APIRequestContext['storageState']>>,
): Promise<APIRequestContext> {
  const ctx = await requests.newContext({ baseURL, extraHTTPHeaders: { Origin: new URL(baseURL).origin }, storageState });
  if (email) await ok(await ctx.post('/api/auth/sign-in', { data: { email, password: demoPassword } }), `sign-in as ${email}`);
  return ctx;
}

export async function ok<T>(res: Awaited<ReturnType<APIRequestContext['get']>>, what: string): Promise<T> {
  expect(res.ok(), `${what}: ${res.status()} ${await res.text()}`).toBe(true);
  return (await res.json()) as T;
}

/** Metres east and north of a point → [longitude, latitude] (small distances on a sphere). */
export function offset(origin: { latitude: number; longitude: number }, east: number, north: number): [number, number] {
  const lat = origin.latitude + north / 111_320;
  const lon = origin.longitude + east / (111_320 * Math.cos((origin.latitude * Math.PI) / 180));
  return [Number(lon.toFixed(7)), Number(lat.toFixed(7))];
}

/**
 * An open trench `north` metres north of the site origin (tests that run on the same database use
 * different ones), and a permit for a pallet stack beside it: live at
 * once, or approved and waiting for the briefing of the operators it names.
 */
export async function trenchWithLivePermit(
  supervisor: APIRequestContext,
  coordinator: APIRequestContext,
  siteId: number,
  operatorIds: number[] = [],
  north = 50,
) {
  const { site } = await ok<{ site: { latitude: number; longitude: number } }>(await supervisor.get(`/api/sites/${siteId}`), 'site');
  const reference = `E2E-${randomUUID().slice(0, 4)}`;
  const { excavation } = await ok<{ excavation: { id: number } }>(
    // Registering an excavation with its support and soil is a coordinator's part.
    await coordinator.post(`/api/sites/${siteId}/excavations`, {
      data: {
        reference,
        name: 'Land drain trench (test)',
        kind: 'trench',
        geometry: { type: 'LineString', coordinates: [offset(site, -10, north), offset(site, 10, north)] },
        width: 0.9,
        depth: 1.8,
        state: 'open',
        supportType: 'hydraulic-frames',
        soil: [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 0 }],
      },
    }),
    'excavation',
  );
  const now = Date.now();
  const pallets = [
    offset(site, -2, north + 6),
    offset(site, 2, north + 6),
    offset(site, 2, north + 8),
    offset(site, -2, north + 8),
    offset(site, -2, north + 6),
  ];
  const { permit } = await ok<{ permit: { id: number; number: string; version: number } }>(
    await supervisor.post('/api/permits', {
      data: {
        siteId,
        kind: 'load',
        description: 'Pallets of drain pipe stacked north of the land drain trench',
        windowStart: new Date(now - 3600_000).toISOString(),
        windowEnd: new Date(now + 8 * 3600_000).toISOString(),
        excavationIds: [excavation.id],
        loads: [{ id: 'pallets', kind: 'area', label: 'Pipe pallets', outline: { type: 'Polygon', coordinates: [pallets] }, pressure: 5 }],
        operatorIds,
      },
    }),
    'permit',
  );
  const submitted = await ok<{ permit: { version: number } }>(
    await supervisor.post(`/api/permits/${permit.id}/transitions`, { data: { action: 'submit', version: permit.version } }),
    'submit',
  );
  const approved = await ok<{ permit: { status: string } }>(
    await coordinator.post(`/api/permits/${permit.id}/transitions`, {
      data: { action: 'approve', version: submitted.permit.version, password: demoPassword },
    }),
    'approve',
  );
  expect(approved.permit.status).toBe(operatorIds.length ? 'approved' : 'live');
  return { reference, excavationId: excavation.id, permit };
}
