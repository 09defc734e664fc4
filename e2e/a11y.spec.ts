import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';
import { ok, signIn } from './helpers';

// The accessibility scan (axe-core, WCAG 2.2 AA rules) on every desktop page, as the person who uses
// it: no serious or critical fault. The phone view's pages have their own scan in field.phone.spec.ts.

test.describe.configure({ timeout: 90_000 });

async function scan(page: Page, path: string) {
  await page.goto(path);
  await expect(page.locator('h1').first()).toBeVisible();
  // Wait for the page's data, not for time: no "Loading…" left.
  await expect(page.getByRole('status').filter({ hasText: /^Loading/ })).toHaveCount(0);
  const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa']).analyze();
  const bad = result.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`);
  expect(bad, path).toEqual([]);
}

/** The demo site, its permits and an open excavation, read as the person signed in. */
async function demoSite(page: Page) {
  const siteId = Number(page.url().match(/\/sites\/(\d+)/)![1]);
  const { permits } = await ok<{ permits: { id: number; status: string }[] }>(
    await page.request.get(`/api/permits?siteId=${siteId}`),
    'permits',
  );
  const { excavations } = await ok<{ excavations: { id: number; state: string }[] }>(
    await page.request.get(`/api/sites/${siteId}/excavations`),
    'excavations',
  );
  return { siteId, permits, open: excavations.find((e) => e.state === 'open')! };
}

// One test per page, so that each scan has the whole test time to itself on a slow machine.
for (const path of ['/sign-in', '/forgot-password', '/reset-password?token=not-a-real-token', '/invitations/accept?token=not-a-real-token'])
  test(`signed out: ${path} has no serious or critical accessibility fault`, async ({ page }) => {
    await scan(page, path);
  });

const adminPages: [string, (siteId: number) => string][] = [
  ['people', () => '/admin/people'],
  ['sites', () => '/admin/sites'],
  ['new site', () => '/admin/sites/new'],
  ['site settings', (siteId) => `/admin/sites/${siteId}`],
  ['caught mail', () => '/admin/mail'],
  ['not found', () => '/no-such-page'],
];
for (const [name, path] of adminPages)
  test(`administrator: the ${name} page has none`, async ({ page }) => {
    await signIn(page, 'admin@demo.brink.test');
    const { siteId } = await demoSite(page);
    await scan(page, path(siteId));
  });

const coordinatorPages: [string, (s: Awaited<ReturnType<typeof demoSite>>) => string][] = [
  ['dashboard', (s) => `/sites/${s.siteId}`],
  ['site map', (s) => `/sites/${s.siteId}/map`],
  ['register', (s) => `/sites/${s.siteId}/register`],
  ['permits list', (s) => `/sites/${s.siteId}/permits`],
  ['permit awaiting review', (s) => `/permits/${(s.permits.find((p) => p.status === 'submitted') ?? s.permits[0]).id}`],
  ['live permit', (s) => `/permits/${(s.permits.find((p) => p.status === 'live') ?? s.permits[0]).id}`],
  ['missing permit', () => '/permits/999999'],
  ['plant library', () => '/plant'],
  ['inspections', (s) => `/sites/${s.siteId}/inspections`],
  ['inspection history', (s) => `/sites/${s.siteId}/excavations/${s.open.id}/inspections`],
  ['inspection form', (s) => `/sites/${s.siteId}/excavations/${s.open.id}/inspect`],
];
for (const [name, path] of coordinatorPages) {
  test(`coordinator: the ${name} page has none`, async ({ page }) => {
    await signIn(page, 'coordinator@demo.brink.test');
    await scan(page, path(await demoSite(page)));
  });
}

const supervisorPages: [string, (s: Awaited<ReturnType<typeof demoSite>>, draftId: number) => string][] = [
  ['dashboard', (s) => `/sites/${s.siteId}`],
  ['new request', (s) => `/sites/${s.siteId}/permits/new`],
  ['placing', (_s, draftId) => `/permits/${draftId}/edit`],
  ['draft', (_s, draftId) => `/permits/${draftId}`],
];
for (const [name, path] of supervisorPages) {
  test(`supervisor: the ${name} page has none`, async ({ page }) => {
    await signIn(page, 'supervisor@demo.brink.test');
    const s = await demoSite(page);
    const draft = s.permits.find((p) => p.status === 'draft');
    expect(draft, 'the demo site has a draft permit').toBeDefined();
    await scan(page, path(s, draft!.id));
  });
}
