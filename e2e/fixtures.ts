import type { Page } from '@playwright/test';
import fs from 'node:fs';
import path from 'node:path';

/** The demo accounts seeded on first start (see server/db/seed.ts and the README). */
export const DEMO = {
  facilitator: { email: 'mira@harbourlane.example', password: 'demo-facilitator-2026' },
  observer: { email: 'tomas@harbourlane.example', password: 'demo-observer-2026' },
  admin: { email: 'admin@harbourlane.example', password: 'demo-admin-2026' },
};

/** Where screenshots are kept as test artifacts. */
export const SHOTS = '.test-output/screenshots';

/** Saves a full-page screenshot under the test output. */
export async function shot(page: Page, name: string): Promise<void> {
  fs.mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage: true });
}

/** Signs in through the sign-in page. */
export async function signIn(page: Page, who: { email: string; password: string }): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(who.email);
  await page.getByLabel('Password').fill(who.password);
  await page.getByTestId('submit').click();
  await page.waitForURL(/\/workshops/);
}
