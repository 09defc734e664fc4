import { randomUUID } from 'node:crypto';
import AxeBuilder from '@axe-core/playwright';
import { expect, test, type APIRequestContext, type BrowserContext, type Page, type Route } from '@playwright/test';
import { DEMO_PASSWORD } from '../shared/demo';
import { createDb, createPool, type Db } from '@db/database';
import { localProjection, prepareExcavation, signedDistanceToZoneAt, type LocalProjection } from '@shared/geometry';
import type { FieldPermit } from '@shared/schemas/field';
import type { Polygon } from 'geojson';
import { apiAs } from './helpers';
import { shapeColumns, shapesOf } from '../shared/geometry/shapes';

/**
 * The operator's phone (Pixel 7 project): where I stand against the exclusion zone, checked against
 * the shared geometry; the permit with no signal; a concern and a briefing made with no signal that
 * arrive once; and an accessibility scan of the field pages.
 *
 * Each run makes its own pit on the demo site (in the database the test script names) and its own
 * approved permit through the API: a 6 m × 3 m pit east of the site origin, a pipe stack 5 m north of
 * it, approved with a 2.00 m standoff, naming the demo operator.
 */

const password = DEMO_PASSWORD;
const PIT = { x0: 40, y0: 0, x1: 46, y1: 3 };
const STANDOFF = 2;

let db: Db;
let permit: { id: number; number: string };
let proj: LocalProjection;
let field: FieldPermit;

let made: { siteId: number; pitId: number; operatorId: number };

/** A permit for a pipe stack 5 m north of the test pit, approved with a 2.00 m standoff, naming the demo operator. */
async function approvedPermit(
  supervisor: APIRequestContext,
  coordinator: APIRequestContext,
): Promise<{ id: number; number: string; version: number }> {
  const corner = (x: number, y: number) => proj.toWgs84([x, y]);
  const stack = [corner(PIT.x0, 8), corner(PIT.x1, 8), corner(PIT.x1, 10), corner(PIT.x0, 10), corner(PIT.x0, 8)];
  const now = Date.now();
  const created = await supervisor.post('/api/permits', {
    data: {
      siteId: made.siteId,
      kind: 'load',
      description: 'Pipe stack beside the phone test pit',
      windowStart: new Date(now - 3600_000).toISOString(),
      windowEnd: new Date(now + 8 * 3600_000).toISOString(),
      excavationIds: [made.pitId],
      loads: [{ id: 'stack', kind: 'area', label: 'Pipe stack', outline: { type: 'Polygon', coordinates: [stack] }, pressure: 8 }],
      operatorIds: [made.operatorId],
    },
  });
  expect(created.status(), await created.text()).toBe(201);
  const draft = (await created.json()).permit;
  const submitted = await supervisor.post(`/api/permits/${draft.id}/transitions`, { data: { action: 'submit', version: draft.version } });
  expect(submitted.status(), await submitted.text()).toBe(200);
  const approved = await coordinator.post(`/api/permits/${draft.id}/transitions`, {
    data: {
      action: 'approve',
      version: (await submitted.json()).permit.version,
      password,
      standoff: STANDOFF,
      conditions: ['Stack the pipes no higher than two rows.'],
    },
  });
  expect(approved.status(), await approved.text()).toBe(200);
  return (await approved.json()).permit;
}

