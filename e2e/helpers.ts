import { expect, type Page } from '@playwright/test';

/** Every demo person's password (README). */
export const demoPassword = 'brink-demo-2026';

/** Signs in through the page and waits for the site dashboard. */
export async function signIn(page: Page, email: string) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL(/\/sites\/\d+/);
}
