import { expect, test } from '@playwright/test';
import { apiAs, signIn, trenchWithLivePermit } from './helpers';

// On a phone: the supervisor records a failed shift-start inspection of a trench, and the live
// permit beside it shows Suspended. The trench and its live permit are made for this test through
// the API, so the demo data other tests read is left as it was.

test('the supervisor records a failed inspection on a phone and the permit on that trench shows Suspended', async ({
  page,
  playwright,
  baseURL,
}) => {
  const siteId = await signIn(page, 'supervisor@demo.brink.test');
  const coordinator = await apiAs(playwright.request, baseURL!, 'coordinator@demo.brink.test');
  // The supervisor's session from the page, saying Brink's origin as the page itself would.
  const supervisor = await apiAs(playwright.request, baseURL!, null, await page.context().storageState());
  const { reference, permit } = await trenchWithLivePermit(supervisor, coordinator, siteId);
  await coordinator.dispose();
  await supervisor.dispose();

  // The dashboard lists the new trench as due (or overdue) with a button to inspect it.
  await page.goto(`/sites/${siteId}`);
  const due = page
    .getByRole('region', { name: 'Excavations due for inspection' })
    .or(page.locator('section', { has: page.getByRole('heading', { name: 'Excavations due for inspection' }) }));
  await due.getByRole('link', { name: `Inspect ${reference}` }).click();
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(`Inspect ${reference} Land drain trench (test)`);

  const answer = async (group: string, choice: string) =>
    page.getByRole('group', { name: group, exact: true }).getByText(choice, { exact: true }).click();
  await answer('Why', 'Start of shift');
  for (const item of ['Sides and faces', 'Edges and stored material', 'Access and egress', 'Barriers and covers', 'Loads nearby'])
    await answer(item, 'Pass');
  await answer('Atmosphere', 'Not applicable');
  await answer('Support members', 'Fail');
  await answer('Water', 'Fail');
  await page.getByLabel('Support members note').fill('Two frames have dropped at the east end; one strut is loose');
  await answer('Outcome', 'Not safe: stop work');
  await page.getByLabel('Remarks').fill('Re-set the two frames and re-pin the strut before anyone goes in');
  // A fail without its note is named before anything is sent, and nothing typed is lost.
  await page.getByRole('button', { name: 'Record the inspection' }).click();
  await expect(
    page.getByRole('group', { name: 'Water', exact: true }).getByText('Water note is required for a fail: say what is wrong.'),
  ).toBeVisible();
  await expect(page.getByLabel('Support members note')).toHaveValue('Two frames have dropped at the east end; one strut is loose');

  await page.getByLabel('Water note').fill('Water seeping in at the east end, 100 mm deep at formation');
  // The button is large enough for a gloved thumb.
  const send = page.getByRole('button', { name: 'Record the inspection' });
  expect((await send.boundingBox())!.height).toBeGreaterThanOrEqual(44);
  await send.click();

  // The history says what happened and links the suspended permit.
  await expect(page).toHaveURL(new RegExp(`/sites/${siteId}/excavations/\\d+/inspections$`));
  await expect(page.getByText(/Inspection recorded: not safe\./)).toBeVisible();
  await expect(page.locator('[data-inspection-state="unsafe"]').first()).toBeVisible();
  await page.getByRole('link', { name: permit.number }).first().click();

  await expect(page).toHaveURL(new RegExp(`/permits/${permit.id}$`));
  await expect(page.locator('[data-status="suspended"]').first()).toBeVisible();
  await expect(page.locator('[data-status="suspended"]').first()).toContainText('Suspended');
});