test.beforeAll(async ({ playwright, baseURL }) => {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is not set: run the end-to-end tests through `npm test`');
  db = createDb(createPool(url, 2));
  const site = await db
    .selectFrom('sites')
    .select(['id', 'latitude', 'longitude'])
    .where('name', '=', 'Alder Marsh pumping station')
    .executeTakeFirstOrThrow();
  proj = localProjection([site.longitude, site.latitude]);
  const corner = (x: number, y: number) => proj.toWgs84([x, y]);
  const pitGeometry: Polygon = {
    type: 'Polygon',
    coordinates: [[corner(PIT.x0, PIT.y0), corner(PIT.x1, PIT.y0), corner(PIT.x1, PIT.y1), corner(PIT.x0, PIT.y1), corner(PIT.x0, PIT.y0)]],
  };
  const pit = await db
    .insertInto('excavations')
    .values({
      site_id: site.id,
      reference: `FP-${randomUUID().slice(0, 5)}`,
      name: 'Phone test pit',
      kind: 'pit',
      geometry: JSON.stringify(pitGeometry),
      ...shapeColumns(shapesOf({ kind: 'pit', geometry: pitGeometry, width: null, depth: 3 }, site)),
      width: null,
      depth: 3,
      state: 'open',
      support_type: 'sheet-piles',
      design_surcharge: 10,
      soil: JSON.stringify([{ top: 0, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 30, cohesion: 0 }]),
    })
    .returning('id')
    .executeTakeFirstOrThrow();

  const supervisor = await apiAs(playwright.request, baseURL!, 'supervisor@demo.brink.test');
  const coordinator = await apiAs(playwright.request, baseURL!, 'coordinator@demo.brink.test');
  const operator = await db.selectFrom('users').select('id').where('email', '=', 'operator@demo.brink.test').executeTakeFirstOrThrow();
  made = { siteId: site.id, pitId: pit.id, operatorId: operator.id };
  permit = await approvedPermit(supervisor, coordinator);
  field = (await (await coordinator.get(`/api/field/permits/${permit.id}`)).json()).permit;
  await supervisor.dispose();
  await coordinator.dispose();
});

test.afterAll(async () => {
  await db?.destroy();
});

test.use({ permissions: ['geolocation'], geolocation: { latitude: 0, longitude: 0, accuracy: 1 } });

/** The API takes changes only from Brink's origin: requests made outside the page say it. */
const fromBrink = () => ({ Origin: new URL(process.env.BRINK_URL ?? 'http://127.0.0.1:3000').origin });

async function signInOperator(page: Page) {
  const r = await page.request.post('/api/auth/sign-in', { data: { email: 'operator@demo.brink.test', password }, headers: fromBrink() });
  expect(r.status()).toBe(200);
}

/** Stand at a site-local point (m east, m north of the origin) with the given accuracy (m). */
async function standAt(context: BrowserContext, x: number, y: number, accuracy: number) {
  const [longitude, latitude] = proj.toWgs84([x, y]);
  await context.setGeolocation({ latitude, longitude, accuracy });
  return [longitude, latitude] as [number, number];
}

/** The reading the project's geometry gives at a position: + outside, − inside (m). */
function expected(at: [number, number]): number {
  const x = field.excavations[0];
  const p = localProjection([field.origin.longitude, field.origin.latitude]);
  return signedDistanceToZoneAt(prepareExcavation(x.shape, p), at, x.standoff!, p);
}

/** The figure on the screen, as a signed number: "1.7 m outside" → 1.7, "0.8 m inside" → −0.8. */
async function shownReading(page: Page): Promise<number> {
  const text = (await page.getByTestId('reading-figure').textContent()) ?? '';
  const m = text.match(/^(\d+\.\d) m (inside|outside)$/);
  expect(m, `reading "${text}"`).not.toBeNull();
  return Number(m![1]) * (m![2] === 'inside' ? -1 : 1);
}

const alarm = (page: Page) => page.getByRole('alert').filter({ hasText: 'You are inside the exclusion zone' });

