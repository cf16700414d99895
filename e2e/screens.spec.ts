import { test, expect, type APIRequestContext, type Page } from '@playwright/test';
import { io, type Socket } from 'socket.io-client';
import fs from 'node:fs';
import path from 'node:path';
import { DEMO, sketchPng } from './fixtures';

/*
 * Every screen of the room with the longest content Cairn accepts, at the sizes a real room
 * has: projectors 1920×1080, 1280×720, 1024×768 (common
 * projector resolutions), tablets 820×1180, 1180×820, 1024×768, 768×1024 (common tablet viewports,
 * portrait and landscape), phones 360×640, 390×844, 412×915 (common phone viewports). The content is
 * seeded through the API and real socket connections, not typed, so the walk stays quick.
 */
const PROJECTORS = [
  { width: 1920, height: 1080 },
  { width: 1280, height: 720 },
  { width: 1024, height: 768 },
];
const TABLETS = [
  { width: 820, height: 1180 },
  { width: 1180, height: 820 },
  { width: 1024, height: 768 },
  { width: 768, height: 1024 },
];
const PHONES = [
  { width: 360, height: 640 },
  { width: 390, height: 844 },
  { width: 412, height: 915 },
];
/**
 * ANSI/INFOCOMM V202.01 (DISCAS), basic decision-making: element height = farthest viewer ÷ 200; with
 * the farthest viewer at 6 image heights (the usual reading limit) that is 6/200 = 3 % of the image
 * height, 32.4 px at 1080p.
 */
const MIN_TEXT_SHARE = 0.03;
/** WCAG 2.2 success criterion 2.5.5 (Target Size, enhanced): 44 × 44 CSS px. */
const MIN_TARGET = 44;
const SHOTS = '.test-output/screens';

// Cairn's own limits (shared/schemas): 120-character titles, 1,000-character prompts, 500-character notes, 30 options of 300 characters.
const fill = (seed: string, n: number) => {
  let s = seed;
  while (s.length < n) s += ` ${seed}`;
  return s.slice(0, n).trimEnd().padEnd(n, '.');
};
// Not the demo workshop's own title inside it: later specs find the demo workshop by its name.
const TITLE = (what: string) => fill(`${what}: the first ride of someone who just joined Harbour Lane Bike Co-op, from the app to the dock and back`, 120);
const PROMPT = fill(
  'Think of the first ride of a new member of the co-op: finding the dock, unlocking the bike, choosing a calm route, parking it again and knowing it is locked. Write what you heard, saw and felt, in your own words, one thought a note.',
  1000,
);
const NOTE = (i: number) => fill(`Note ${i + 1}: the dock near the harbour was full and nobody told the new member where the next free one was`, 500);
const OPTION = (i: number) => fill(`Option ${i + 1}: how might we help a new member find a free dock near home so that the first ride ends well`, 300);
const NAMES = ['Ana Ferreira-Lindqvist of the harbour docks', 'Ben', 'Cleo Marchetti-Oyelaran, volunteer mechanic', 'Dev', 'Eli Nakamura-Sørensen from the front desk', 'Fay'].map((n) => n.slice(0, 40));

type Sock = Socket;
/** Sends a socket command and returns its data, failing on a refusal. */
async function cmd<T = unknown>(s: Sock, event: string, payload: unknown = {}): Promise<T> {
  const answer = (await s.timeout(5000).emitWithAck(event, payload)) as { data?: T; error?: { code: string; message: string } };
  if (answer.error) throw new Error(`${event} was refused: ${answer.error.code} ${answer.error.message}`);
  return answer.data as T;
}
function connect(baseURL: string, token: string): Promise<Sock> {
  const s = io(baseURL, { auth: { token }, transports: ['websocket'], reconnection: false, forceNew: true });
  return new Promise((resolve, reject) => {
    s.once('connect', () => resolve(s));
    s.once('connect_error', reject);
  });
}


interface Problems {
  crossing: string[];
  clipped: string[];
  smallText: string[];
  smallTargets: string[];
  minTextPx: number;
}

/**
 * What is wrong with the screen as laid out now, measured in the page from bounding boxes:
 * elements crossing the viewport (sideways always; top and bottom too on the projector, which never
 * scrolls), text cut by its box (scrollWidth against clientWidth), text under the size limit, tap targets
 * under 44 px. Elements entirely outside a clipping ancestor (the projector's other pages) count as not shown.
 */
