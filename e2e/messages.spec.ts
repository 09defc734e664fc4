import { expect, test } from '@playwright/test';
import { apiAs, ok, offset, signIn } from './helpers';

// Every refusal a person meets names the field as the form labels it, says what to do, appears
// once next to the field, and the summary above the form takes the focus. Each case below was
// once shown as API text ("loads[0].unitWeight Invalid input", "windowEnd must be after the start",
// "That is not your password … Password is not your password.", "must be one of trench-box, …",
// 'mode "replace"').

test('a refused request: each reason once, by its label, next to its field', async ({ page }) => {
  const siteId = await signIn(page, 'supervisor@demo.brink.test');
  await page.goto(`/sites/${siteId}/permits/new`);
  await page.getByLabel('What the work is').fill('Spoil heap beside the rising main trench');
  await page.getByLabel(/^TR-01 /).check();
  // The window closes before it opens.
  const opens = await page.getByLabel('Window opens').inputValue();
  const day = opens.slice(0, 10);
  await page.getByLabel('Window opens').fill(`${day}T15:00`);
  await page.getByLabel('Window closes').fill(`${day}T09:00`);
  await page.getByRole('button', { name: 'Send for review' }).click();

  const summary = page.getByTestId('form-summary');
  await expect(summary).toHaveText('Correct the field marked below.');
  await expect(summary).toBeFocused();
  await expect(page.getByText('Window closes must be after the window opens.')).toHaveCount(1);
  await expect(page.getByLabel('Window closes')).toHaveAttribute('aria-invalid', 'true');
  await expect(page.getByText(/windowEnd|must be after the start/)).toHaveCount(0);

  // A stockpile with no height, sent as it is: the form's check of the shared schema puts the
  // reason under "Height (m)", once (the live check's "Cannot check: …" is its own line).
  await page.getByLabel('Window closes').fill(`${day}T18:00`);
  await page.getByLabel('Ad hoc load').selectOption('stockpile');
  await page.getByRole('button', { name: 'Add load' }).click();
  await page.getByLabel('Height (m)').fill('');
  await page.getByRole('button', { name: 'Send for review' }).click();
  await expect(page.getByText('Height (m) is required: type a figure.', { exact: true })).toHaveCount(1);
  await expect(page.getByLabel('Height (m)')).toHaveAttribute('aria-invalid', 'true');
  await expect(summary).toHaveText('Correct the field marked below.');
  await expect(summary).toBeFocused();
  await expect(page.getByText(/loads\[|Invalid input|expected number|received null/)).toHaveCount(0);
});

test('a wrong password under a decision is said once, in words', async ({ page, playwright, baseURL }) => {
  // A request sent for review through the API, beside a trench of the test's own.
  const supervisor = await apiAs(playwright.request, baseURL!, 'supervisor@demo.brink.test');
  const { sites } = await ok<{ sites: { id: number }[] }>(await supervisor.get('/api/sites'), 'sites');
  const siteId = sites[0].id;
  const { site } = await ok<{ site: { latitude: number; longitude: number } }>(await supervisor.get(`/api/sites/${siteId}`), 'site');
  const { excavations } = await ok<{ excavations: { id: number; reference: string }[] }>(
    await supervisor.get(`/api/sites/${siteId}/excavations`),
    'excavations',
  );
  const tr01 = excavations.find((e) => e.reference === 'TR-01')!;
  const now = Date.now();
  // A small stack of kerbs 6 m north of TR-01 (it runs east-west about 22 m south of the origin).
  const stack = [offset(site, -20, -14), offset(site, -18, -14), offset(site, -18, -13), offset(site, -20, -13), offset(site, -20, -14)];
  const { permit } = await ok<{ permit: { id: number; version: number } }>(
    await supervisor.post('/api/permits', {
      data: {
        siteId,
        kind: 'load',
        description: 'Kerb stack north of the rising main trench',
        windowStart: new Date(now + 2 * 86_400_000).toISOString(),
        windowEnd: new Date(now + 2 * 86_400_000 + 4 * 3600_000).toISOString(),
        excavationIds: [tr01.id],
        loads: [{ id: 'kerbs', kind: 'area', label: 'Kerb stack', outline: { type: 'Polygon', coordinates: [stack] }, pressure: 3 }],
      },
    }),
    'permit',
  );
  const sent = await ok<{ permit: { version: number } }>(
    await supervisor.post(`/api/permits/${permit.id}/transitions`, { data: { action: 'submit', version: permit.version } }),
    'submit',
  );

  await signIn(page, 'coordinator@demo.brink.test');
  await page.goto(`/permits/${permit.id}`);
  await page.getByRole('button', { name: 'Decline', exact: true }).click();
  const form = page.getByRole('form', { name: 'Decline' });
  await form.getByLabel('Reason').fill('The kerbs go on the north compound instead.');
  await form.getByLabel('Password', { exact: true }).fill('not-my-password');
  await form.getByRole('button', { name: 'Decline' }).click();
  await expect(page.getByText('Password is not the one you sign in with: type it again.')).toHaveCount(1);
  await expect(page.getByTestId('form-summary')).toHaveText('Correct the field marked below.');
  await expect(page.getByTestId('form-summary')).toBeFocused();
  await expect(page.getByText(/That is not your password|is not your password/)).toHaveCount(0);
  // Withdrawn again, so the coordinator's queue holds only what other tests send.
  await ok(
    await supervisor.post(`/api/permits/${permit.id}/transitions`, { data: { action: 'withdraw', version: sent.permit.version } }),
    'withdraw',
  );
  await supervisor.dispose();
});

test('the import report names fields and choices by their labels, not codes', async ({ page }) => {
  const siteId = await signIn(page, 'coordinator@demo.brink.test');
  await page.goto(`/sites/${siteId}/register`);
  const { site } = (await (await page.request.get(`/api/sites/${siteId}`)).json()) as { site: { latitude: number; longitude: number } };
  const trench = (reference: string, supportType: string) => ({
    type: 'Feature',
    geometry: { type: 'LineString', coordinates: [offset(site, 400, 400), offset(site, 420, 400)] },
    properties: {
      reference,
      name: 'Import test',
      width: 0.9,
      depth: 1.5,
      state: 'planned',
      supportType,
      soil: [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 0 }],
    },
  });
  const file = { type: 'FeatureCollection', features: [trench('IMP-BOX', 'Box'), trench('TR-01', 'Trench box')] };
  await page
    .getByLabel('GeoJSON file')
    .setInputFiles({ name: 'import.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify(file)) });
  await page.getByRole('button', { name: 'Import', exact: true }).click();
  const report = page.getByLabel('Import report');
  await expect(
    report.getByText('Support must be one of: Trench box, Hydraulic frames, Sheet piles, Timbering, Battered back or Unsupported.'),
  ).toBeVisible();
  await expect(
    report.getByText(
      'Reference is already used on this site: to update it, choose "Add new ones and replace those with the same reference" under "What to do with existing references".',
    ),
  ).toBeVisible();
  await expect(page.getByText(/trench-box|hydraulic-frames|mode "replace"|features\[/)).toHaveCount(0);
});