test('the reading matches the shared geometry on both sides of the boundary, and the warning shows only inside', async ({
  page,
  context,
}) => {
  await signInOperator(page);
  await page.goto(`/field/permits/${permit.id}`);
  await expect(page.getByRole('heading', { name: `Permit ${permit.number}` })).toBeVisible();
  await expect(page.getByText('Keep every part of the load at least 2.00 m from the edge')).toBeVisible();
  await expect(page.getByTestId('caution')).toContainText('competent temporary works designer');
  await page.getByRole('button', { name: 'Show where I am' }).click();

  // North of the pit: the boundary is 3 + 2 = 5 m north of the origin line.
  const points: { y: number; side: 'outside' | 'inside' }[] = [
    { y: PIT.y1 + STANDOFF + 1.73, side: 'outside' },
    { y: PIT.y1 + STANDOFF - 0.81, side: 'inside' },
    { y: PIT.y1 + STANDOFF + 0.34, side: 'outside' },
    { y: PIT.y1 + STANDOFF - 1.46, side: 'inside' },
  ];
  for (const p of points) {
    const at = await standAt(context, 43, p.y, 0.2);
    const want = expected(at);
    expect(want < 0 ? 'inside' : 'outside').toBe(p.side);
    await expect.poll(async () => Math.abs((await shownReading(page)) - want)).toBeLessThanOrEqual(0.1);
    expect(Math.sign(await shownReading(page))).toBe(Math.sign(want));
    if (p.side === 'inside') await expect(alarm(page)).toBeVisible();
    else await expect(alarm(page)).toHaveCount(0);
  }

  // Accuracy worse than the margin: the reading says it cannot decide, and no inside warning.
  await standAt(context, 43, PIT.y1 + STANDOFF - 0.5, 3);
  await expect(page.getByText('Cannot tell which side you are')).toBeVisible();
  await expect(alarm(page)).toHaveCount(0);
});

test('with no signal, the permit still shows from the copy kept on the phone', async ({ page, context }) => {
  await signInOperator(page);
  await page.goto('/field');
  await expect(page.getByRole('link', { name: new RegExp(permit.number) })).toBeVisible();
  // The service worker has precached the shell.
  expect(await page.evaluate(() => navigator.serviceWorker.ready.then((r) => Boolean(r.active)))).toBe(true);
  await page.getByRole('link', { name: new RegExp(permit.number) }).click();
  await expect(page.getByRole('heading', { name: `Permit ${permit.number}` })).toBeVisible();
  await expect(page.getByTestId('last-updated')).toContainText('Last updated');

  await context.setOffline(true);
  // Moving within the app: the page reads the IndexedDB copies.
  await page.getByRole('link', { name: '← My permits' }).click();
  await expect(page.getByTestId('last-updated')).toContainText('No signal');
  await expect(page.getByRole('link', { name: new RegExp(permit.number) })).toBeVisible();
  // Opening the address afresh: the service worker serves the shell, the copies serve the permit.
  await page.goto(`/field/permits/${permit.id}`);
  await expect(page.getByRole('heading', { name: `Permit ${permit.number}` })).toBeVisible();
  await expect(page.getByText('Keep every part of the load at least 2.00 m from the edge')).toBeVisible();
  await expect(page.getByTestId('last-updated')).toContainText('No signal: showing the copy kept on this phone');
  await expect(page.getByRole('banner').getByRole('status')).toContainText('No signal');
  await context.setOffline(false);
});

/**
 * Every field API request from the page or the service worker is held with no answer, as on one bar
 * of signal or behind a site gateway with no onward connection; the browser still believes it is
 * online. Answers the held requests with a reset on release.
 */
async function holdFieldApi(context: BrowserContext) {
  const held: Route[] = [];
  const hold = (route: Route) => void held.push(route);
  await context.route('**/api/field/**', hold);
  return async () => {
    await context.unroute('**/api/field/**', hold);
    await Promise.all(held.map((r) => r.abort('connectionreset').catch(() => undefined)));
  };
}

/** HH:MM in the phone's own time zone, as the page writes times. */
const clockIn = (page: Page, iso: string) =>
  page.evaluate((t) => new Intl.DateTimeFormat('en-GB', { hour: '2-digit', minute: '2-digit' }).format(new Date(t)), iso);

