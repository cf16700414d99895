import { test, expect, type Page } from '@playwright/test';
import { rehearseOwnWorkshop, shot } from './fixtures';

/** The boxes of the first screen's parts: the painted ones (no `data-test`) or the page's own. */
async function boxes(page: Page, painted: boolean) {
  const sel = painted
    ? { title: '.cairn-activity-card h1', clock: '.cairn-phone-countdown', prompt: '.cairn-prompt', card: '.cairn-activity-card', name: '.cairn-phone-top > .cairn-me-name' }
    : { title: '[data-test=phone-activity]', clock: '[data-test=countdown]', prompt: '[data-test=phone-prompt]', card: '.cairn-activity-card', name: '[data-test=me-name]' };
  const out: Record<string, { x: number; y: number; width: number; height: number; text: string }> = {};
  for (const [part, s] of Object.entries(sel)) {
    const el = page.locator(s).first();
    const box = (await el.boundingBox())!;
    out[part] = { ...box, text: part === 'clock' || part === 'card' ? '' : (await el.innerText()).trim() };
  }
  return out;
}

test('a joined phone paints its kept screen before its scripts arrive, in the same places as the page, and a stranger gets nothing of it', async ({
  browser,
  request,
  baseURL,
}) => {
  test.setTimeout(120_000);
  const { auth, workshopId, live, facilitator } = await rehearseOwnWorkshop(request, baseURL!, 'First screen for a first ride', 'Check the phone paints at once');
  const goto = async (index: number) => {
    const answer = (await facilitator.timeout(10_000).emitWithAck('session:goto', { index })) as { data: { item: { title: string } } };
    return answer.data.item.title;
  };

  // A participant joins and follows the session: the page keeps its first screen as it shows it.
  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true, serviceWorkers: 'block' });
  const page = await context.newPage();
  await page.goto(`/join/${live.joinCode}`);
  // A long name: it takes the top line of its own, above the controls, and the painted row keeps that height.
  await page.getByLabel('Your name for today').fill('Ines Marguerite Okonkwo-Fairweather Lund');
  await page.getByTestId('consent-yes').click();
  await page.getByTestId('join').click();
  await expect(page.getByTestId('connection')).toHaveText('Connected');
  const title = await goto(1);
  await expect(page.getByTestId('phone-activity')).toHaveText(title);
  const sessionId = new URL(page.url()).pathname.split('/')[2]!;
  await expect.poll(() => page.evaluate((id) => JSON.parse(localStorage.getItem(`cairn.screen.${id}`) ?? '{}').title, sessionId)).toBe(title);
  const mounted = await boxes(page, false);

  // A reload whose app script is held back: the HTML's own script has painted the kept screen meanwhile.
  let release: () => void = () => undefined;
  const held = new Promise<void>((resolve) => (release = resolve));
  await page.route(/\/assets\/index-[^/]+\.js$/, async (route) => {
    await held;
    await route.continue();
  });
  await page.reload({ waitUntil: 'commit' });
  await expect(page.locator('.cairn-prompt')).toBeVisible();
  await expect(page.getByTestId('phone-prompt')).toHaveCount(0);
  await shot(page, 'phone-first-screen-painted');
  const painted = await boxes(page, true);
  release();
  await expect(page.getByTestId('connection')).toHaveText('Connected');
  await shot(page, 'phone-first-screen-mounted');
  const after = await boxes(page, false);

  // The same texts in the same boxes (within a pixel): the page's mount moves nothing and grows nothing.
  for (const [part, box] of Object.entries(painted)) {
    for (const b of [mounted[part]!, after[part]!]) {
      expect(Math.abs(box.x - b.x), `${part} x`).toBeLessThanOrEqual(1);
      expect(Math.abs(box.y - b.y), `${part} y`).toBeLessThanOrEqual(1);
      // The name's box is narrower once the connection, language and settings controls stand beside it.
      if (part !== 'name') expect(Math.abs(box.width - b.width), `${part} width`).toBeLessThanOrEqual(1);
      expect(Math.abs(box.height - b.height), `${part} height`).toBeLessThanOrEqual(1);
      expect(box.text, `${part} text`).toBe(b.text);
    }
  }
  await page.unroute(/\/assets\/index-[^/]+\.js$/);

  // Another browser holding the kept screen but not the participant's token paints nothing of the session,
  // and the HTML the server sends for the phone page holds nothing of it either.
  const kept = await page.evaluate((id) => localStorage.getItem(`cairn.screen.${id}`)!, sessionId);
  const stranger = await browser.newContext({ serviceWorkers: 'block' });
  await stranger.addInitScript(([key, value]) => localStorage.setItem(key!, value!), [`cairn.screen.${sessionId}`, kept]);
  const other = await stranger.newPage();
  await other.route(/\/assets\/index-[^/]+\.js$/, (route) => route.abort());
  await other.goto(`/phone/${sessionId}`);
  await expect(other.locator('.cairn-boot')).toBeVisible();
  await expect(other.locator('.cairn-prompt')).toHaveCount(0);
  const html = await (await request.get(`/phone/${sessionId}`)).text();
  expect(html).not.toContain(title);
  await stranger.close();

  facilitator.disconnect();
  await context.close();
  await request.post(`/api/workshops/${workshopId}/live/stop`, { headers: auth });
});
