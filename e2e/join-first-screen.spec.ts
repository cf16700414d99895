import { test, expect, type Browser, type Page } from '@playwright/test';
import { shot } from './fixtures';

const APP_SCRIPT = /\/assets\/index-[^/]+\.js$/;

/** The join screen's parts: the painted ones (the painted screen has no `data-test`) and the page's own. */
const PARTS = {
  heading: 'main h1',
  help: '.join-form > p',
  field: '.join-form label.q-field',
  label: '.join-form .q-field__label',
  input: '.join-form input',
  button: '.join-form button',
  picker: '.language-picker select',
};

async function boxes(page: Page) {
  const out: Record<string, { x: number; y: number; width: number; height: number; text: string; colours: string }> = {};
  for (const [part, s] of Object.entries(PARTS)) {
    const el = page.locator(s).first();
    const box = (await el.boundingBox())!;
    const text = part === 'input' || part === 'picker' ? await el.inputValue() : (await el.innerText()).trim();
    const colours = await el.evaluate((e) => `${getComputedStyle(e).color} on ${getComputedStyle(e).backgroundColor}`);
    out[part] = { ...box, text, colours };
  }
  return out;
}

/** The layout shifts the page has seen so far (CLS's sum, without its session windows). */
const shifts = (page: Page) =>
  page.evaluate(
    () =>
      new Promise<number>((resolve) => {
        new PerformanceObserver((list) => {
          resolve(list.getEntries().reduce((sum, e) => sum + (e as PerformanceEntry & { value: number }).value, 0));
        }).observe({ type: 'layout-shift', buffered: true });
        setTimeout(() => resolve(0), 500);
      }),
  );

/**
 * Opens `path` with the app's script held back: what shows is the shell's painted join screen. Then lets the
 * script through and returns the painted and the mounted boxes (the join code's look-up held back too, so the
 * page shows the code form).
 */
async function paintedThenMounted(browser: Browser, path: string, options: { locale?: string; picked?: string } = {}) {
  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true, serviceWorkers: 'block', locale: options.locale });
  if (options.picked) await context.addInitScript((l) => localStorage.setItem('cairn.locale', l), options.picked);
  const page = await context.newPage();
  let release: () => void = () => undefined;
  const held = new Promise<void>((resolve) => (release = resolve));
  await page.route(APP_SCRIPT, async (route) => {
    await held;
    await route.continue();
  });
  await page.route(/\/api\/join\//, () => undefined);
  const asked: string[] = [];
  page.on('request', (r) => asked.push(new URL(r.url()).pathname));
  await page.goto(path, { waitUntil: 'commit' });
  await expect(page.locator('main h1')).toBeVisible();
  await expect(page.getByTestId('join-code')).toHaveCount(0);
  // A picture of the form until the page replaces it: nothing in it takes focus or input.
  expect(await page.locator('main.cairn-phone-page').evaluate((m: HTMLElement) => m.inert)).toBe(true);
  const painted = await boxes(page);
  const paintedLang = await page.evaluate(() => document.documentElement.lang);
  // Once painted, the shell asks for the join page's files without waiting for the first script.
  await expect.poll(() => asked.some((p) => /^\/assets\/phone-join-[^/]+\.js$/.test(p))).toBe(true);
  await shot(page, `join-first-screen-painted${path.replace(/\//g, '-')}${options.locale ? `-${options.locale}` : ''}${options.picked ? `-${options.picked}` : ''}`);
  release();
  await expect(page.getByTestId('join-code')).toBeVisible();
  // The fonts and the page's own styles settled.
  await page.evaluate(() => document.fonts.ready);
  await page.waitForTimeout(300);
  const mounted = await boxes(page);
  return { context, page, painted, mounted, paintedLang };
}