test('with the field API held while the browser believes it is online, the page says No signal and the copy’s own time', async ({
  page,
  context,
}) => {
  await signInOperator(page);
  await page.goto('/field');
  await expect(page.getByRole('link', { name: new RegExp(permit.number) })).toBeVisible();
  expect(await page.evaluate(() => navigator.serviceWorker.ready.then((r) => Boolean(r.active)))).toBe(true);
  const answered = page.waitForResponse((r) => new URL(r.url()).pathname === `/api/field/permits/${permit.id}` && r.status() === 200);
  await page.getByRole('link', { name: new RegExp(permit.number) }).click();
  const kept: { asOf: string } = await (await answered).json();
  await expect(page.getByTestId('last-updated')).toContainText('Last updated');
  await expect(page.getByTestId('last-try')).toContainText('reached the server');

  const release = await holdFieldApi(context);
  await page.reload();
  expect(await page.evaluate(() => navigator.onLine)).toBe(true);
  await expect(page.getByRole('heading', { name: `Permit ${permit.number}` })).toBeVisible();
  // The service worker gives up at 8 s and the page at 10 s: either way the answer is the phone's copy.
  await expect(page.getByTestId('last-updated')).toContainText(
    `No signal: showing the copy kept on this phone (from ${await clockIn(page, kept.asOf)}`,
    { timeout: 20_000 },
  );
  await expect(page.getByTestId('last-try')).toContainText('no answer from the server');
  await expect(page.getByRole('banner').getByRole('status')).toContainText('No signal');
  await expect(page.getByText('Keep every part of the load at least 2.00 m from the edge')).toBeVisible();

  // The signal returns: the next try reaches the server and the page says so.
  await release();
  await page.getByRole('button', { name: 'Update now' }).click();
  await expect(page.getByTestId('last-updated')).toContainText('Last updated');
  await expect(page.getByTestId('last-try')).toContainText('reached the server');
  await expect(page.getByRole('banner').getByRole('status')).toContainText('Signal');
  await expect(page.getByRole('banner').getByRole('status')).not.toContainText('No signal');
});

test('a permit suspended on the server after the copy was kept is never shown without the out-of-date warning', async ({
  page,
  context,
  playwright,
  baseURL,
}) => {
  const supervisor = await apiAs(playwright.request, baseURL!, 'supervisor@demo.brink.test');
  const coordinator = await apiAs(playwright.request, baseURL!, 'coordinator@demo.brink.test');
  const live = await approvedPermit(supervisor, coordinator);
  // The operator's briefing starts it: its window is open.
  await signInOperator(page);
  const briefed = await page.request.post(`/api/permits/${live.id}/briefing`, { data: {}, headers: fromBrink() });
  expect(briefed.status(), await briefed.text()).toBe(200);

  // Every answer the phone gets for this permit, its body read as it arrives (the page may ask more
  // than once, and a body is gone once the page moves on): the last one is the copy it keeps.
  type Answer = { asOf: string; permit: { status: string } };
  const answers: Answer[] = [];
  page.on('response', (r) => {
    if (new URL(r.url()).pathname !== `/api/field/permits/${live.id}` || r.status() !== 200) return;
    r.json().then(
      (b: Answer) => answers.push(b),
      () => undefined,
    );
  });
  await page.goto(`/field/permits/${live.id}`);
  await expect(page.getByRole('heading', { name: `Permit ${live.number}` })).toContainText('Live');
  await expect(page.getByTestId('stale-copy')).toHaveCount(0);
  expect(await page.evaluate(() => navigator.serviceWorker.ready.then((r) => Boolean(r.active)))).toBe(true);
  await page.waitForLoadState('networkidle');
  await expect.poll(() => answers.length).toBeGreaterThan(0);
  const kept = answers[answers.length - 1];
  expect(kept.permit.status).toBe('live');

  // Suspended on the server; the phone hears nothing of it, and its clock moves on 6 minutes.
  const detail = await (await coordinator.get(`/api/permits/${live.id}`)).json();
  const suspended = await coordinator.post(`/api/permits/${live.id}/transitions`, {
    data: { action: 'suspend', version: detail.permit.version, reason: 'Crack along the north edge.' },
  });
  expect(suspended.status(), await suspended.text()).toBe(200);
  await page.clock.setFixedTime(Date.parse(kept.asOf) + 6 * 60_000);
  // From the first moment, every state of the page that shows the permit from a kept copy also shows the warning.
  await page.addInitScript(() => {
    const w = window as unknown as { unwarned: string[] };
    w.unwarned = [];
    new MutationObserver(() => {
      const heading = document.querySelector('main h1')?.textContent ?? '';
      const line = document.querySelector('[data-testid="last-updated"]')?.textContent ?? '';
      if (heading.startsWith('Permit') && !line.startsWith('Last updated') && !document.querySelector('[data-testid="stale-copy"]'))
        w.unwarned.push(`${heading} | ${line}`);
    }).observe(document, { subtree: true, childList: true, characterData: true });
  });
  const release = await holdFieldApi(context);
  await page.reload();
  await expect(page.getByRole('heading', { name: `Permit ${live.number}` })).toContainText('Live');
  const banner = page.getByTestId('stale-copy');
  await expect(banner).toBeVisible();
  await expect(banner).toHaveAttribute('role', 'alert');
  await expect(banner).toContainText(`Possibly out of date: this copy is from ${await clockIn(page, kept.asOf)}, 6 min ago`);
  await expect(banner).toContainText('may have been suspended');
  await expect(page.getByTestId('last-updated')).toContainText('No signal: showing the copy kept on this phone', { timeout: 20_000 });
  await expect(banner).toBeVisible();

  // With signal again, the server's answer shows the suspension, and the warning goes.
  await release();
  await page.getByRole('button', { name: 'Update now' }).click();
  await expect(page.getByRole('heading', { name: `Permit ${live.number}` })).toContainText('Suspended');
  await expect(page.getByRole('alert').filter({ hasText: 'Suspended: stop work under this permit now' })).toBeVisible();
  await expect(page.getByTestId('last-updated')).toContainText('Last updated');
  await expect(banner).toHaveCount(0);
  expect(await page.evaluate(() => (window as unknown as { unwarned: string[] }).unwarned)).toEqual([]);
  await supervisor.dispose();
  await coordinator.dispose();
});

