import { randomUUID } from 'node:crypto';
import { expect, test, type APIRequestContext } from '@playwright/test';
import { demoPassword, signIn } from './helpers';

// On a phone: the supervisor records a failed shift-start inspection of a trench, and the live
// permit beside it shows Suspended. The trench and its live permit are made for this test through
// the API, so the demo data other tests read is left as it was.

async function ok<T>(res: Awaited<ReturnType<APIRequestContext['get']>>, what: string): Promise<T> {
  expect(res.ok(), `${what}: ${res.status()} ${await res.text()}`).toBe(true);
  return (await res.json()) as T;
}

/** Metres east and north of a point → [longitude, latitude] (small distances on a sphere). */
function offset(origin: { latitude: number; longitude: number }, east: number, north: number): [number, number] {
  const lat = origin.latitude + north / 111_320;
  const lon = origin.longitude + east / (111_320 * Math.cos((origin.latitude * Math.PI) / 180));
  return [Number(lon.toFixed(7)), Number(lat.toFixed(7))];
}

/** An open trench 50 m north of the site origin, and a live permit for a pallet stack beside it. */
async function trenchWithLivePermit(supervisor: APIRequestContext, coordinator: APIRequestContext, siteId: number) {
  const { site } = await ok<{ site: { latitude: number; longitude: number } }>(await supervisor.get(`/api/sites/${siteId}`), 'site');
  const reference = `E2E-${randomUUID().slice(0, 4)}`;
  const { excavation } = await ok<{ excavation: { id: number } }>(
    // Registering an excavation with its support and soil is a coordinator's part.
    await coordinator.post(`/api/sites/${siteId}/excavations`, {
      data: {
        reference,
        name: 'Land drain trench (test)',
        kind: 'trench',
        geometry: { type: 'LineString', coordinates: [offset(site, -10, 50), offset(site, 10, 50)] },
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
  const pallets = [offset(site, -2, 56), offset(site, 2, 56), offset(site, 2, 58), offset(site, -2, 58), offset(site, -2, 56)];
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
        operatorIds: [],
      },
    }),
    'permit',
  );
  const submitted = await ok<{ permit: { version: number } }>(
    await supervisor.post(`/api/permits/${permit.id}/transitions`, { data: { action: 'submit', version: permit.version } }),
    'submit',
  );
  const approved = await ok<{ permit: { status: string } }>(
    await coordinator.post(`/api/permits/${permit.id}/transitions`, { data: { action: 'approve', version: submitted.permit.version, password: demoPassword } }),
    'approve',
  );
  expect(approved.permit.status).toBe('live');
  return { reference, excavationId: excavation.id, permit };
}

test('the supervisor records a failed inspection on a phone and the permit on that trench shows Suspended', async ({ page, playwright, baseURL }) => {
  await signIn(page, 'supervisor@demo.brink.test');
  const siteId = Number(page.url().match(/\/sites\/(\d+)/)![1]);
  const coordinator = await playwright.request.newContext({ baseURL, extraHTTPHeaders: { Origin: new URL(baseURL!).origin } }); // the API takes changes only from Brink's origin
  await ok(await coordinator.post('/api/auth/sign-in', { data: { email: 'coordinator@demo.brink.test', password: demoPassword } }), 'coordinator sign-in');
  // The supervisor's session from the page, saying Brink's origin as the page itself would.
  const supervisor = await playwright.request.newContext({ baseURL, extraHTTPHeaders: { Origin: new URL(baseURL!).origin }, storageState: await page.context().storageState() });
  const { reference, permit } = await trenchWithLivePermit(supervisor, coordinator, siteId);
  await coordinator.dispose();
  await supervisor.dispose();

  // The dashboard lists the new trench as due (or overdue) with a button to inspect it.
  await page.goto(`/sites/${siteId}`);
  const due = page.getByRole('region', { name: 'Excavations due for inspection' }).or(page.locator('section', { has: page.getByRole('heading', { name: 'Excavations due for inspection' }) }));
  await due.getByRole('link', { name: `Inspect ${reference}` }).click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Inspect ${reference} Land drain trench (test)`);

  const answer = async (group: string, choice: string) => page.getByRole('group', { name: group, exact: true }).getByText(choice, { exact: true }).click();
  await answer('Why', 'Start of shift');
  for (const item of ['Sides and faces', 'Edges and stored material', 'Access and egress', 'Barriers and covers', 'Loads nearby']) await answer(item, 'Pass');
  await answer('Atmosphere', 'Not applicable');
  await answer('Support members', 'Fail');
  await answer('Water', 'Fail');
  await page.getByLabel('Support members note').fill('Two frames have dropped at the east end; one strut is loose');
  await answer('Outcome', 'Not safe: stop work');
  await page.getByLabel('Remarks').fill('Re-set the two frames and re-pin the strut before anyone goes in');
  // A fail without its note is named before anything is sent, and nothing typed is lost.
  await page.getByRole('button', { name: 'Record the inspection' }).click();
  await expect(page.getByRole('group', { name: 'Water', exact: true }).getByText('Water note is required for a fail: say what is wrong.')).toBeVisible();
  await expect(page.getByLabel('Support members note')).toHaveValue('Two frames have dropped at the east end; one strut is loose');

  await page.getByLabel('Water note').fill('Water seeping in at the east end, 100 mm deep at formation');
  // The button is large enough for a gloved thumb.
  const send = page.getByRole('button', { name: 'Record the inspection' });
  expect((await send.boundingBox())!.height).toBeGreaterThanOrEqual(44);
  await send.click();

  // The history says what happened and links the suspended permit.
  await expect(page).toHaveURL(new RegExp(`/sites/${siteId}/excavations/\\d+/inspections$`));
  await expect(page.getByText(/Inspection recorded: not safe\./)).toBeVisible();
  await expect(page.locator('[data-inspection-state="unsafe"]').first()).toBeVisible();
  await page.getByRole('link', { name: permit.number }).first().click();

  await expect(page).toHaveURL(new RegExp(`/permits/${permit.id}$`));
  await expect(page.locator('[data-status="suspended"]').first()).toBeVisible();
  await expect(page.locator('[data-status="suspended"]').first()).toContainText('Suspended');
});
