import { randomUUID } from 'node:crypto';
import { expect, test, type APIRequest, type Locator, type Page } from '@playwright/test';
import { apiAs, demoPassword, ok, offset, signIn } from './helpers';

// A supervisor from the dashboard to a submitted load permit in six moves or fewer, and a
// coordinator from the dashboard to a decision in four or fewer, nothing typed twice. Every click,
// fill, choice, drag and key press of the walk goes through `Moves`, which counts it; the counts
// are printed and asserted. The trench is made for this test through the API, so no other
// permit stands beside it and the demo data other tests read is left as it was.

/** Counts each interaction a person makes (one click, one fill of a box, one choice in a list, one drag, one key). */
class Moves {
  readonly log: string[] = [];
  constructor(private readonly page: Page) {}
  async click(target: Locator, what: string) {
    this.log.push(`click ${what}`);
    await target.click();
  }
  async check(target: Locator, what: string) {
    this.log.push(`tick ${what}`);
    await target.check();
  }
  async fill(target: Locator, text: string, what: string) {
    this.log.push(`type ${what}`);
    await target.fill(text);
  }
  async choose(target: Locator, label: string, what: string) {
    this.log.push(`choose ${what}`);
    await target.selectOption({ label });
  }
  async press(key: string, what: string) {
    this.log.push(`press ${key} (${what})`);
    await this.page.keyboard.press(key);
  }
  /** One drag of a handle by (dx, dy) screen pixels, moved in small steps as a hand does. */
  async drag(handle: Locator, dx: number, dy: number, what: string) {
    this.log.push(`drag ${what}`);
    await handle.scrollIntoViewIfNeeded();
    await handle.hover();
    const box = (await handle.boundingBox())!;
    const x = box.x + box.width / 2;
    const y = box.y + box.height / 2;
    await this.page.mouse.down();
    for (let i = 1; i <= 10; i++) await this.page.mouse.move(x + (dx * i) / 10, y + (dy * i) / 10);
    await this.page.mouse.up();
  }
  get count() {
    return this.log.length;
  }
}

async function centreY(l: Locator): Promise<number> {
  const b = (await l.boundingBox())!;
  return b.y + b.height / 2;
}

/**
 * An open trench of the test's own, 30 m long east-west, at a place of its own far from the demo
 * excavations (a fresh place each run, so trenches left by earlier runs stand elsewhere).
 */
async function ownTrench(playwright: { request: APIRequest }, baseURL: string) {
  const api = await apiAs(playwright.request, baseURL, 'coordinator@demo.brink.test');
  const { sites } = await ok<{ sites: { id: number }[] }>(await api.get('/api/sites'), 'sites');
  const siteId = sites[0].id;
  const { site } = await ok<{ site: { latitude: number; longitude: number } }>(await api.get(`/api/sites/${siteId}`), 'site');
  const reference = `SIX-${randomUUID().slice(0, 6)}`;
  const east = -1500 + Math.floor(Math.random() * 60) * 50;
  const north = 300 + Math.floor(Math.random() * 60) * 40;
  const { excavation } = await ok<{ excavation: { id: number } }>(
    await api.post(`/api/sites/${siteId}/excavations`, {
      data: {
        reference,
        name: 'Cable duct trench (test)',
        kind: 'trench',
        geometry: { type: 'LineString', coordinates: [offset(site, east - 15, north), offset(site, east + 15, north)] },
        width: 1.0,
        depth: 2.0,
        state: 'open',
        supportType: 'trench-box',
        soil: [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 0 }],
      },
    }),
    'trench',
  );
  await api.dispose();
  return { siteId, reference, id: excavation.id };
}