test.describe('without a service worker', () => {
  test.use({ serviceWorkers: 'block' });

  test('opening a permit with no signal reads the copy kept in IndexedDB', async ({ page, context }) => {
    await signInOperator(page);
    await page.goto('/field');
    await expect(page.getByRole('link', { name: new RegExp(permit.number) })).toBeVisible();
    expect(await page.evaluate(() => navigator.serviceWorker.controller)).toBeNull();
    // The list was kept with every permit in it; this permit was never opened online.
    await context.setOffline(true);
    await page.getByRole('link', { name: new RegExp(permit.number) }).click();
    await expect(page.getByRole('heading', { name: `Permit ${permit.number}` })).toBeVisible();
    await expect(page.getByTestId('last-updated')).toContainText('No signal: showing the copy kept on this phone');
    await expect(page.getByText('Keep every part of the load at least 2.00 m from the edge')).toBeVisible();
    await context.setOffline(false);
  });
});

// The smallest valid PNG: 1 × 1 pixel (PNG specification, ISO/IEC 15948).
const PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==', 'base64');

test('a concern and a briefing made with no signal arrive once when it returns, even when an answer is lost', async ({
  page,
  context,
  playwright,
  baseURL,
}) => {
  await signInOperator(page);
  await page.goto(`/field/permits/${permit.id}`);
  await expect(page.getByRole('heading', { name: `Permit ${permit.number}` })).toBeVisible();

  await context.setOffline(true);
  const note = `Crack along the north edge, seen at ${randomUUID().slice(0, 8)}`;
  await page.getByRole('button', { name: `I have been briefed on ${permit.number}` }).click();
  await expect(page.getByTestId('briefing-state')).toContainText('recorded on this phone');
  await page.getByLabel('What you saw').fill(note);
  // A file that is not an image is refused on the phone, before anything is kept or sent, in words.
  await page.locator('input[type=file]').setInputFiles({ name: 'edge.txt', mimeType: 'text/plain', buffer: Buffer.from('not a photo') });
  await expect(page.getByText('Photo must be a photo (PNG or JPEG).', { exact: true })).toHaveCount(1);
  await expect(page.getByText('Photo 1:')).toHaveCount(0);
  await page.locator('input[type=file]').setInputFiles({ name: 'edge.png', mimeType: 'image/png', buffer: PNG });
  await expect(page.getByText('Photo must be a photo (PNG or JPEG).')).toHaveCount(0);
  await expect(page.getByText('Photo 1:')).toBeVisible();
  await page.getByRole('button', { name: 'Send the concern' }).click();
  await expect(page.getByTestId('concern-on-phone').filter({ hasText: note })).toContainText('waiting to send');
  await expect(page.getByText(/2 items waiting to send/)).toBeVisible();

  // The first concern to reach the server has its answer lost on the way back.
  let lost = 0;
  await page.route('**/api/permits/*/concerns', async (route) => {
    if (lost === 0) {
      lost++;
      await route.fetch();
      await route.abort('connectionreset');
    } else await route.continue();
  });
  await context.setOffline(false);
  await expect(page.getByTestId('briefing-state')).toContainText('You confirmed the briefing', { timeout: 30_000 });
  await expect.poll(() => lost).toBe(1);
  // Still on the phone after the lost answer; sent again with the same key.
  await page.getByRole('button', { name: 'Try sending now' }).click();
  await expect(page.getByTestId('concern-sent').filter({ hasText: note })).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('concern-on-phone')).toHaveCount(0);

  const coordinator = await apiAs(playwright.request, baseURL!, 'coordinator@demo.brink.test');
  const detail = await (await coordinator.get(`/api/permits/${permit.id}`)).json();
  const concerns = detail.permit.events.filter((e: { action: string; comment: string }) => e.action === 'concern' && e.comment === note);
  expect(concerns).toHaveLength(1);
  const briefings = detail.permit.events.filter((e: { action: string }) => e.action === 'briefed');
  expect(briefings).toHaveLength(1);
  expect(detail.permit.current.operators[0].briefedAt).not.toBeNull();
  const rows = await db.selectFrom('concerns').select(['id', 'photo_upload_ids']).where('note', '=', note).execute();
  expect(rows).toHaveLength(1);
  expect(rows[0].photo_upload_ids).toHaveLength(1);
  await coordinator.dispose();
});

