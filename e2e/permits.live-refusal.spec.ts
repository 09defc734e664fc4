import { expect, test } from '@playwright/test';
import { signIn } from './helpers';

// The live check refuses figures the shared schemas refuse (docs/calculation.md, "Refusals"): a
// stockpile of unit weight −19 or with no height shows "Cannot check …" in grey, never a verdict or NaN.
test('the live check says "Cannot check" for a stockpile of negative unit weight or no height', async ({ page }) => {
  const siteId = await signIn(page, 'supervisor@demo.brink.test');
  await page.goto(`/sites/${siteId}/permits/new`);
  await page.getByLabel('What the work is').fill('Spoil heap beside the rising main trench');
  await page.getByLabel(/^TR-01 /).check();

  await page.getByLabel('Ad hoc load').selectOption('stockpile');
  await page.getByRole('button', { name: 'Add load' }).click();
  const live = page.locator('section', { has: page.getByRole('heading', { name: 'Live check' }) });
  await expect(live.locator('[data-verdict]').first()).toBeVisible();

  await page.getByLabel('Unit weight (kN/m³)').fill('-19');
  await expect(live.getByTestId('cannot-check')).toHaveText('Cannot check: Load 1: Unit weight (kN/m³) must be more than 0 kN/m³.');
  await expect(live.locator('[data-verdict="passes"]')).toHaveCount(0);

  await page.getByLabel('Unit weight (kN/m³)').fill('19');
  await page.getByLabel('Height (m)').fill('');
  await expect(live.getByTestId('cannot-check')).toHaveText('Cannot check: Load 1: Height (m) is required: type a figure.');
  await expect(live.locator('[data-verdict="passes"]')).toHaveCount(0);
  await expect(page.getByText(/NaN/)).toHaveCount(0);
});
