import { test, expect } from '@playwright/test';
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