test('a concern the server refuses comes back into the form, its reason in words next to the field, the summary focused', async ({
  page,
}) => {
  await signInOperator(page);
  await page.goto(`/field/permits/${permit.id}`);
  await expect(page.getByRole('heading', { name: `Permit ${permit.number}` })).toBeVisible();
  const note = `Water seeping at the south-west corner, ${randomUUID().slice(0, 8)}`;
  await page.getByLabel('What you saw').fill(note);
  // Named and typed as a PNG but not one: the phone cannot tell, the server judges the content and refuses it.
  await page
    .locator('input[type=file]')
    .setInputFiles({ name: 'corner.png', mimeType: 'image/png', buffer: Buffer.from('not a photo at all') });
  await expect(page.getByText('Photo 1:')).toBeVisible();
  await page.getByRole('button', { name: 'Send the concern' }).click();

  const summary = page.getByTestId('form-summary');
  await expect(summary).toHaveText(
    'Brink did not accept this concern. Correct the field marked below. Send it again when it is right, or discard it in the list below.',
  );
  await expect(summary).toBeFocused();
  await expect(page.getByText('Photo must be a PNG or JPEG image.', { exact: true })).toHaveCount(1);
  await expect(page.getByLabel('What you saw')).toHaveValue(note);
  await expect(page.getByTestId('concern-on-phone')).toContainText('It is back in the form above');
  // Never the API's own text or field names.
  await expect(page.locator('main')).not.toContainText('The file in photo');
  await expect(page.locator('main')).not.toContainText('Not accepted by the server');

  // Corrected (the photo taken out) and sent again: it arrives, and the refused copy is gone.
  await page.getByRole('button', { name: 'Remove photo 1' }).click();
  await page.getByRole('button', { name: 'Send the concern' }).click();
  await expect(page.getByTestId('concern-sent').filter({ hasText: note })).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('concern-on-phone')).toHaveCount(0);
  await expect(summary).toHaveCount(0);

  // The form's own check: both fields named as labelled, once each, the summary focused.
  await page.getByRole('button', { name: 'Send the concern' }).click();
  await expect(summary).toHaveText('Correct the field marked below.');
  await expect(summary).toBeFocused();
  await expect(page.getByText('What you saw is required: say what you saw.', { exact: true })).toHaveCount(1);
});

