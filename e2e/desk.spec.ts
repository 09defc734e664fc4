import { randomUUID } from 'node:crypto';
import { expect, test, type APIRequest } from '@playwright/test';
import { checklist } from '../shared/schemas/inspections';
import { apiAs, ok, signIn, trenchWithLivePermit } from './helpers';

// What people look for on a desktop: a concern's photo on the permit page, the timeline in plain
// words, a safe inspection that leaves suspended permits to the coordinator, what needs a supervisor
// first, the search of the permits list, and the site map that fits a 1440 px window.

/** A 1 × 1 PNG: a real picture the browser draws. */
const PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==', 'base64');

/** The demo supervisor and coordinator as API clients, the supervisor's name and site, and a live permit on a new trench. */
async function livePermitOnNewTrench(playwright: { request: APIRequest }, baseURL: string, north: number) {
  const supervisor = await apiAs(playwright.request, baseURL, 'supervisor@demo.brink.test');
  const coordinator = await apiAs(playwright.request, baseURL, 'coordinator@demo.brink.test');
  const { user: me } = await ok<{ user: { name: string; memberships: { siteId: number }[] } }>(await supervisor.get('/api/auth/me'), 'me');
  const siteId = me.memberships[0].siteId;
  return { supervisor, coordinator, me, siteId, ...(await trenchWithLivePermit(supervisor, coordinator, siteId, [], north)) };
}

test('the coordinator sees a concern’s photo full size, the timeline in words, and a safe inspection leaves the permit suspended for them', async ({
  page,
  playwright,
  baseURL,
}) => {
  const { supervisor, coordinator, me, siteId, reference, excavationId, permit } = await livePermitOnNewTrench(playwright, baseURL!, 130);

  // A concern with a photo, as the phone sends it.
  const note = `Crack along the north edge ${randomUUID().slice(0, 6)}`;
  await ok(
    await supervisor.post(`/api/permits/${permit.id}/concerns`, {
      multipart: { excavationId: String(excavationId), note, photo: { name: 'edge.png', mimeType: 'image/png', buffer: PNG } },
    }),
    'concern',
  );
  // A not-safe inspection suspends the live permit.
  const answers = (fail: boolean) =>
    Object.fromEntries(
      checklist.map((c) => [
        c.key,
        c.key === 'support' && fail
          ? { answer: 'fail', note: 'A frame has dropped' }
          : { answer: c.key === 'atmosphere' ? 'na' : 'pass', note: '' },
      ]),
    );
  const failed = await ok<{ inspection: { id: number } }>(
    await coordinator.post(`/api/excavations/${excavationId}/inspections`, {
      data: { reason: 'shift-start', checklist: answers(true), outcome: 'not-safe', remarks: 'Re-set the frame before anyone goes in' },
    }),
    'not-safe inspection',
  );
  await supervisor.dispose();
  await coordinator.dispose();

  // The coordinator inspects it again after the repair, on the page: safe.
  await signIn(page, 'coordinator@demo.brink.test');
  await page.goto(`/sites/${siteId}/excavations/${excavationId}/inspect`);
  const answer = async (group: string, choice: string) =>
    page.getByRole('group', { name: group, exact: true }).getByText(choice, { exact: true }).click();
  await answer('Why', 'Start of shift');
  for (const c of checklist) await answer(c.label, c.key === 'atmosphere' ? 'Not applicable' : 'Pass');
  await answer('Outcome', 'Safe to work');
  await page.getByRole('button', { name: 'Record the inspection' }).click();
  // Nothing resumes by itself: the page says so and links the permit.
  await expect(
    page.getByText(/Inspection recorded: safe to work\. Its suspended permit stays suspended until a coordinator resumes it/),
  ).toBeVisible();
  await page.getByRole('link', { name: permit.number }).first().click();
  await expect(page).toHaveURL(new RegExp(`/permits/${permit.id}$`));
  await expect(page.locator('[data-status="suspended"]').first()).toBeVisible();

  // The timeline in plain words.
  const lines = page.getByTestId('timeline-line');
  await expect(lines.filter({ hasText: `${me.name} sent it for review` })).toHaveCount(1);
  await expect(lines.filter({ hasText: /^Went live at \d\d:\d\d \(approved within its window\)/ })).toHaveCount(1);
  await expect(lines.filter({ hasText: `Suspended: inspection ${failed.inspection.id} of ${reference} found it not safe` })).toHaveCount(1);

  // The concern's photo is on the timeline, and opens full size through Brink's access checks.
  const concern = lines.filter({ hasText: `${me.name} reported a concern about ${reference}` });
  await expect(concern).toContainText(note);
  const photo = concern.getByRole('img', { name: `Photo 1 of the concern by ${me.name}` });
  await expect(photo).toBeVisible();
  await photo.evaluate((img) => img.scrollIntoView()); // pictures below the fold load as they come into view
  await expect.poll(() => photo.evaluate((img: HTMLImageElement) => img.naturalWidth)).toBe(1);
  const full = concern.getByRole('link', { name: /Open full size/ });
  await expect(full).toHaveAttribute('target', '_blank');
  const href = (await full.getAttribute('href'))!;
  const served = await page.request.get(href);
  expect(served.status()).toBe(200);
  expect(served.headers()['content-type']).toBe('image/png');
  // Signed out, the same address gives nothing.
  const stranger = await playwright.request.newContext({ baseURL });
  expect((await stranger.get(href)).status()).toBe(401);
  await stranger.dispose();
});

