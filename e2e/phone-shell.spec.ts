import { test, expect } from '@playwright/test';
import { rehearseOwnWorkshop } from './fixtures';

test('a phone never asks for the sign-in cookie, keeps its shell, shows its screen offline after a reload, and catches up when back', async ({
  browser,
  request,
  baseURL,
}) => {
  test.setTimeout(120_000);
  // The facilitator's side through the API and a socket: a workshop of its own, from a template, live.
  const { auth, workshopId, live, facilitator } = await rehearseOwnWorkshop(request, baseURL!, 'Shell check for a first ride', 'Check the phone keeps its shell');
  const goto = async (index: number) => {
    const answer = (await facilitator.timeout(10_000).emitWithAck('session:goto', { index })) as { data: { item: { title: string } } };
    return answer.data.item.title;
  };

  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
  const page = await context.newPage();
  const asked: string[] = [];
  page.on('request', (r) => asked.push(new URL(r.url()).pathname));
  await page.goto(`/join/${live.joinCode}`);
  await page.getByLabel('Your name for today').fill('Ines');
  await page.getByTestId('consent-yes').click();
  await page.getByTestId('join').click();
  await expect(page.getByTestId('connection')).toHaveText('Connected');
  const second = await goto(1);
  await expect(page.getByTestId('phone-activity')).toHaveText(second);

  // The phone's screens, their lazily loaded parts included, never fetched the whole stylesheet.
  expect(asked.filter((p) => /^\/assets\/index-[^/]+\.css$/.test(p))).toEqual([]);

  // The service worker took the shell; the installable manifest is linked.
  await page.evaluate(async () => navigator.serviceWorker.ready);
  await expect.poll(() => page.evaluate(() => navigator.serviceWorker.controller !== null)).toBe(true);
  const manifest = (await (await request.get('/manifest.webmanifest')).json()) as { start_url: string; display: string; icons: { sizes: string }[] };
  expect(manifest).toMatchObject({ start_url: '/join', display: 'standalone' });
  expect(manifest.icons.map((i) => i.sizes)).toEqual(expect.arrayContaining(['192x192', '512x512']));

  // Offline: a reload shows the last screen at once, from the cache, and says it is reconnecting.
  await context.setOffline(true);
  await page.reload();
  await expect(page.getByTestId('phone-activity')).toHaveText(second);
  await expect(page.getByTestId('connection')).toHaveText('Reconnecting…');
  // From the cache the phone page's own shell, with the phone's stylesheet in it: the component library's rules apply.
  await expect(page.locator('style[data-cairn-phone]')).toHaveCount(1);
  expect(await page.locator('.q-card').first().evaluate((e) => getComputedStyle(e).position)).toBe('relative');
  const third = await goto(2);

  // Back online: the socket connects and the phone catches up with what it missed.
  await context.setOffline(false);
  await expect(page.getByTestId('connection')).toHaveText('Connected', { timeout: 20_000 });
  await expect(page.getByTestId('phone-activity')).toHaveText(third);

  // A phone has no account: it never asked for the sign-in cookie's refresh.
  expect(asked.filter((p) => p.startsWith('/api/auth/'))).toEqual([]);
  // Neither the API nor the socket was answered from the cache: both went to the server.
  expect(asked.some((p) => p.startsWith('/api/join/'))).toBe(true);

  facilitator.disconnect();
  await context.close();
  await request.post(`/api/workshops/${workshopId}/live/stop`, { headers: auth });
});

test("a phone route's page carries the phone's part of the stylesheet; a screen that is not a phone's gets the whole one", async ({ page, request }) => {
  const shell = await (await request.get('/join')).text();
  const whole = /<link rel="stylesheet" crossorigin href="(\/assets\/index-[^"]+\.css)" type="text\/x-cairn-later" data-cairn-whole>/.exec(shell)?.[1];
  expect(whole, 'the /join shell keeps the whole stylesheet, typed so that no browser loads it').toBeTruthy();
  // Every other path's shell links it as it is.
  expect(await (await request.get('/sign-in')).text()).toContain(`<link rel="stylesheet" crossorigin href="${whole}">`);
  const phoneCss = /<style data-cairn-phone>([\s\S]*?)<\/style>/.exec(shell)![1]!;
  const wholeCss = await (await request.get(whole!)).text();
  expect(phoneCss.length).toBeLessThan(wholeCss.length / 2);

  const asked: string[] = [];
  page.on('request', (r) => asked.push(new URL(r.url()).pathname));
  await page.setViewportSize({ width: 360, height: 640 });
  await page.goto('/join');
  await expect(page.getByTestId('join-code')).toBeVisible();
  expect(asked).not.toContain(whole);
  // The join form is laid out by the component library's rules: the outlined field's control is a flex box.
  expect(await page.locator('.join-form .q-field__control').first().evaluate((e) => getComputedStyle(e).display)).toBe('flex');

  // Off to a facilitator's screen without a new page (as a link in the app would): the whole stylesheet comes first.
  await page.evaluate(() => {
    history.pushState(null, '', '/sign-in');
    dispatchEvent(new PopStateEvent('popstate'));
  });
  await expect(page.getByTestId('submit')).toBeVisible();
  expect(asked).toContain(whole);
  expect(await page.locator(`link[rel=stylesheet][href="${whole}"]`).evaluate((l: HTMLLinkElement) => l.sheet !== null)).toBe(true);
});