test('a briefing the server refuses says why in words and what to do', async ({ page, context, playwright, baseURL }) => {
  const supervisor = await apiAs(playwright.request, baseURL!, 'supervisor@demo.brink.test');
  const coordinator = await apiAs(playwright.request, baseURL!, 'coordinator@demo.brink.test');
  const fresh = await approvedPermit(supervisor, coordinator);
  await signInOperator(page);
  await page.goto(`/field/permits/${fresh.id}`);
  await expect(page.getByRole('heading', { name: `Permit ${fresh.number}` })).toBeVisible();

  // Briefed with no signal on revision 1; meanwhile the supervisor changes the permit (revision 2).
  await context.setOffline(true);
  await page.getByRole('button', { name: `I have been briefed on ${fresh.number}` }).click();
  await expect(page.getByTestId('briefing-state')).toContainText('recorded on this phone');
  const revised = await supervisor.post(`/api/permits/${fresh.id}/transitions`, {
    data: { action: 'revise', version: fresh.version, reason: 'Stack moved one metre west' },
  });
  expect(revised.status(), await revised.text()).toBe(200);
  await context.setOffline(false);

  const refusal = page.getByTestId('briefing-state').getByRole('alert');
  await expect(refusal).toHaveText(
    `Brink did not record it: Permit ${fresh.number} has changed since that briefing (now revision 2): read it again and confirm the new briefing.`,
    { timeout: 30_000 },
  );
  await expect(page.getByText(/has changed since that briefing/)).toHaveCount(1);
  await expect(page.getByRole('button', { name: 'Discard it, to confirm the briefing again' })).toBeVisible();
  await supervisor.dispose();
  await coordinator.dispose();
});

test('the field pages have no serious or critical accessibility faults, large type and large touch targets', async ({ page, context }) => {
  await signInOperator(page);
  const pages = ['/field', `/field/permits/${permit.id}`];
  for (const path of pages) {
    await page.goto(path);
    await expect(page.locator('main h1')).toBeVisible();
    await expect(page.getByTestId('last-updated')).toBeVisible();
    if (path !== '/field') {
      await standAt(context, 43, 12, 1);
      const start = page.getByRole('button', { name: 'Show where I am' });
      if (await start.isVisible()) await start.click();
      await expect(page.getByTestId('reading-figure')).toBeVisible();
    }
    const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa']).analyze();
    const bad = result.violations
      .filter((v) => v.impact === 'serious' || v.impact === 'critical')
      .map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`);
    expect(bad, path).toEqual([]);

    // Text readable at arm's length: body text of the field view at 18 px or more.
    const sizes = await page.locator('main p, main li').evaluateAll((els) => els.map((e) => parseFloat(getComputedStyle(e).fontSize)));
    expect(sizes.length).toBeGreaterThan(3);
    expect(Math.min(...sizes), `smallest text on ${path}`).toBeGreaterThanOrEqual(18);
    // Every button and link in the page at least 44 px tall.
    const small = await page
      .locator('main button:visible, main a:visible, main label:has(input[type=radio])')
      .evaluateAll((els) => els.filter((e) => e.getBoundingClientRect().height < 44).map((e) => (e.textContent ?? '').trim().slice(0, 40)));
    expect(small, `targets under 44 px on ${path}`).toEqual([]);
  }
});