function expectSameBoxes(painted: Awaited<ReturnType<typeof boxes>>, mounted: Awaited<ReturnType<typeof boxes>>) {
  for (const [part, box] of Object.entries(painted)) {
    const b = mounted[part]!;
    expect(Math.abs(box.x - b.x), `${part} x`).toBeLessThanOrEqual(1);
    expect(Math.abs(box.y - b.y), `${part} y`).toBeLessThanOrEqual(1);
    expect(Math.abs(box.width - b.width), `${part} width`).toBeLessThanOrEqual(1);
    expect(Math.abs(box.height - b.height), `${part} height`).toBeLessThanOrEqual(1);
    expect(box.text, `${part} text`).toBe(b.text);
    expect(box.colours, `${part} colours`).toBe(b.colours);
  }
}

test('the join screen is painted from the shell before the scripts arrive, in the boxes and words the page then shows', async ({ browser }) => {
  const { context, page, painted, mounted, paintedLang } = await paintedThenMounted(browser, '/join');
  expect(painted.heading!.text).toBe('Join the workshop');
  expect(paintedLang).toBe('en');
  expectSameBoxes(painted, mounted);
  await shot(page, 'join-first-screen-mounted');
  // The page's mount moved nothing.
  expect(await shifts(page)).toBeLessThan(0.01);
  // The page's own form works: it is not the painted picture.
  await page.getByTestId('join-code').fill('zz');
  await expect(page.getByTestId('join-code')).toHaveValue('zz');
  await context.close();
});

test("the join screen is painted in the phone's language: the browser's, or the one picked on the phone", async ({ browser }) => {
  const german = await paintedThenMounted(browser, '/join', { locale: 'de-DE' });
  expect(german.painted.heading!.text).toBe('Beim Workshop mitmachen');
  expect(german.paintedLang).toBe('de');
  expect(german.painted.picker!.text).toBe('de');
  expectSameBoxes(german.painted, german.mounted);
  await german.context.close();

  const picked = await paintedThenMounted(browser, '/join', { locale: 'de-DE', picked: 'es' });
  expect(picked.painted.heading!.text).toBe('Participa en el taller');
  expect(picked.paintedLang).toBe('es');
  expectSameBoxes(picked.painted, picked.mounted);
  await picked.context.close();
});

test('a join link paints the code form holding its code, as the page shows it while it looks the code up', async ({ browser, request }) => {
  const { context, page, painted, mounted } = await paintedThenMounted(browser, '/join/K7Q2M');
  expect(painted.input!.text).toBe('K7Q2M');
  expectSameBoxes(painted, mounted);
  expect(await shifts(page)).toBeLessThan(0.01);
  await context.close();
  // The words are the catalogs', never a session's: the HTML is the same shell for any code.
  const one = await (await request.get('/join/K7Q2M')).text();
  expect(await (await request.get('/join')).text()).toBe(one);
});

test("the painted heading waits for its font, so that the page's own heading is no larger a paint than it", async ({ browser }) => {
  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true, serviceWorkers: 'block' });
  const page = await context.newPage();
  let release: () => void = () => undefined;
  const held = new Promise<void>((resolve) => (release = resolve));
  await page.route(/\.woff2$/, async (route) => {
    await held;
    await route.continue();
  });
  await page.route(APP_SCRIPT, (route) => route.abort());
  await page.goto('/join', { waitUntil: 'commit' });
  await expect(page.locator('.join-form > p')).toBeVisible();
  await expect(page.locator('main h1')).toBeHidden();
  release();
  await expect(page.locator('main h1')).toBeVisible();
  // The largest paint is the painted heading, drawn in Cairn's font once the font came. Its entry
  // is reported after the frame that shows it is presented, which can be a frame after the heading
  // turned visible, so the check reads the entries again until they settle.
  const largest = () =>
    page.evaluate(
      () =>
        new Promise<string>((resolve) => {
          new PerformanceObserver((list) => resolve((list.getEntries().at(-1) as (PerformanceEntry & { element?: Element }) | undefined)?.element?.outerHTML ?? '')).observe({ type: 'largest-contentful-paint', buffered: true });
        }),
    );
  await expect.poll(largest, { timeout: 5_000 }).toMatch(/^<h1 class="col text-h5[^"]*"/);
  await context.close();
});
