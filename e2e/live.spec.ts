import { test, expect, type Browser, type Page } from '@playwright/test';
import { PNG } from 'pngjs';
import jsQR from 'jsqr';
import { DEMO, expectAccessible, runLive, shot, signIn } from './fixtures';

/** Parses a countdown label (MM:SS or H:MM:SS) into seconds. */
function seconds(label: string): number {
  return label
    .trim()
    .split(':')
    .map(Number)
    .reduce((acc, n) => acc * 60 + n, 0);
}

async function phone(browser: Browser, joinUrl: string, name: string, consent: boolean): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
  const page = await context.newPage();
  await page.goto(joinUrl);
  await expect(page.getByTestId('join-title')).toHaveText("A new member's first ride");
  await page.getByLabel('Your name for today').fill(name);
  await page.getByTestId(consent ? 'consent-yes' : 'consent-no').click();
  await page.getByTestId('join').click();
  await expect(page.getByTestId('phone-activity')).toBeVisible();
  await expect(page.getByTestId('connection')).toHaveText('Connected');
  return page;
}

test('a live run: QR join, two phones, advancing, countdowns that agree, and a phone that comes back', async ({ browser }) => {
  test.setTimeout(120_000);
  // The facilitator's tablet.
  const consoleContext = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const consolePage = await consoleContext.newPage();
  await signIn(consolePage, DEMO.facilitator);
  await consolePage.getByRole('link', { name: "A new member's first ride" }).click();
  await runLive(consolePage);
  await expect(consolePage.getByTestId('console-activity')).toBeVisible();
  const code = (await consolePage.getByTestId('console-code').textContent())!.trim();
  expect(code).toMatch(/^[23456789ABCDEFGHJKMNPQRSTUVWXYZ]{7}$/);

  // The projector, opened from the console.
  const projectorUrl = await consolePage.getByTestId('open-projector').getAttribute('href');
  const projector = await consoleContext.newPage();
  await projector.setViewportSize({ width: 1600, height: 900 });
  await projector.goto(projectorUrl!);
  await expect(projector.getByTestId('projector-code')).toHaveText(code);
  const qr = projector.getByTestId('projector-qr');
  await expect(qr).toBeVisible();
  await expect.poll(async () => qr.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth > 0)).toBe(true);

  // Decode the QR code as a phone's camera would (ISO/IEC 18004, read by jsQR).
  const png = PNG.sync.read(await qr.screenshot());
  const decoded = jsQR(new Uint8ClampedArray(png.data), png.width, png.height);
  expect(decoded?.data).toMatch(new RegExp(`/join/${code}$`));
  const joinUrl = decoded!.data;

  const phoneA = await phone(browser, joinUrl, 'Ana', true);
  const phoneB = await phone(browser, joinUrl, 'Ben', false);
  await expect(projector.getByTestId('projector-joined')).toHaveText('2 people here');
  await expect(consolePage.getByTestId('online-count')).toHaveText('2');

  // Advance: both phones and the projector show the new activity within a second.
  const welcome = (await consolePage.getByTestId('console-activity').textContent())!.trim();
  await consolePage.getByTestId('next').click();
  await expect(consolePage.getByTestId('console-activity')).not.toHaveText(welcome);
  const title = (await consolePage.getByTestId('console-activity').textContent())!.trim();
  for (const p of [phoneA, phoneB]) await expect(p.getByTestId('phone-activity')).toHaveText(title, { timeout: 1000 });
  await expect(projector.getByTestId('projector-activity')).toHaveText(title, { timeout: 1000 });

  // Start the shared countdown: every screen shows the same second (within one).
  await consolePage.getByTestId('start-timer').click();
  await expect(consolePage.getByTestId('pause')).toBeVisible();
  await phoneA.waitForTimeout(600);
  const labels = await Promise.all([consolePage, projector, phoneA, phoneB].map((p) => p.getByTestId('countdown').textContent()));
  const secs = labels.map((l) => seconds(l!));
  expect(Math.max(...secs) - Math.min(...secs)).toBeLessThanOrEqual(1);

  await shot(consolePage, 'live-console');
  await shot(projector, 'live-projector');
  await shot(phoneA, 'live-phone');
  await expectAccessible(consolePage);
  await expectAccessible(projector);
  await expectAccessible(phoneA);

  // Phone B loses the network; the facilitator moves on; phone B comes back on the current item.
  await phoneB.context().setOffline(true);
  await expect(phoneB.getByTestId('connection')).toHaveText('Reconnecting…', { timeout: 30_000 });
  await consolePage.getByTestId('next').click();
  await expect(consolePage.getByTestId('console-activity')).not.toHaveText(title);
  const third = (await consolePage.getByTestId('console-activity').textContent())!.trim();
  await expect(phoneA.getByTestId('phone-activity')).toHaveText(third, { timeout: 1000 });
  await phoneB.context().setOffline(false);
  await expect(phoneB.getByTestId('connection')).toHaveText('Connected', { timeout: 20_000 });
  await expect(phoneB.getByTestId('phone-activity')).toHaveText(third);

  // A short message reaches every phone.
  await consolePage.getByLabel('Message to all phones').fill('Coffee is in the hall');
  await consolePage.getByTestId('send-message').click();
  await expect(phoneA.getByTestId('phone-message')).toContainText('Coffee is in the hall');
});