test('a load permit asked for in six moves and decided in four', async ({ page, browser, playwright, baseURL }) => {
  const { reference } = await ownTrench(playwright, baseURL!);

  // The supervisor, from the dashboard.
  await signIn(page, 'supervisor@demo.brink.test');
  await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
  const asking = new Moves(page);
  await asking.click(page.getByRole('link', { name: 'Ask for a permit' }), 'Ask for a permit');
  await expect(page.getByRole('heading', { level: 1, name: 'Ask for a permit' })).toBeVisible();
  await asking.check(page.getByLabel(new RegExp(`^${reference} `)), reference);
  await asking.fill(page.getByLabel('What the work is'), 'Excavator 21 t digging the duct joint pit beside the cable trench', 'the work');
  await asking.choose(page.getByLabel('Add a machine from the plant library'), 'Excavator 21 t (21 t)', 'the machine');

  // It lands at its computed standoff: the check passes where it stands.
  const live = page.locator('section', { has: page.getByRole('heading', { name: 'Live check' }) });
  await expect(
    page.getByText(new RegExp(`Excavator 21 t is placed [\\d.]+ m from the edge of ${reference}, just beyond its computed standoff`)),
  ).toBeVisible();
  await expect(live.locator('[data-verdict="passes"], [data-verdict="close"]').first()).toBeVisible();
  await expect(live.locator('[data-verdict="fails"]')).toHaveCount(0);

  // Dragged a little farther from the trench: it still passes.
  const handle = page.locator('.leaflet-marker-icon[title="Move Excavator 21 t"]');
  await handle.scrollIntoViewIfNeeded();
  const away = (await centreY(handle)) < (await centreY(page.locator('.leaflet-tooltip', { hasText: reference }).first())) ? -1 : 1;
  await asking.drag(handle, 0, away * 20, 'the machine farther from the trench');
  await expect(live.locator('[data-verdict="fails"]')).toHaveCount(0);
  await asking.click(page.getByRole('button', { name: 'Send for review' }), 'Send for review');
  await expect(page).toHaveURL(/\/permits\/\d+$/);
  await expect(page.locator('[data-status="submitted"]')).toBeVisible();
  const permitId = page.url().match(/\/permits\/(\d+)$/)![1];
  console.log(`supervisor, dashboard to a submitted load permit: ${asking.count} interactions (${asking.log.join('; ')})`);
  expect(asking.count).toBeLessThanOrEqual(6);

  // The coordinator, from the dashboard.
  const context = await browser.newContext();
  const coordinator = await context.newPage();
  await signIn(coordinator, 'coordinator@demo.brink.test');
  const deciding = new Moves(coordinator);
  await deciding.click(coordinator.locator(`a[href="/permits/${permitId}"]`).first(), 'the permit awaiting review');
  await deciding.click(coordinator.getByRole('button', { name: 'Approve', exact: true }), 'Approve');
  const form = coordinator.getByRole('form', { name: 'Approve' });
  await deciding.fill(form.getByLabel('Password'), demoPassword, 'the password');
  await deciding.click(form.getByRole('button', { name: 'Approve' }), 'confirm');
  await expect(coordinator.locator('[data-status="approved"], [data-status="live"]').first()).toBeVisible();
  console.log(`coordinator, dashboard to a decision: ${deciding.count} interactions (${deciding.log.join('; ')})`);
  expect(deciding.count).toBeLessThanOrEqual(4);
  await context.close();
});

test('a machine dragged nearer shows the verdict change, and Undo puts it back', async ({ page, playwright, baseURL }) => {
  const trench = await ownTrench(playwright, baseURL!);
  await signIn(page, 'supervisor@demo.brink.test');
  const siteId = trench.siteId;
  // From the register: the request names the excavation and shows it.
  await page.goto(`/sites/${siteId}/register`);
  await page.getByRole('link', { name: `Ask for a permit beside ${trench.reference}` }).click();
  await expect(page).toHaveURL(new RegExp(`/permits/new\\?excavation=${trench.id}$`));
  await expect(page.getByLabel(new RegExp(`^${trench.reference} `))).toBeChecked();
  await page.getByLabel('Add a machine from the plant library').selectOption({ label: 'Excavator 21 t (21 t)' });
  const live = page.locator('section', { has: page.getByRole('heading', { name: 'Live check' }) });
  await expect(page.getByText(new RegExp(`Excavator 21 t is placed [\\d.]+ m from the edge of ${trench.reference}`))).toBeVisible();
  const east = page.getByLabel('East of the site origin (m)');
  const north = page.getByLabel('North of the site origin (m)');
  const before = [await east.inputValue(), await north.inputValue()];

  // Dragged towards the trench until it stops passing.
  const handle = page.locator('.leaflet-marker-icon[title="Move Excavator 21 t"]');
  const trenchLabel = page.locator('.leaflet-tooltip', { hasText: trench.reference }).first();
  await handle.hover();
  const t = (await trenchLabel.boundingBox())!;
  const h = (await handle.boundingBox())!;
  await page.mouse.down();
  const steps = 12;
  const dy = (t.y + t.height / 2 - (h.y + h.height / 2)) * 0.6;
  for (let i = 1; i <= steps; i++) await page.mouse.move(h.x + h.width / 2, h.y + h.height / 2 + (dy * i) / steps);
  await page.mouse.up();
  await expect(live.locator('[data-verdict="fails"]').first()).toBeVisible();

  // Undo: back where it was placed, passing again.
  await page.getByRole('button', { name: /^Undo the last move/ }).click();
  await expect(east).toHaveValue(before[0]);
  await expect(north).toHaveValue(before[1]);
  await expect(live.locator('[data-verdict="fails"]')).toHaveCount(0);
});
