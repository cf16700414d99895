import { expect, type APIRequestContext, type Browser, type Page } from '@playwright/test';
import { io as ioClient } from 'socket.io-client';
import AxeBuilder from '@axe-core/playwright';
import fs from 'node:fs';
import path from 'node:path';
import { PNG } from 'pngjs';

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

/** No serious or critical accessibility violations on the page (axe-core). */
export async function expectAccessible(page: Page): Promise<void> {
  const results = await new AxeBuilder({ page }).analyze();
  const bad = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(bad.map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`)).toEqual([]);
}

/** A phone in its own browser context (phone-sized, touch) that joins the live session with a name and a photo-consent answer. */
export async function joinPhone(browser: Browser, joinUrl: string, name: string, consent = true): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
  const page = await context.newPage();
  await page.goto(joinUrl);
  await page.getByLabel('Your name for today').fill(name);
  await page.getByTestId(consent ? 'consent-yes' : 'consent-no').click();
  await page.getByTestId('join').click();
  await expect(page.getByTestId('connection')).toHaveText('Connected');
  return page;
}

/**
 * Presses "Run live" on a workshop's plan page and leaves the start dialog open. Where an earlier
 * browser test left the workshop live, the console reopens that session: it is ended first, as a
 * facilitator would before the day, so every test starts a fresh session.
 */
export async function openStartDialog(page: Page): Promise<void> {
  const dialog = page.getByRole('radio', { name: 'A rehearsal' });
  const running = page.getByTestId('stop-session');
  await page.getByTestId('run-live').click();
  await dialog.or(running).first().waitFor();
  if (await dialog.isVisible()) return;
  await running.click();
  await page.getByRole('dialog').getByRole('button', { name: 'End the live session' }).click();
  await page.getByTestId('run-live').click();
  await dialog.waitFor();
}

/** Presses "Run live" on a workshop's plan page and starts the session as a rehearsal or the day. */
export async function runLive(page: Page, kind: 'rehearsal' | 'day' = 'day'): Promise<void> {
  await openStartDialog(page);
  await page.getByRole('radio', { name: kind === 'day' ? 'The day itself' : 'A rehearsal' }).click();
  await page.getByRole('button', { name: 'Start the session' }).click();
}

/**
 * A workshop of the spec's own from the half-day template, live as a rehearsal, with the facilitator's
 * socket watching it: what the phone specs start from.
 */
export async function rehearseOwnWorkshop(request: APIRequestContext, baseURL: string, title: string, objective: string) {
  const { accessToken } = (await (await request.post('/api/auth/sign-in', { data: DEMO.facilitator })).json()) as { accessToken: string };
  const auth = { Authorization: `Bearer ${accessToken}` };
  const created = await request.post('/api/workshops', {
    headers: auth,
    data: { title, objective, date: '2026-12-03', headcount: 12, templateId: 'half-day' },
  });
  expect(created.status()).toBe(201);
  const { id: workshopId } = (await created.json()) as { id: string };
  const live = (await (await request.post(`/api/workshops/${workshopId}/live`, { headers: auth, data: { kind: 'rehearsal' } })).json()) as {
    sessionId: string;
    joinCode: string;
  };
  const facilitator = ioClient(baseURL, { auth: { token: accessToken }, transports: ['websocket'] });
  await facilitator.timeout(10_000).emitWithAck('session:watch', { sessionId: live.sessionId });
  return { auth, workshopId, live, facilitator };
}

/**
 * A small PNG made here: a sketch sheet of eight boxes on white, `scale` times the 160×80 sheet (its box
 * lines 2 px wide at scale 1, 3 px at scale 2).
 */
export function sketchPng(scale = 1): Buffer {
  const width = 160 * scale;
  const height = 80 * scale;
  const box = 40 * scale;
  const lineWidth = scale === 1 ? 2 : 3;
  const png = new PNG({ width, height });
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const line = x % box < lineWidth || y % box < lineWidth;
      const i = (y * width + x) * 4;
      png.data[i] = png.data[i + 1] = png.data[i + 2] = line ? 30 : 250;
      png.data[i + 3] = 255;
    }
  }
  return PNG.sync.write(png);
}
