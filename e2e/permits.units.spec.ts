import { expect, test } from '@playwright/test';
import { signIn } from './helpers';

// A supervisor who works in US customary units places a machine and reads its standoff in feet; the
// same check read in metric agrees (1 ft = 0.3048 m exactly, NIST SP 811), the feet rounded up.
test('a US user places a load and reads the standoff in feet', async ({ page }) => {
  const siteId = await signIn(page, 'supervisor@demo.brink.test');
  const myUnits = async (label: string) => {
    await page.getByRole('button', { name: /Signed in as/ }).click();
    // The person's menu (the narrow-screen copy of it is hidden).
    const select = page.getByLabel('My units').filter({ visible: true });
    await select.selectOption({ label });
    await expect(select).toHaveValue(label.startsWith('US') ? 'us' : label === 'As the site' ? 'site' : 'metric');
    await page.keyboard.press('Escape');
  };
  try {
    await myUnits('US customary (ft, lbf, psf)');
    await page.goto(`/sites/${siteId}/permits/new`);
    await page.getByLabel('What the work is').fill('Excavator 21 t loading out beside the rising main trench');
    await page.getByLabel(/^TR-01 /).check();
    await page.getByLabel('Add a machine from the plant library').selectOption({ label: 'Excavator 21 t (21 t)' });
    await expect(
      page.getByText(/Excavator 21 t is placed \d+\.\d ft from the edge of TR-01, just beyond its computed standoff of \d+\.\d ft/),
    ).toBeVisible();

    const live = page.locator('section', { has: page.getByRole('heading', { name: 'Live check' }) });
    const standoff = live.getByTestId('computed-standoff');
    await expect(standoff).toHaveText(/^\d+\.\d ft$/);
    const feet = Number((await standoff.textContent())!.replace(' ft', ''));
    await expect(live.getByText(/OSHA 29 CFR 1926 Subpart P/).first()).toBeVisible();

    // Typed in feet and inches: the machine moves half a foot east (6 in = 0.1524 m).
    const eastFt = page.getByLabel('East of the site origin (ft)');
    const eastBefore = Number(await eastFt.inputValue());
    await eastFt.fill(`${eastBefore} ft 6 in`);
    await eastFt.press('Enter');
    await expect(eastFt).toHaveValue((eastBefore + 0.5).toFixed(2));

    await myUnits('Metric (m, kN, kPa)');
    // The same place read in metres (1 ft = 0.3048 m exactly; the box shows 0.01 m).
    const eastM = Number(await page.getByLabel('East of the site origin (m)').inputValue());
    expect(Math.abs(eastM - (eastBefore + 0.5) * 0.3048)).toBeLessThan(0.006);
    await expect(standoff).toHaveText(/^\d+\.\d\d m$/);
    const metres = Number((await standoff.textContent())!.replace(' m', ''));
    expect(metres).toBeGreaterThan(0);
    // Feet rounded up to 0.1 ft: never less than the metric standoff, and at most 0.1 ft (0.03 m) more.
    expect(feet * 0.3048).toBeGreaterThanOrEqual(metres - 1e-9);
    expect(feet * 0.3048 - metres).toBeLessThan(0.1 * 0.3048 + 0.005);
  } finally {
    // The demo supervisor follows the site again, as the other specs expect.
    const reset = await page.request.patch('/api/auth/me', { data: { units: null }, headers: { Origin: new URL(page.url()).origin } });
    expect(reset.ok()).toBe(true);
  }
});
