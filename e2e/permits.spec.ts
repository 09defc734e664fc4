import { readFile } from 'node:fs/promises';
import { expect, test, type APIRequestContext } from '@playwright/test';
import { demoPassword, signIn } from './helpers';

/** The path of the permit link in the newest message to `to` whose subject matches. */
async function permitLinkFromMail(request: APIRequestContext, to: string, subject: RegExp): Promise<string> {
  let path: string | undefined;
  await expect
    .poll(
      async () => {
        const res = await request.get(`/api/dev/mail?to=${encodeURIComponent(to)}`);
        if (!res.ok()) return undefined;
        const { messages } = (await res.json()) as { messages: { subject: string; text: string }[] };
        const m = messages.find((x) => subject.test(x.subject));
        path = m?.text.match(/https?:\/\/[^\s/]+(\/permits\/\d+)/)?.[1];
        return path;
      },
      { message: `a mail to ${to} matching ${subject}`, timeout: 20_000 },
    )
    .toBeTruthy();
  return path!;
}

test('a load permit from placing to approval and the printed permit', async ({ page, browser, request }) => {
  // The supervisor asks for a permit beside the demo pipe trench TR-01.
  const siteId = await signIn(page, 'supervisor@demo.brink.test');
  await page.goto(`/sites/${siteId}/permits/new`);
  await page.getByLabel('What the work is').fill('Excavator 21 t loading out beside the rising main trench');
  await page.getByLabel(/^TR-01 /).check();

  // A tracked excavator, its near track 0.4 m from the trench edge (TR-01 runs east-west at 22 m
  // south of the origin, 1.2 m wide; the 21 t machine's tracks are 2.2 m apart, 0.6 m wide).
  await page.getByLabel('Add a machine from the plant library').selectOption({ label: 'Excavator 21 t (21 t)' });
  // It lands at its standoff beside the trench's longest side; here it is set facing east by hand.
  await page.getByLabel('Facing (degrees from north)').fill('90');
  // Typed key by key, as a person does (a minus sign first), and applied with Enter.
  for (const [label, figure] of [
    ['East of the site origin (m)', '-18'],
    ['North of the site origin (m)', '-19.6'],
  ]) {
    const field = page.getByLabel(label);
    await field.fill('');
    await field.pressSequentially(figure);
    await field.press('Enter');
    await expect(field).toHaveValue(Number(figure).toFixed(2));
  }
  const live = page
    .getByRole('region', { name: 'Live check' })
    .or(page.locator('section', { has: page.getByRole('heading', { name: 'Live check' }) }));
  await expect(live.locator('[data-verdict="fails"]').first()).toBeVisible();
  await expect(live.getByTestId('computed-standoff')).toHaveText(/^\d+\.\d\d m$/);
  const standoff = Number((await live.getByTestId('computed-standoff').textContent())!.replace(' m', ''));
  expect(standoff).toBeGreaterThan(0.4);

  // Dragged back (north, away from the trench) until the check passes.
  const handle = page.locator('.leaflet-marker-icon[title="Move Excavator 21 t"]');
  await handle.scrollIntoViewIfNeeded();
  await handle.hover();
  const box = (await handle.boundingBox())!;
  await page.mouse.down();
  for (let i = 1; i <= 10; i++) await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2 - i * 8);
  await page.mouse.up();
  await expect(live.locator('[data-verdict="passes"]').first()).toBeVisible();
  await expect(live.locator('[data-verdict="fails"]')).toHaveCount(0);
  // Let go, the full check (with standoffs) is on screen, not the verdict-only check of a drag frame.
  await expect(live.getByTestId('computed-standoff')).toHaveText(/^\d+\.\d\d m$/);
  await expect(live.getByText('worked out when you let go')).toHaveCount(0);

  await page.getByRole('button', { name: 'Send for review' }).click();
  await expect(page).toHaveURL(/\/permits\/\d+$/);
  const permitId = page.url().match(/\/permits\/(\d+)$/)![1];
  await expect(page.locator('[data-status="submitted"]')).toBeVisible();
  const number = (await page.getByRole('heading', { level: 1 }).textContent())!.replace('Permit ', '').trim();

  // The coordinator opens the link from the e-mail and reads the sheet.
  const coordinatorContext = await browser.newContext();
  const coordinator = await coordinatorContext.newPage();
  await signIn(coordinator, 'coordinator@demo.brink.test');
  const link = await permitLinkFromMail(request, 'coordinator@demo.brink.test', new RegExp(`Permit ${number} .*awaits your review`));
  expect(link).toBe(`/permits/${permitId}`);
  await coordinator.goto(link);
  await expect(coordinator.getByRole('heading', { name: 'Calculation sheet' })).toBeVisible();
  await expect(coordinator.getByRole('img', { name: /lateral pressure \(kPa\) against depth \(m\)/ })).toBeVisible();
  await expect(coordinator.getByText('Surcharge from the loads').first()).toBeVisible();
  await expect(coordinator.getByText(/never replace the support's design/).first()).toBeVisible();

  // Approves with a 3.0 m standoff and a condition, signing with the password.
  await coordinator.getByRole('button', { name: 'Approve', exact: true }).click();
  const form = coordinator.getByRole('form', { name: 'Approve' });
  await form.getByLabel('Approve with a standoff').check();
  await form.getByLabel('Standoff from the excavation edge (m)').fill('3.0');
  await form.getByLabel('A banksman is present whenever the machine moves or slews inside the influence zone.').check();
  await form.getByLabel('Password', { exact: true }).fill(demoPassword);
  await form.getByRole('button', { name: 'Approve' }).click();
  await expect(coordinator.getByRole('heading', { name: 'Decision: Approved' })).toBeVisible();
  // The success is said in words, and stays although nothing is left to do on the permit.
  await expect(
    coordinator.getByText('Approved. The person who asked for it and the operators named on it are told by e-mail.'),
  ).toBeVisible();
  await expect(coordinator.getByTestId('decision-standoff')).toHaveText(
    'Standoff: keep every load at least 3.00 m from the excavation edge.',
  );
  await coordinatorContext.close();

  // The supervisor sees it approved and downloads the printed permit.
  await page.reload();
  await expect(page.locator('[data-status="approved"]')).toBeVisible();
  await expect(page.getByText('A banksman is present whenever the machine moves or slews inside the influence zone.')).toBeVisible();
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('link', { name: 'Download the permit (PDF)' }).click(),
  ]);
  expect(download.suggestedFilename()).toBe(`permit-${number}.pdf`);
  const pdf = await readFile((await download.path())!);
  expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
});
