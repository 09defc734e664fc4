import { readFile } from 'node:fs/promises';
import { expect, test } from '@playwright/test';
import { stateLabels } from '../shared/schemas/inspections';
import { signIn } from './helpers';

interface ExcavationRow {
  id: number;
  reference: string;
  depth: number;
  supportType: string;
  state: string;
}

test.describe('site map and register', () => {
  test('a coordinator draws a trench, describes it, finds it again with its influence zone, and in the register and its CSV', async ({
    page,
  }) => {
    const external: string[] = [];
    const appOrigin = new URL(test.info().project.use.baseURL!).origin;
    page.on('request', (r) => {
      const url = new URL(r.url());
      if (url.protocol.startsWith('http') && url.origin !== appOrigin) external.push(r.url());
    });
    await signIn(page, 'coordinator@demo.brink.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Site map' }).click();
    await expect(page.getByRole('heading', { name: 'Site map' })).toBeVisible();
    const siteId = Number(/\/sites\/(\d+)\/map/.exec(page.url())![1]);
    const map = page.getByTestId('site-map');
    // (another test's excavation may lie outside the first view: Leaflet draws it as an empty path)
    await expect(map.locator('path.brink-excavation').filter({ visible: true }).first()).toBeVisible();

    // Draw a centre line of three points in an empty part of the map, then finish it.
    await page.getByRole('button', { name: 'Draw a trench' }).click();
    // The drawing tools load on first use; the hint shows once they are on the map.
    await expect(page.getByText('Click the map at each point of the trench’s centre line')).toBeVisible();
    const box = (await map.boundingBox())!;
    const at = (fx: number, fy: number) => page.mouse.click(box.x + box.width * fx, box.y + box.height * fy);
    await at(0.55, 0.78);
    await at(0.7, 0.78);
    await at(0.78, 0.68);
    await page.getByRole('button', { name: 'Finish' }).click();

    const form = page.getByRole('form', { name: 'New excavation' });
    await expect(form).toBeVisible();
    const reference = `E2E-${Date.now().toString(36).toUpperCase()}`;
    await form.getByLabel('Reference', { exact: true }).fill(reference);
    await form.getByLabel('Name', { exact: true }).fill('Surface water drain, test run');
    await form.getByLabel('Depth H (m)').fill('2.1');
    await form.getByLabel('Support', { exact: true }).selectOption({ label: 'Trench box' });
    await expect(form.getByLabel('State', { exact: true })).toHaveValue('open');
    await form.getByRole('button', { name: 'Save excavation' }).click();
    await expect(page.getByText(`${reference} saved.`)).toBeVisible();

    // After a reload it is there, with its depth and support, and drawn with an influence zone.
    await page.reload();
    await expect(page.getByRole('heading', { name: 'Site map' })).toBeVisible();
    const list = (await (await page.request.get(`/api/sites/${siteId}/excavations`)).json()).excavations as ExcavationRow[];
    const saved = list.find((e) => e.reference === reference)!;
    expect(saved).toMatchObject({ depth: 2.1, supportType: 'trench-box', state: 'open' });
    const outline = map.locator(`path.brink-excavation-${saved.id}`);
    const zone = map.locator(`path.brink-zone-of-${saved.id}`);
    await expect(outline).toBeVisible();
    await expect(zone).toBeVisible();
    const o = (await outline.boundingBox())!;
    const z = (await zone.boundingBox())!;
    // The zone reaches beyond the trench on every side (by the depth, 2.1 m).
    expect(z.x).toBeLessThan(o.x);
    expect(z.y).toBeLessThan(o.y);
    expect(z.x + z.width).toBeGreaterThan(o.x + o.width);
    expect(z.y + z.height).toBeGreaterThan(o.y + o.height);
    // The first leg of the centre line was drawn level: it runs along the bottom of the outline's box.
    await outline.hover({ position: { x: o.width * 0.2, y: o.height - 2 }, force: true });
    await expect(page.locator('.leaflet-tooltip')).toContainText('Depth 2.10 m');
    await expect(page.locator('.leaflet-tooltip')).toContainText('Trench box');

    // The register lists it, and its CSV download holds it.
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Register' }).click();
    await expect(page.getByRole('heading', { name: 'Excavation register' })).toBeVisible();
    const row = page.getByRole('row').filter({ hasText: reference });
    await expect(row).toContainText('Trench box');
    await expect(row).toContainText('2.10 m');
    const downloading = page.waitForEvent('download');
    await page.getByRole('button', { name: /Download CSV/ }).click();
    const file = await downloading;
    expect(file.suggestedFilename()).toMatch(/excavation-register\.csv$/);
    const csv = await readFile((await file.path())!, 'utf8');
    // A trench drawn just now has no inspection yet: due, or overdue once the shift's grace time has passed.
    const uninspected = `(${stateLabels.due}|${stateLabels.overdue})`;
    expect(csv).toMatch(new RegExp(`\r\n${reference},"Surface water drain, test run",Trench,Open,${uninspected},2\\.1,`));

    // Nothing was fetched from outside the app (no tile address is set).
    expect(external).toEqual([]);
  });
});
