import { expect, test } from '@playwright/test';
import { demoPassword } from './helpers';

// The people screen's search (issue 16 §1): by a part of a name or e-mail address, kept in the page's
// address, and a search the server refuses told beside the box, naming it.
test('an administrator finds people by name or address, and a refused search is told beside the box', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('admin@demo.brink.test');
  await page.getByLabel('Password', { exact: true }).fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page.getByRole('heading', { level: 2, name: 'Administrator' })).toBeVisible();
  await page.goto('/admin/people');
  const people = page.getByRole('heading', { level: 3 });
  await expect(people.filter({ hasText: 'Colm Ridley (demo coordinator)' })).toBeVisible();

  // By a part of the name, in another case.
  const box = page.getByLabel('Search people');
  await box.fill('WHITLOCK');
  await expect(page).toHaveURL(/\/admin\/people\?q=WHITLOCK$/);
  await expect(people).toHaveText(['Sana Whitlock (demo supervisor)']);
  // By a part of the address alone.
  await box.fill('operator@demo');
  await expect(people).toHaveText(['Owen Petts (demo operator)']);
  // The search stays in the address: a reload keeps it.
  await page.reload();
  await expect(box).toHaveValue('operator@demo');
  await expect(people).toHaveText(['Owen Petts (demo operator)']);
  await box.fill('no such person 4k7');
  await expect(page.getByText('Nobody’s name or e-mail address holds “no such person 4k7”.')).toBeVisible();
  await expect(people).toHaveCount(0);
  // Cleared: everyone again.
  await box.fill('');
  await expect(page).toHaveURL(/\/admin\/people$/);
  await expect(people.filter({ hasText: 'Ada Marsh (demo administrator)' })).toBeVisible();
  await expect(people.filter({ hasText: 'Owen Petts (demo operator)' })).toBeVisible();

  // A hand-made address with a search longer than the box takes: refused by the server, told beside the box.
  await page.goto(`/admin/people?q=${'a'.repeat(101)}`);
  await expect(page.getByText('Search people must be at most 100 characters.')).toBeVisible();
  await expect(box).toHaveAttribute('aria-invalid', 'true');
  await expect(people).toHaveCount(0);
});
