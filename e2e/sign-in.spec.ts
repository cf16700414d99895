import { test, expect, type Page } from '@playwright/test';
import AxeBuilder from '@axe-core/playwright';
import { DEMO, shot, signIn } from './fixtures';

test('a signed-out visitor is sent to sign-in', async ({ page }) => {
  await page.goto('/workshops');
  await expect(page).toHaveURL(/\/sign-in\?next=/);
  await expect(page.getByRole('heading', { name: 'Sign in to Cairn' })).toBeVisible();
});

test('a wrong password gets a clear message', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(DEMO.facilitator.email);
  await page.getByLabel('Password').fill('not the password');
  await page.getByTestId('submit').click();
  await expect(page.getByTestId('sign-in-error')).toHaveText('That e-mail and password do not match an account.');
  await expect(page).toHaveURL(/\/sign-in/);
  await shot(page, 'sign-in-wrong-password');
});

test('the demo facilitator signs in and sees the demo workshop', async ({ page }) => {
  // The built app must run under Cairn's Content-Security-Policy: no refused script, style, font or image.
  const refused: string[] = [];
  page.on('console', (m) => {
    if (/Content Security Policy/i.test(m.text())) refused.push(m.text());
  });
  await signIn(page, DEMO.facilitator);
  const card = page.getByTestId('workshop-card').filter({ hasText: "A new member's first ride" });
  await expect(card).toBeVisible();
  await expect(card).toContainText('You: lead facilitator');
  await expect(card).toContainText('Lead facilitator: ');
  await shot(page, 'workshops');
  expect(refused).toEqual([]);
  const results = await new AxeBuilder({ page }).analyze();
  const serious = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(serious.map((v) => `${v.id}: ${v.help}`)).toEqual([]);
});

test('the session survives a reload and signing out ends it', async ({ page }) => {
  await signIn(page, DEMO.facilitator);
  await page.reload();
  await expect(page.getByTestId('workshop-card').first()).toBeVisible();
  await page.getByTestId('sign-out').click();
  await expect(page).toHaveURL(/\/sign-in/);
  await page.goto('/workshops');
  await expect(page).toHaveURL(/\/sign-in/);
});

/** Whatever of a catalog's key ("adminAccounts.title") shows on the page instead of its message. */
async function keysShown(page: Page): Promise<string[]> {
  const text = await page.locator('body').innerText();
  return text.match(/\b(?:topBar|account|signUp|forgotPassword|resetPassword|invitation|adminAccounts|devInbox|notFound|problem\w*)\.[\w.]+/g) ?? [];
}

test('the account pages speak from the catalogs: sign-up, passwords, invitation, account, accounts, dev inbox, not found', async ({ page }) => {
  await signIn(page, DEMO.admin);
  await page.goto('/admin/accounts');
  await expect(page.getByRole('heading', { name: 'Accounts', exact: true })).toBeVisible();
  await expect(page.getByRole('columnheader', { name: 'May sign in' })).toBeVisible();
  // Each global role by its name, not its code.
  await expect(page.getByLabel(/^Role of /).first()).toHaveValue(/^(Admin|Facilitator|Invited only)$/);
  expect(await keysShown(page)).toEqual([]);
  await shot(page, 'admin-accounts');
  await page.goto('/account');
  await expect(page.getByRole('heading', { name: 'Your account' })).toBeVisible();
  await expect(page.getByRole('link', { name: /^Your account: / })).toBeVisible();
  await page.getByLabel('Current password').fill('not the password');
  await page.getByLabel('New password (at least 10 characters)').fill('a long enough new password');
  await page.getByRole('button', { name: 'Change password' }).click();
  await expect(page.locator('.q-banner[role=alert]')).not.toBeEmpty();
  expect(await keysShown(page)).toEqual([]);
  await shot(page, 'account');
  await page.goto('/dev/inbox');
  await expect(page.getByRole('heading', { name: 'Dev inbox' })).toBeVisible();
  expect(await keysShown(page)).toEqual([]);
  await page.getByTestId('sign-out').click();
  await expect(page).toHaveURL(/\/sign-in/);

  for (const [url, heading] of [
    ['/sign-up', 'Create a facilitator account'],
    ['/forgot-password', 'Reset your password'],
    ['/reset-password?token=x&account=ana.lima%40harbourlane.example', 'Choose a new password'],
    ['/invitations/accept?token=not-a-real-token', 'Your invitation'],
    ['/no/such/page', 'Nothing here'],
  ] as const) {
    await page.goto(url);
    await expect(page.getByRole('heading', { name: heading })).toBeVisible();
    if (url.startsWith('/invitations')) await expect(page.locator('.q-banner[role=alert]')).not.toBeEmpty();
    if (url.startsWith('/reset-password')) await expect(page.getByTestId('reset-account')).toHaveText('For the Cairn account ana.lima@harbourlane.example.');
    expect(await keysShown(page)).toEqual([]);
    await shot(page, `page${url.split('?')[0]!.replace(/\//g, '-')}`);
  }
  // A reset link asked for says the same whatever the address (no account is given away).
  await page.goto('/forgot-password');
  await page.getByLabel('E-mail').fill('nobody@harbourlane.example');
  await page.getByRole('button', { name: 'Send the link' }).click();
  await expect(page.getByRole('status')).toHaveText('If an account uses that e-mail, a reset link is on its way. It works for one hour.');
});