async function problems(page: Page, screen: 'projector' | 'console' | 'phone', minTextPx = 0): Promise<Problems> {
  return page.evaluate(
    ({ screen, minTextPx, minTarget }) => {
      const vw = document.documentElement.clientWidth;
      const vh = window.innerHeight;
      const out = { crossing: [] as string[], clipped: [] as string[], smallText: [] as string[], smallTargets: [] as string[], minTextPx: Infinity };
      const name = (el: Element) => {
        const t = el.getAttribute('data-test');
        const c = typeof el.className === 'string' ? el.className.split(' ').filter(Boolean).slice(0, 2).join('.') : '';
        return `${el.tagName.toLowerCase()}${t ? `[${t}]` : ''}${c ? `.${c}` : ''} "${(el.textContent ?? '').trim().slice(0, 30)}"`;
      };
      type Box = { left: number; top: number; right: number; bottom: number };
      const meet = (a: Box | null, b: Box): Box =>
        a ? { left: Math.max(a.left, b.left), top: Math.max(a.top, b.top), right: Math.min(a.right, b.right), bottom: Math.min(a.bottom, b.bottom) } : b;
      // One walk down the tree, carrying what clipping ancestors leave visible (`clip`) and what hiding ones do (`cut`).
      const walk = (el: Element, clip: Box | null, cut: Box | null, hiddenAbove: boolean) => {
        const cs = getComputedStyle(el);
        if (cs.display === 'none') return;
        const r = el.getBoundingClientRect();
        const hidden = hiddenAbove || cs.visibility === 'hidden' || cs.opacity === '0';
        const inSvg = el.tagName.toLowerCase() !== 'svg' && el.closest('svg') !== null;
        // A box split over the projector's pages has one rect a page: only the fragments on the page shown count.
        const outside = (f: DOMRect) => clip !== null && (f.right <= clip.left + 1 || f.left >= clip.right - 1 || f.bottom <= clip.top + 1 || f.top >= clip.bottom - 1);
        const fragments = Array.from(el.getClientRects()).filter((f) => f.width > 2 && f.height > 2 && !outside(f));
        if (!hidden && !inSvg && fragments.length && el.getAttribute('data-test') !== 'fit-track') {
          // What a scrolling panel shows is what counts for crossing; a box cut by a hiding one is clipped.
          check(el, cs, fragments.map((f) => (clip ? meet(clip, f) : f)));
          for (const f of fragments) {
            if (cut && (f.left < cut.left - 1 || f.right > cut.right + 1 || f.top < cut.top - 1 || f.bottom > cut.bottom + 1)) {
              out.clipped.push(`${name(el)} cut at ${Math.round(f.left)},${Math.round(f.top)}–${Math.round(f.right)},${Math.round(f.bottom)}`);
              break;
            }
          }
        }
        let nextClip = clip;
        let nextCut = cut;
        if (cs.overflowX !== 'visible' || cs.overflowY !== 'visible') nextClip = meet(clip, r);
        if (['hidden', 'clip'].includes(cs.overflowX) || ['hidden', 'clip'].includes(cs.overflowY)) nextCut = meet(cut, r);
        if (cs.position === 'fixed') {
          nextClip = null;
          nextCut = null;
        }
        for (const child of Array.from(el.children)) walk(child, nextClip, nextCut, hidden);
      };
      const check = (el: Element, cs: CSSStyleDeclaration, fragments: Box[]) => {
        for (const r of fragments) {
          const sideways = r.left < -1 || r.right > vw + 1;
          const vertical = screen === 'projector' && (r.top < -1 || r.bottom > vh + 1);
          if (sideways || vertical) out.crossing.push(`${name(el)} at ${Math.round(r.left)},${Math.round(r.top)}–${Math.round(r.right)},${Math.round(r.bottom)}`);
        }
        const hasText = Array.from(el.childNodes).some((n) => n.nodeType === Node.TEXT_NODE && (n.textContent ?? '').trim());
        // Text shortened on purpose (an ellipsis) that keeps its whole self in its title is not cut.
        const whole = el.getAttribute('title') === (el.textContent ?? '').trim();
        if (hasText && !whole) {
          const he = el as HTMLElement;
          const cuts = cs.overflowX !== 'visible' || cs.textOverflow === 'ellipsis';
          if (cuts && he.scrollWidth > he.clientWidth + 1) out.clipped.push(`${name(el)} ${he.scrollWidth} > ${he.clientWidth}`);
          if ((cs.overflowY === 'hidden' || cs.overflowY === 'clip') && he.scrollHeight > he.clientHeight + 2) out.clipped.push(`${name(el)} height ${he.scrollHeight} > ${he.clientHeight}`);
        }
        if (hasText) {
          const size = parseFloat(cs.fontSize);
          out.minTextPx = Math.min(out.minTextPx, size);
          if (size + 0.01 < minTextPx) out.smallText.push(`${name(el)} ${size.toFixed(1)} px`);
        }
        if (screen !== 'projector' && el.matches('button, a[href], input:not([type=hidden]), select, textarea, [role=button], [role=radio], [role=checkbox], [role=switch], .q-btn')) {
          if (el.matches('input') && cs.opacity === '0') return;
          // A field's inner input counts with its field (WCAG 2.5.5 measures the target, not the text box inside it).
          const target = el.closest('.q-field') ?? el;
          const t = target.getBoundingClientRect();
          if (t.width + 0.5 < minTarget || t.height + 0.5 < minTarget) out.smallTargets.push(`${name(el)} ${Math.round(t.width)}×${Math.round(t.height)}`);
        }
      };
      walk(document.body, null, null, false);
      if (document.documentElement.scrollWidth > vw + 1) out.crossing.push(`the page scrolls sideways: ${document.documentElement.scrollWidth} > ${vw}`);
      return out;
    },
    { screen, minTextPx, minTarget: MIN_TARGET },
  );
}

