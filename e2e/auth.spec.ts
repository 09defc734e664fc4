import { expect, test, type APIRequestContext, type Page } from '@playwright/test';
import { DEMO_PASSWORD as demoPassword } from '../shared/demo';

/** Each demo person and the heading of their part of the dashboard. */
const demoPeople = [
  { email: 'admin@demo.brink.test', heading: 'Administrator' },
  { email: 'coordinator@demo.brink.test', heading: 'Temporary works coordinator' },
  { email: 'supervisor@demo.brink.test', heading: 'Site supervisor' },
  { email: 'operator@demo.brink.test', heading: 'Plant operator' },
];

async function signIn(page: Page, email: string, password: string) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}

/** Through the person's menu on wide screens, or the collapsed menu on phones. */
async function signOut(page: Page) {
  const menu = page.getByRole('button', { name: /^Signed in as / });
  if (await menu.isVisible()) await menu.click();
  else await page.getByRole('button', { name: 'Menu' }).click();
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page.getByRole('heading', { name: 'Sign in to Brink' })).toBeVisible();
}

interface CaughtMessage {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
}

/** Waits for the mail catcher to hold a message to this address and gives back the link it carries. */
async function linkFromMail(request: APIRequestContext, to: string, pathPart: string): Promise<string> {
  let link: string | undefined;
  await expect
    .poll(
      async () => {
        const res = await request.get('/api/dev/mail');
        if (!res.ok()) return undefined;
        const { messages } = (await res.json()) as { messages: CaughtMessage[] };
        const message = messages.find((m) => JSON.stringify(m.to).toLowerCase().includes(to.toLowerCase()));
        const found =
          message && `${message.text}\n${message.html ?? ''}`.match(new RegExp(`https?://[^\\s"'<>]*${pathPart}\\?token=[\\w.~%-]+`));
        link = found?.[0];
        return link;
      },
      { message: `a mail to ${to} with a ${pathPart} link`, timeout: 20_000 },
    )
    .toBeTruthy();
  // Open the link on the server under test, whatever host the mail names.
  const url = new URL(link!);
  return url.pathname + url.search;
}

test.describe('signing in', () => {
  for (const person of demoPeople) {
    test(`${person.email} signs in and sees their own dashboard`, async ({ page }) => {
      await signIn(page, person.email, demoPassword);
      await expect(page.getByRole('heading', { level: 2, name: person.heading, exact: true })).toBeVisible();
      await expect(page).toHaveURL(/\/sites\/\d+$/);
      // The other roles' sections are not shown to them.
      for (const other of demoPeople.filter((p) => p !== person)) {
        await expect(page.getByRole('heading', { level: 2, name: other.heading, exact: true })).toHaveCount(0);
      }
      await expect(page.getByText(/never replace the support's design/)).toBeVisible();
    });
  }

  test('a wrong password is refused with a message, and the e-mail stays', async ({ page }) => {
    await signIn(page, 'supervisor@demo.brink.test', 'not-the-password');
    await expect(page.getByRole('alert')).toContainText(/\w/);
    await expect(page.getByLabel('E-mail')).toHaveValue('supervisor@demo.brink.test');
    await expect(page).toHaveURL(/\/sign-in/);
  });

  test('a signed-out visitor is sent to sign in, then back to the page they asked for', async ({ page }) => {
    await page.goto('/admin/people');
    await expect(page).toHaveURL(/\/sign-in\?next=%2Fadmin%2Fpeople/);
    await page.getByLabel('E-mail').fill('admin@demo.brink.test');
    await page.getByLabel('Password', { exact: true }).fill(demoPassword);
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await expect(page.getByRole('heading', { level: 1, name: 'People' })).toBeVisible();
  });
});

test('an administrator invites a new person, who sets a password from the e-mailed link and signs in', async ({ page, request }) => {
  const email = `new.operator.${Date.now()}.${Math.floor(Math.random() * 1e6)}@demo.brink.test`;
  const name = 'Robin Newcomer';
  const password = 'a-new-password-for-robin';

  await signIn(page, 'admin@demo.brink.test', demoPassword);
  await expect(page.getByRole('heading', { level: 2, name: 'Administrator' })).toBeVisible();
  await page.goto('/admin/people');
  const form = page.getByRole('form', { name: 'Invite a person' });
  await form.getByLabel('E-mail', { exact: true }).fill(email);
  await form.getByLabel('Name', { exact: true }).fill(name);
  await form.getByLabel('Site', { exact: true }).selectOption({ index: 1 });
  await form.getByLabel('Role on that site').selectOption({ label: 'Plant operator' });
  await form.getByRole('button', { name: 'Send invitation' }).click();
  await expect(page.getByText(`Invitation sent to ${email}`)).toBeVisible();
  await signOut(page);

  const invitation = await linkFromMail(request, email, '/invitations/accept');
  await page.goto(invitation);
  await expect(page.getByRole('heading', { name: 'Join Brink' })).toBeVisible();
  await expect(page.getByText(email)).toBeVisible();
  await expect(page.getByLabel('Your name')).toHaveValue(name);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByLabel('Password again').fill(password);
  await page.getByRole('button', { name: 'Set password and sign in' }).click();
  await expect(page.getByRole('heading', { level: 2, name: 'Plant operator' })).toBeVisible();

  // The link works once.
  await signOut(page);
  await page.goto(invitation);
  await expect(page.getByRole('heading', { name: 'This invitation does not work any more' })).toBeVisible();

  // And the new password signs in.
  await signIn(page, email, password);
  await expect(page.getByRole('heading', { level: 2, name: 'Plant operator' })).toBeVisible();
});