test('a supervisor sees what needs them first, and finds a permit by a word that survives a reload', async ({
  page,
  playwright,
  baseURL,
}) => {
  const supervisor = await apiAs(playwright.request, baseURL!, 'supervisor@demo.brink.test');
  const { user: me } = await ok<{ user: { memberships: { siteId: number }[] } }>(await supervisor.get('/api/auth/me'), 'me');
  const siteId = me.memberships[0].siteId;
  const { excavations } = await ok<{ excavations: { id: number; reference: string }[] }>(
    await supervisor.get(`/api/sites/${siteId}/excavations`),
    'excavations',
  );
  const tag = `Lintel-${randomUUID().slice(0, 6)}`;
  const now = Date.now();
  const { permit } = await ok<{ permit: { id: number; number: string } }>(
    await supervisor.post('/api/permits', {
      data: {
        siteId,
        kind: 'load',
        description: `Precast lintels stacked for the ${tag} opening`,
        windowStart: new Date(now + 24 * 3600_000).toISOString(),
        windowEnd: new Date(now + 30 * 3600_000).toISOString(),
        excavationIds: [excavations.find((e) => e.reference === 'TR-01')!.id],
        loads: [],
        operatorIds: [],
      },
    }),
    'draft',
  );
  await supervisor.dispose();

  await signIn(page, 'supervisor@demo.brink.test');
  const first = page.locator('section', { has: page.getByRole('heading', { name: 'What needs you first' }) });
  await expect(first.locator('[data-need="draft"]').getByRole('link', { name: new RegExp(tag) })).toBeVisible();
  // Most pressing first: returned for changes, then drafts, then what is working today.
  const order = await first.locator('[data-need]').evaluateAll((els) => els.map((e) => e.getAttribute('data-need')));
  expect(order).toEqual(['returned', 'draft', 'today'].filter((n) => order.includes(n)));

  await page.goto(`/sites/${siteId}/permits?view=all`);
  const rows = page.locator('tbody tr');
  await expect(rows.first()).toBeVisible();
  await page.getByLabel('Search').fill(tag.toLowerCase());
  await expect(page).toHaveURL(new RegExp(`[?&]q=${tag.toLowerCase()}`));
  await expect(rows).toHaveCount(1);
  await expect(rows.first()).toContainText(permit.number);
  await page.reload();
  await expect(page.getByLabel('Search')).toHaveValue(tag.toLowerCase());
  await expect(rows).toHaveCount(1);
  await expect(rows.first()).toContainText(permit.number);
});

test('on a phone the permits list folds its filters behind one button that counts those on; on a desktop all show', async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 });
  await signIn(page, 'supervisor@demo.brink.test');
  const siteId = Number(page.url().match(/\/sites\/(\d+)/)![1]);
  await page.goto(`/sites/${siteId}/permits?view=all`);
  const toggle = page.getByTestId('filters-toggle');
  const status = page.getByLabel('Status', { exact: true });
  await expect(page.getByLabel('Search')).toBeVisible();
  await expect(toggle).toHaveText('Filters');
  await expect(toggle).toHaveAttribute('aria-expanded', 'false');
  await expect(status).toBeHidden();
  await expect(page.getByLabel('Sort by')).toBeHidden();

  await toggle.click();
  await expect(toggle).toHaveAttribute('aria-expanded', 'true');
  await expect(status).toBeVisible();
  await status.selectOption({ label: 'Live' });
  await expect(toggle).toHaveText('Hide the filters (1 on)');
  await toggle.click();
  await expect(status).toBeHidden();
  await expect(page.getByRole('button', { name: 'Filters (1 on)' })).toHaveAttribute('aria-expanded', 'false');
  await expect(page.locator('tbody tr').first()).toContainText('Live');

  // Wider than a phone: no button, every filter in view.
  await page.setViewportSize({ width: 1280, height: 800 });
  await expect(toggle).toBeHidden();
  await expect(status).toBeVisible();
  await expect(status).toHaveValue('live');
});