/**
 * Where a dot vote's criteria legend does not read as the key to the results: it leaves the screen, overlaps the
 * results (the rows of marks, what is carried forward), or sits anywhere but above all of them that are on the
 * screen. Each as a line of words, none when it reads clearly.
 */
async function legendProblems(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const legend = document.querySelector('[data-test="criteria-legend"]');
    if (!legend) return ['no criteria legend'];
    const l = legend.getBoundingClientRect();
    const out: string[] = [];
    if (l.top < -1 || l.left < -1 || l.bottom > window.innerHeight + 1 || l.right > document.documentElement.clientWidth + 1) out.push('the legend leaves the screen');
    for (const el of document.querySelectorAll('[data-test="dot-row"], [data-test="projector-chosen"] li, [data-test="tally-row"]')) {
      for (const r of Array.from(el.getClientRects())) {
        const what = `"${(el.textContent ?? '').trim().slice(0, 30)}"`;
        const overlaps = r.left < l.right - 1 && l.left < r.right - 1 && r.top < l.bottom - 1 && l.top < r.bottom - 1;
        // The projector's other pages lie beside the one shown: only what is on the screen counts.
        const shown = r.width > 2 && r.right > 0 && r.left < document.documentElement.clientWidth;
        if (overlaps) out.push(`the legend overlaps ${what}`);
        else if (shown && r.top < l.bottom - 1) out.push(`the legend is not above ${what}`);
      }
    }
    return out;
  });
}

/**
 * Waits for the layout to settle: a projector's fit runs on the next animation frame, and a fit that makes
 * a second page shows the page mark, which takes height from the pages and fits them once more. Settled is
 * when the pages' boxes, their inline layout and the page mark read the same twice running (at most 3 s).
 */
async function settle(page: Page): Promise<void> {
  await page.evaluate(async () => {
    const frames = () => new Promise<void>((r) => requestAnimationFrame(() => requestAnimationFrame(() => setTimeout(r, 50))));
    const layout = () =>
      JSON.stringify([
        window.innerWidth,
        window.innerHeight,
        [...document.querySelectorAll('[data-test="fit-track"]')].map((t) => [t.getAttribute('style'), t.parentElement?.clientWidth, t.parentElement?.clientHeight]),
        document.querySelector('[data-test="projector-page"]')?.textContent ?? '',
      ]);
    const end = Date.now() + 3000;
    let last = layout();
    let same = 0;
    while (same < 2 && Date.now() < end) {
      await frames();
      const now = layout();
      same = now === last ? same + 1 : 0;
      last = now;
    }
  });
}