test('the site map, its zoom controls and the soil-layer table fit a 1440 px window', async ({ page }) => {
  await page.setViewportSize({ width: 1440, height: 900 });
  const siteId = await signIn(page, 'coordinator@demo.brink.test');
  await page.goto(`/sites/${siteId}/map`);
  await page.getByRole('button', { name: /^TR-01 / }).click();
  const soil = page.getByRole('group', { name: 'Soil layers' });
  await expect(soil).toBeVisible();
  const fits = (sel: string) =>
    page.locator(sel).evaluate((el) => {
      const r = el.getBoundingClientRect();
      return { right: Math.round(r.right), bottom: Math.round(r.bottom), scroll: el.scrollWidth - el.clientWidth };
    });
  // Nothing wider than the window, and the panel holds the table without a sideways scroll.
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(1440);
  const panel = await fits('aside[aria-label="Excavation details"]');
  expect(panel.right).toBeLessThanOrEqual(1440);
  expect(panel.scroll).toBe(0);
  const layers = await soil.locator('ol').evaluate((t) => t.getBoundingClientRect().right);
  expect(layers).toBeLessThanOrEqual(panel.right);
  // A text field stops where the shared schema would refuse (40 characters for a reference).
  await expect(page.getByLabel('Reference', { exact: true })).toHaveAttribute('maxlength', '40');
  // The map and its zoom controls are inside the window.
  for (const sel of ['[data-testid="site-map"]', '.leaflet-control-zoom']) {
    const box = await fits(sel);
    expect(box.right, sel).toBeLessThanOrEqual(1440);
    expect(box.bottom, sel).toBeLessThanOrEqual(900);
  }
});

test('a decided permit’s plan is read-only, a permit that is not there offers a way back, and only an administrator finds the caught mail', async ({
  page,
  playwright,
  baseURL,
}) => {
  const { permit } = await livePermitOnNewTrench(playwright, baseURL!, 170);

  await signIn(page, 'supervisor@demo.brink.test');
  // The person menu of someone who is not an administrator has no caught mail.
  await page.getByRole('button', { name: /Signed in as/ }).click();
  await expect(page.getByRole('button', { name: 'Sign out' }).filter({ visible: true })).toBeVisible();
  await expect(page.getByRole('link', { name: 'Caught mail' })).toHaveCount(0);
  await page.keyboard.press('Escape');

  // A live permit's plan shows where the loads stand, with nothing to drag.
  await page.goto(`/permits/${permit.id}`);
  await expect(page.getByRole('heading', { name: new RegExp(permit.number) }).first()).toBeVisible();
  const legend = page.getByText('Loads are coloured by the verdict');
  await expect(legend).toBeVisible();
  await expect(legend).not.toContainText('Drag');
  await expect(page.locator('.leaflet-marker-icon[title^="Move"], .leaflet-marker-icon[title^="Turn"]')).toHaveCount(0);

  // A permit that is not there (or not the person's) says so and offers a way back.
  await page.goto('/permits/987654321');
  await expect(page.getByRole('heading', { name: 'Permit not found' })).toBeVisible();
  await page.getByRole('link', { name: 'Go to your dashboard' }).click();
  await expect(page).toHaveURL(/\/sites\/\d+$/);

  // An administrator, while the local mail catcher is on, reaches the caught mail from the person menu.
  await page.context().clearCookies();
  await signIn(page, 'admin@demo.brink.test');
  await page.getByRole('button', { name: /Signed in as/ }).click();
  await page.getByRole('link', { name: 'Caught mail' }).filter({ visible: true }).click();
  await expect(page).toHaveURL(/\/admin\/mail$/);
});

test('the placing map asks to zoom in when a machine is only a few pixels wide, and stops asking once it is not', async ({ page }) => {
  const siteId = await signIn(page, 'supervisor@demo.brink.test');
  await page.goto(`/sites/${siteId}/permits/new`);
  await page.getByLabel('What the work is').fill('Excavator 21 t loading out beside the rising main trench');
  await page.getByLabel(/^TR-01 /).check();
  await page.getByLabel('Add a machine from the plant library').selectOption({ label: 'Excavator 21 t (21 t)' });
  await expect(page.getByText(/Excavator 21 t is placed .* from the edge of TR-01/)).toBeVisible();
  const hint = page.getByTestId('zoom-hint');
  const map = page.locator('.leaflet-container').first();
  // Zoom out until the machine is a few pixels wide (each press waits for the state, not for a time).
  await expect(async () => {
    await map.getByRole('button', { name: 'Zoom out' }).click();
    await expect(hint).toBeVisible({ timeout: 1500 });
  }).toPass({ timeout: 30_000 });
  await expect(hint).toContainText(/Excavator 21 t is only \d+ pixels wide at this zoom: zoom in/);
  await expect(async () => {
    await map.getByRole('button', { name: 'Zoom in' }).click();
    await expect(hint).toBeHidden({ timeout: 1500 });
  }).toPass({ timeout: 30_000 });
});