const t0 = Date.now();
async function snap(page: Page, name: string): Promise<void> {
  fs.mkdirSync(SHOTS, { recursive: true });
  if (process.env.SCREENS_DEBUG) console.log(((Date.now() - t0) / 1000).toFixed(1), name);
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`) });
}

async function api(request: APIRequestContext, token: string, method: 'post' | 'put', url: string, data: unknown) {
  const res = await request[method](url, { headers: { Authorization: `Bearer ${token}` }, data });
  if (!res.ok()) throw new Error(`${method} ${url} answered ${res.status()}: ${await res.text()}`);
  return res.json();
}

// A lookup that finds nothing fails in seconds, not at the end of the whole walk.
test.use({ actionTimeout: 10_000 });

test('every screen fits the longest content at every device size: projector, console, phone', async ({ browser, request, baseURL }) => {
  // About 1.5 min on an idle machine; the limit leaves room for a busy CI runner.
  test.setTimeout(540_000);
  const report: string[] = [];
  const fail: string[] = [];
  fs.rmSync(SHOTS, { recursive: true, force: true });
  fs.mkdirSync(SHOTS, { recursive: true });
  const write = () => fs.writeFileSync(path.join(SHOTS, 'report.txt'), [...report, '', 'PROBLEMS', ...fail].join('\n'));

  // A workshop with every activity type (the full-day template plus a preference vote), every title and prompt at its limit.
  const { accessToken: owner } = (await (await request.post('/api/auth/sign-in', { data: DEMO.facilitator })).json()) as { accessToken: string };
  const made = await api(request, owner, 'post', '/api/workshops', {
    title: TITLE('Screens'),
    objective: "Improve a new member's first ride",
    date: '2027-06-05',
    headcount: 6,
    templateId: 'full-day',
  });
  const workshopId = made.id as string;
  const pos = (made.agenda as { type: string }[]).findIndex((i) => i.type === 'team_sort');
  await api(request, owner, 'post', `/api/workshops/${workshopId}/agenda`, { type: 'preference_vote', position: pos + 1 });
  const workshop = await (await request.get(`/api/workshops/${workshopId}`, { headers: { Authorization: `Bearer ${owner}` } })).json();
  const agenda = workshop.agenda as { id: string; type: string; title: string; prompt: string }[];
  for (const item of agenda) {
    const { id, ...rest } = item as { id: string } & Record<string, unknown>;
    await api(request, owner, 'put', `/api/workshops/${workshopId}/agenda/${id}`, { ...rest, title: TITLE(item.type.replace('_', ' ')), prompt: PROMPT });
  }

  const live = (await api(request, owner, 'post', `/api/workshops/${workshopId}/live`, {})) as { sessionId: string; joinCode: string };
  const ownerSock = await connect(baseURL!, owner);
  await cmd(ownerSock, 'session:watch', { sessionId: live.sessionId });

  // Six phones through the API and sockets (one without photo consent, so photos of people are blurred), and one real phone browser.
  const phones: { token: string; id: string; sock: Sock }[] = [];
  for (const [i, displayName] of NAMES.entries()) {
    const answer = await (await request.post(`/api/join/${live.joinCode}`, { data: { displayName, photoConsent: i !== 2, deviceId: `screens-device-${i}-${Date.now()}` } })).json();
    phones.push({ token: answer.token, id: answer.me.id, sock: await connect(baseURL!, answer.token) });
  }
  const phoneContext = await browser.newContext({ viewport: PHONES[0], isMobile: true, hasTouch: true });
  const phone = await phoneContext.newPage();
  // The join form at every phone size: tap targets of 44 px, and its buttons line up with its fields.
  const checkJoin = async (label: string) => {
    for (const size of PHONES) {
      await phone.setViewportSize(size);
      await settle(phone);
      const name = `phone-${label}-${size.width}x${size.height}`;
      const p = await problems(phone, 'phone');
      for (const [k, list] of Object.entries({ crossing: p.crossing, clipped: p.clipped, smallTargets: p.smallTargets })) {
        if (list.length) fail.push(`${name} ${k}: ${list.slice(0, 4).join(' | ')}`);
      }
      const edges = await phone.evaluate(() =>
        [...document.querySelectorAll('form .q-field, form .q-btn')].map((e) => {
          const r = e.getBoundingClientRect();
          return [Math.round(r.left), Math.round(r.right)].join('–');
        }),
      );
      if (new Set(edges).size !== 1) fail.push(`${name}: the buttons do not line up with the fields (${edges.join(', ')})`);
      // The join form fits every phone: a short screen does not scroll.
      const tall = await phone.evaluate(() => document.documentElement.scrollHeight);
      if (tall > size.height + 1) fail.push(`${name}: the join form scrolls (${tall} px tall)`);
      await snap(phone, name);
    }
  };
  await phone.goto('/join');
  await checkJoin('join-code');
  await phone.getByLabel('Join code').fill(live.joinCode);
  await phone.getByRole('button', { name: 'Find the workshop' }).click();
  await expect(phone.getByTestId('join-title')).toBeVisible();
  await checkJoin('join-name');
  await phone.setViewportSize(PHONES[0]!);
  // The longest name Cairn takes (40 characters, shared/schemas/live.ts).
  const GUS = 'Gus Marchetti-Oyelaran, harbour mechanic';
  await phone.getByLabel('Your name for today').fill(GUS);
  await phone.getByTestId('consent-yes').click();
  await phone.getByTestId('join').click();
  await expect(phone.getByTestId('connection')).toHaveText('Connected');
  // The phone's top line keeps the longest name to two lines at most, in every language, even on the smallest phone;
  // the whole name stays in its title.
  for (const locale of ['de', 'es', 'en']) {
    await phone.getByTestId('language').selectOption(locale);
    await expect(phone.locator('html')).toHaveAttribute('lang', locale);
    for (const size of [{ width: 320, height: 568 }, PHONES[0]!]) {
      await phone.setViewportSize(size);
      await settle(phone);
      const nameBox = await phone.getByTestId('me-name').evaluate((e) => ({ height: e.getBoundingClientRect().height, line: parseFloat(getComputedStyle(e).lineHeight), title: e.getAttribute('title') }));
      const shot = `phone-header-${locale}-${size.width}x${size.height}`;
      if (nameBox.height > 2 * nameBox.line + 1) fail.push(`${shot}: the name takes ${Math.round(nameBox.height / nameBox.line)} lines`);
      if (nameBox.title !== GUS) fail.push(`${shot}: the name's title is "${nameBox.title}"`);
      const p = await problems(phone, 'phone');
      for (const [k, list] of Object.entries({ crossing: p.crossing, clipped: p.clipped, smallTargets: p.smallTargets })) {
        if (list.length) fail.push(`${shot} ${k}: ${list.slice(0, 4).join(' | ')}`);
      }
      await snap(phone, shot);
    }
  }

  const teams = (await cmd<{ id: string; name: string }[]>(ownerSock, 'teams:set', {
    teams: [0, 1, 2].map((t) => ({
      name: fill(`Team ${t + 1} of the harbour docks and the first ride`, 60),
      challenge: OPTION(t),
      memberIds: phones.filter((_, i) => i % 3 === t).map((p) => p.id),
    })),
  })) as { id: string; name: string }[];

  const consoleContext = await browser.newContext({ viewport: TABLETS[0], hasTouch: true });
  const consolePage = await consoleContext.newPage();
  await consolePage.goto('/sign-in');
  await consolePage.getByLabel('E-mail').fill(DEMO.facilitator.email);
  await consolePage.getByLabel('Password').fill(DEMO.facilitator.password);
  await consolePage.getByTestId('submit').click();
  await consolePage.waitForURL(/\/workshops/);
  await consolePage.goto(`/live/${workshopId}/console`);
  await expect(consolePage.getByTestId('console-activity')).toBeVisible();
  // The projector in its own window, so neither it nor the console is a background tab (those get few animation frames).
  const projectorContext = await browser.newContext({ viewport: PROJECTORS[0], storageState: await consoleContext.storageState() });
  const projector = await projectorContext.newPage();
  await projector.setViewportSize(PROJECTORS[0]!);
  await projector.goto(`/projector/${live.sessionId}`);
  await expect(projector.getByTestId('projector-code')).toHaveText(live.joinCode);

  let n = 0;
  const note = (p: number, itemId: string, extra: Record<string, unknown>) =>
    cmd(phones[p]!.sock, 'submission:create', { clientId: `screens-${n}-${Date.now()}`, itemId, text: NOTE(n++ % 60), kind: 'note', ...extra });

  const checkProjector = async (label: string) => {
    for (const size of PROJECTORS) {
      await projector.setViewportSize(size);
      await settle(projector);
      const minPx = MIN_TEXT_SHARE * size.height;
      const p = await problems(projector, 'projector', minPx);
      const code = (await projector.getByTestId('projector-code').boundingBox())!;
      const codeOnScreen = code && code.y >= 0 && code.y + code.height <= size.height && code.x + code.width <= size.width;
      const mark = projector.getByTestId('projector-page');
      const pages = (await mark.count()) ? await mark.textContent() : '1/1';
      const name = `projector-${label}-${size.width}x${size.height}`;
      report.push(`${name}: smallest text ${p.minTextPx.toFixed(1)} px (limit ${minPx.toFixed(1)}), pages ${pages}`);
      if (!codeOnScreen) fail.push(`${name}: the join code is off screen`);
      // While results show, the join panel is a corner: the code stays, the big QR code goes and leaves the room to the results.
      if (label.endsWith('-results') && (await projector.getByTestId('projector-qr').count())) fail.push(`${name}: the QR code still takes room over the results`);
      // A dot vote's criteria legend is in view with the results, over none of them.
      if (label === 'dot_vote-results') for (const problem of await legendProblems(projector)) fail.push(`${name}: ${problem}`);
      for (const [k, list] of Object.entries({ crossing: p.crossing, clipped: p.clipped, smallText: p.smallText })) {
        if (list.length) fail.push(`${name} ${k}: ${list.slice(0, 4).join(' | ')}${list.length > 4 ? ` (+${list.length - 4})` : ''}`);
      }
      await snap(projector, name);
    }
  };
  const checkConsole = async (label: string) => {
    for (const size of TABLETS) {
      await consolePage.setViewportSize(size);
      await consolePage.evaluate(() => window.scrollTo(0, 0));
      await settle(consolePage);
      const p = await problems(consolePage, 'console');
      const name = `console-${label}-${size.width}x${size.height}`;
      const onScreen = async () => {
        const out: string[] = [];
        for (const id of ['countdown', 'back', 'next']) {
          const b = await consolePage.getByTestId(id).first().boundingBox();
          if (!b || b.y < 0 || b.y + b.height > size.height || b.x < 0 || b.x + b.width > size.width) out.push(id);
        }
        return out;
      };
      const top = await onScreen();
      // The drift line reads as words: "12 min behind plan · projected end 15:07", no word run into the dot.
      const drift = consolePage.getByTestId('drift').first();
      if ((await drift.count()) && /\S·/.test(await drift.innerText())) fail.push(`${name}: words run together in the drift line: ${await drift.innerText()}`);
      if (label === 'dot_vote') {
        await consolePage.getByTestId('criteria-legend').scrollIntoViewIfNeeded();
        for (const problem of await legendProblems(consolePage)) fail.push(`${name}: ${problem}`);
        await consolePage.evaluate(() => window.scrollTo(0, 0));
      }
      await snap(consolePage, name);
      await consolePage.evaluate(() => window.scrollTo(0, document.documentElement.scrollHeight));
      await settle(consolePage);
      const bottom = await onScreen();
      if (top.length || bottom.length) fail.push(`${name}: off screen ${[...top.map((t) => `${t} (top)`), ...bottom.map((t) => `${t} (scrolled)`)].join(', ')}`);
      for (const [k, list] of Object.entries({ crossing: p.crossing, clipped: p.clipped })) {
        if (list.length) fail.push(`${name} ${k}: ${list.slice(0, 4).join(' | ')}${list.length > 4 ? ` (+${list.length - 4})` : ''}`);
      }
      if (p.smallTargets.length) report.push(`${name} small targets: ${p.smallTargets.slice(0, 4).join(' | ')}`);
    }
  };
  const checkPhone = async (label: string) => {
    for (const size of PHONES) {
      await phone.setViewportSize(size);
      await settle(phone);
      const p = await problems(phone, 'phone');
      const name = `phone-${label}-${size.width}x${size.height}`;
      for (const [k, list] of Object.entries({ crossing: p.crossing, clipped: p.clipped, smallTargets: p.smallTargets })) {
        if (list.length) fail.push(`${name} ${k}: ${list.slice(0, 4).join(' | ')}${list.length > 4 ? ` (+${list.length - 4})` : ''}`);
      }
      await snap(phone, name);
    }
  };

  // The console steps the projector's pages ("page n of m", previous / next); with nobody stepping, the pages turn by themselves.
  const stepPages = async () => {
    await projector.setViewportSize(PROJECTORS[0]!);
    await settle(projector);
    const words = consolePage.getByTestId('projector-page-words');
    const mark = projector.getByTestId('projector-page');
    const shown = async () => (await mark.textContent())!.split('/').map(Number) as [number, number];
    // The page that `delta` turns from `from` lead to, round the end, counted in the pages there are now
    // (a late font or photo can lay the view out again while the test runs).
    const turnedTo = async (from: number, delta: number, timeout = 5000) => {
      await expect
        .poll(async () => {
          const [p, of] = await shown();
          return p === ((((from - 1 + delta) % of) + of) % of) + 1 && (await words.textContent())?.trim() === `Projector page ${p} of ${of}`;
        }, { timeout })
        .toBe(true);
      return (await shown())[0];
    };
    // Once the projector has laid the pages out at this size, the console says what it shows.
    await expect
      .poll(async () => (await words.textContent())?.trim() === `Projector page ${(await mark.textContent())?.replace('/', ' of ')}`)
      .toBe(true);
    for (const size of [TABLETS[0]!, TABLETS[1]!]) {
      await consolePage.setViewportSize(size);
      await snap(consolePage, `console-projector-pages-${size.width}x${size.height}`);
    }
    // Each step turns from the page shown just before it: between two steps the projector may have laid the
    // view out again (a late photo or font), which can move it back to the first page.
    const step = async (button: 'page-next' | 'page-back', delta: 1 | -1) => {
      const before = (await shown())[0];
      await consolePage.getByTestId(button).click();
      return turnedTo(before, delta);
    };
    let at = await step('page-next', 1);
    at = await step('page-back', -1);
    at = await step('page-back', -1);
    // The next turn by itself comes a full turn (12 s) after the last step.
    await turnedTo(at, 1, 15_000);
  };

  // A participant sitting a round out is told so, and sees no input about a partner (there is none this round).
  const sitOut = async (itemId: string) => {
    await phone.setViewportSize(PHONES[0]!);
    for (let r = 0; r < 8; r++) {
      const round = await cmd<{ resting: { displayName: string } | null }>(ownerSock, 'rounds:set', { itemId, round: r });
      if (!round.resting?.displayName.startsWith('Gus')) continue;
      await expect(phone.getByTestId('resting')).toBeVisible();
      await expect(phone.getByTestId('partner-name')).toHaveCount(0);
      await expect(phone.getByTestId('note-input')).toHaveCount(0);
      await expect(phone.getByTestId('send-note')).toHaveCount(0);
      await snap(phone, 'phone-interview-sitting-out-360x640');
      await cmd(ownerSock, 'rounds:set', { itemId, round: 0 });
      return;
    }
    fail.push('interview: no round found where the phone sits out');
  };
  // The phone's counts agree: a note sent online counts as sent; one written offline waits (not sent yet); once back, both are sent.
  const sentAndWaiting = async () => {
    await phone.setViewportSize(PHONES[1]!);
    const sent = phone.getByTestId('sent-count');
    const waiting = phone.getByTestId('outbox');
    await phone.getByTestId('note-input').fill('The first dock had no free bike');
    await phone.getByTestId('send-note').click();
    await expect(sent).toHaveText('1 sent in this activity');
    await expect(waiting).toHaveCount(0);
    await phoneContext.setOffline(true);
    await expect(phone.getByTestId('connection')).toHaveText('Reconnecting…', { timeout: 30_000 });
    await phone.getByTestId('note-input').fill('Nobody said where the next free dock was');
    await phone.getByTestId('send-note').click();
    await expect(waiting).toHaveText('1 waiting to be sent');
    await expect(sent).toHaveText('1 sent in this activity');
    await phoneContext.setOffline(false);
    await expect(sent).toHaveText('2 sent in this activity', { timeout: 20_000 });
    await expect(waiting).toHaveCount(0);
  };

  const parts: Record<string, string[]> = {
    interview: ['says', 'thinks', 'does', 'feels'],
    empathy_map: ['sees', 'hears', 'says_does', 'thinks_feels'],
    test_rounds: ['worked', 'didnt_work', 'questions', 'ideas'],
    closing: ['reflection', 'next_step'],
  };
  const seen = new Set<string>();
  for (const [index, item] of agenda.entries()) {
    if (seen.has(item.type)) continue;
    seen.add(item.type);
    await cmd(ownerSock, 'session:goto', { index });
    await cmd(ownerSock, 'session:reveal', { revealed: false });
    await expect(projector.getByTestId('projector-activity')).toHaveText(TITLE(item.type.replace('_', ' ')));
    await expect(phone.getByTestId('phone-activity')).toHaveText(TITLE(item.type.replace('_', ' ')));
    // A new activity opens at its title on the phone.
    const atTop = await expect
      .poll(() => phone.evaluate(() => window.scrollY), { timeout: 3000 })
      .toBe(0)
      .then(() => true, () => false);
    if (!atTop) fail.push(`phone: ${item.type} does not open at its title`);

    const t = item.type;
    if (parts[t] || ['insights', 'point_of_view', 'how_might_we'].includes(t)) {
      // Sixty notes, the phones sending side by side.
      await Promise.all(phones.map(async (_, p) => {
      for (let k = p; k < 60; k += phones.length) {
        const extra: Record<string, unknown> = {};
        if (parts[t]) extra.part = parts[t]![k % parts[t]!.length];
        if (t === 'test_rounds') Object.assign(extra, { kind: 'feedback', fields: { hostTeamId: teams[(p + 1) % 3]!.id } });
        if (t === 'closing') extra.kind = 'reflection';
        if (t === 'point_of_view') Object.assign(extra, { kind: 'point_of_view', fields: { user: 'A new member', need: 'to find a free dock', insight: 'a full dock ends the ride badly' } });
        if (t === 'how_might_we') Object.assign(extra, { kind: 'how_might_we', fields: { action: 'make docks easy to find', user: 'a new member', outcome: 'the ride ends well' } });
        await note(p, item.id, extra);
      }
      }));
    } else if (t === 'storyboard') {
      await Promise.all(phones.map(async (_, p) => {
        for (let k = p; k < 60; k += phones.length) await note(p, item.id, { kind: 'frame' });
      }));
    } else if (t === 'sketch') {
      for (let k = 0; k < 6; k++) {
        const res = await request.post('/api/live/photos', {
          headers: { Authorization: `Bearer ${phones[k]!.token}` },
          multipart: {
            photo: { name: 'sketch.png', mimeType: 'image/png', buffer: sketchPng(2) },
            itemId: item.id,
            clientId: `screens-photo-${k}-${Date.now()}`,
            caption: fill('Eight ideas for finding a free dock, sketched in eight minutes by the harbour team', 140),
            showsPeople: 'true',
            peopleConsent: 'false',
          },
        });
        expect(res.ok(), await res.text()).toBe(true);
      }
    } else if (t === 'dot_vote' || t === 'preference_vote') {
      const options = Array.from({ length: 30 }, (_, i) => ({ text: OPTION(i) }));
      const rules =
        t === 'dot_vote'
          ? { dotsPerVoter: 5, capPerOption: 5, allowStacking: true, topN: 3, criteria: [{ id: 'impact', label: 'Impact' }, { id: 'effort', label: 'Effort' }] }
          : { topN: 3 };
      const vote = await cmd<{ options: { id: string }[] }>(ownerSock, 'vote:setup', { options, rules });
      await cmd(ownerSock, 'vote:open');
      await checkPhone(`${t}-ballot`);
      // An option reads at the same size on both ballots, not in the phone's smaller body text.
      const optionPx = await phone.evaluate((item) => {
        const sizes = [...document.querySelectorAll(`[data-test="${item}"] *`)]
          .filter((e) => [...e.childNodes].some((n) => n.nodeType === Node.TEXT_NODE && (n.textContent ?? '').includes('Option')))
          .map((e) => parseFloat(getComputedStyle(e).fontSize));
        return sizes.length ? Math.min(...sizes) : 0;
      }, t === 'dot_vote' ? 'dot-option' : 'rank-item');
      if (optionPx < 16) fail.push(`phone ${t}: options in ${optionPx} px text (at least 16)`);
      if (t === 'dot_vote') {
        // The dots-left counter stays in view while the ballot scrolls.
        await phone.setViewportSize(PHONES[0]!);
        await phone.getByTestId('dot-option').nth(12).scrollIntoViewIfNeeded();
        const left = await phone.getByTestId('dots-left-impact').boundingBox();
        if (!left || left.y < 0 || left.y + left.height > PHONES[0]!.height) fail.push('phone: the dots-left counter leaves the screen while the ballot scrolls');
        await phone.evaluate(() => window.scrollTo(0, 0));
      }
      for (const [p, ph] of phones.entries()) {
        if (t === 'dot_vote') {
          for (const [c, crit] of ['impact', 'effort'].entries()) {
            for (let d = 0; d < 5; d++) await cmd(ph.sock, 'vote:dot', { clientId: `screens-dot-${p}-${c}-${d}-${Date.now()}`, optionId: vote.options[(p * 3 + d * 7 + c) % 30]!.id, criterionId: crit, delta: 1 });
          }
        } else {
          const ranking = vote.options.map((o) => o.id);
          for (let s = 0; s < p; s++) ranking.push(ranking.shift()!);
          await cmd(ph.sock, 'vote:rank', { clientId: `screens-rank-${p}-${Date.now()}`, ranking });
        }
      }
      await cmd(ownerSock, 'vote:close');
      if (t === 'dot_vote') {
        // The top N is cut from the ranking the rules name (two criteria: the matrix), ties at the cut-off broken by the facilitator.
        const results = await cmd<{ ranked: { optionId: string }[]; top: { selected: string[]; tiedAtCutoff: string[] } }>(ownerSock, 'vote:results');
        await cmd(ownerSock, 'vote:choose', { optionIds: [...results.top.selected, ...results.top.tiedAtCutoff].slice(0, 3) });
      }
    }
    await settle(projector);
    await checkProjector(`${t}`);
    if (!['dot_vote', 'preference_vote'].includes(t)) await checkPhone(t);
    if (t === 'interview') await sitOut(item.id);
    if (t === 'insights') await sentAndWaiting();
    await checkConsole(t);
    if (!['welcome', 'break', 'lunch', 'icebreaker', 'team_sort'].includes(t)) {
      await cmd(ownerSock, 'session:reveal', { revealed: true });
      if (t === 'dot_vote' || t === 'preference_vote') await expect(projector.getByTestId('projector-results')).toBeVisible();
      await checkProjector(`${t}-results`);
      if (t === 'preference_vote') {
        // A shared first place of long options is counted, not quoted in full ahead of the ranking.
        const shared = projector.getByTestId('shared-first');
        if (await shared.count()) {
          const text = (await shared.first().textContent()) ?? '';
          if (text.length > 200) fail.push(`projector: the shared-first sentence runs to ${text.length} characters`);
        }
      }
      if (t === 'insights') await stepPages();
      await cmd(ownerSock, 'session:reveal', { revealed: false });
    }
    write();
    // Scroll the phone down, so the next activity has to bring it back to its title.
    await phone.evaluate(() => window.scrollTo(0, document.documentElement.scrollHeight));
  }

  write();
  ownerSock.disconnect();
  for (const p of phones) p.sock.disconnect();
  expect(fail).toEqual([]);
});
