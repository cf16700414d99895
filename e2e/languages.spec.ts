import { test, expect, type Browser, type Page } from '@playwright/test';
import { io, type Socket } from 'socket.io-client';
import fs from 'node:fs';
import path from 'node:path';
import { DEMO, runLive, shot, signIn, sketchPng } from './fixtures';

/*
 * A German phone and a Spanish phone take part in every activity type, and neither they nor the projector,
 * set to German from the console, show a word of the English catalog. The phrases looked for come from
 * src/i18n/locales/en.json itself, so a key added tomorrow is looked for too.
 */

type Lang = 'de' | 'es';
type Catalog = Map<string, string>;

/** A catalog's messages by dotted key. */
function catalog(locale: 'en' | Lang): Catalog {
  const json = JSON.parse(fs.readFileSync(path.join('src/i18n/locales', `${locale}.json`), 'utf8')) as Record<string, unknown>;
  const out: Catalog = new Map();
  const walk = (node: unknown, key: string) => {
    if (typeof node === 'string') out.set(key, node);
    else if (node && typeof node === 'object') for (const [k, v] of Object.entries(node)) walk(v, key ? `${key}.${k}` : k);
  };
  walk(json, '');
  return out;
}
const EN = catalog('en');
const OTHER: Record<Lang, Catalog> = { de: catalog('de'), es: catalog('es') };

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
/** A phrase as a whole-word, case-blind pattern (CSS can set text in capitals, and innerText follows it). */
const wordPattern = (s: string) => new RegExp(`(?<![\\p{L}\\p{N}])${escape(s)}(?![\\p{L}\\p{N}])`, 'iu');

/**
 * The English catalog's words that must not show on a screen in `lang`: every plural form of every
 * message, cut at its placeholders, each piece of four or more characters with a letter in it; a piece is
 * left out where the other catalog says the same (e.g. "Ideas" in Spanish, "Feedback" or "Workshop" in German).
 */
function englishPhrases(lang: Lang): { key: string; text: string; re: RegExp }[] {
  const other = OTHER[lang];
  const otherText = [...other.values()].join('\n');
  const out = new Map<string, { key: string; text: string; re: RegExp }>();
  for (const [key, value] of EN) {
    if (other.get(key) === value) continue;
    for (const form of value.split('|')) {
      const literal = form.replace(/\{'([^']*)'\}/g, '$1');
      for (const piece of literal.split(/\{[^}]*\}/)) {
        const text = piece.trim().replace(/^[\s,.:;·–—“”"()?!]+|[\s,.:;·–—“”"()?!]+$/gu, '');
        if (text.length < 4 || !/\p{L}/u.test(text) || out.has(text)) continue;
        const re = wordPattern(text);
        if (re.test(otherText)) continue;
        out.set(text, { key, text, re });
      }
    }
  }
  return [...out.values()];
}
const PHRASES: Record<Lang, ReturnType<typeof englishPhrases>> = { de: englishPhrases('de'), es: englishPhrases('es') };

/** Everything a person reads or hears on the page: its text, and the labels, placeholders and alt texts of its elements. */
function screenText(page: Page): Promise<string> {
  return page.evaluate(() => {
    const attrs = [...document.querySelectorAll('[aria-label], [placeholder], [title], img[alt]')].flatMap((el) =>
      ['aria-label', 'placeholder', 'title', 'alt'].map((a) => el.getAttribute(a) ?? '').filter(Boolean),
    );
    return [document.body.innerText, ...attrs].join('\n');
  });
}

/** Where the text of a screen that showed English is kept. */
const OUT = '.test-output/languages';

// Content the room typed is in German and Spanish, so any English found is Cairn's own.
const STEP = (i: number) => `Etappe ${i + 1} · Etapa ${i + 1}`;
const PROMPT = 'Schreibt auf, was euch am Steg aufgefallen ist. · Escribid lo que os llamó la atención en el muelle.';
const CHALLENGES = ['Freie Stege finden · Encontrar muelles libres', 'Das Schloss verstehen · Entender el candado'];


/** Sends a socket command and returns its data, failing on a refusal. */
async function cmd<T = unknown>(s: Socket, event: string, payload: unknown = {}): Promise<T> {
  const answer = (await s.timeout(10_000).emitWithAck(event, payload)) as { data?: T; error?: { code: string; message: string } };
  if (answer.error) throw new Error(`${event} was refused: ${answer.error.code} ${answer.error.message}`);
  return answer.data as T;
}

/** A phone in its own browser context whose browser speaks `locale` (BCP 47, e.g. 'de-DE'). */
async function phoneIn(browser: Browser, locale: string): Promise<Page> {
  const context = await browser.newContext({ locale, viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
  return context.newPage();
}

// A lookup that finds nothing fails in seconds, not at the end of the whole walk.
test.use({ actionTimeout: 10_000 });

test('a German and a Spanish phone take part in every activity type, and the projector speaks German: no English on their screens', async ({ browser, request }) => {
  test.setTimeout(180_000);
  const found: string[] = [];
  fs.rmSync(OUT, { recursive: true, force: true });
  fs.mkdirSync(OUT, { recursive: true });
  const t0 = Date.now();
  /** Notes every English catalog phrase on the screen now (all are reported together at the end). */
  const check = async (page: Page, lang: Lang, where: string) => {
    // An address (the projector's ".../join") is not a word of the screen's language.
    const text = (await screenText(page)).replace(/\S*\/\S*/g, ' ');
    const hits = PHRASES[lang].filter((p) => p.re.test(text));
    for (const p of hits) found.push(`${where} (${lang}): "${p.text}" from ${p.key}`);
    // What the screen said, kept beside the test's output to find where the English came from.
    const file = path.join(OUT, `${where.replace(/[^\w-]+/g, '_')}-${lang}`);
    if (hits.length || process.env.LANGUAGES_DEBUG) fs.writeFileSync(`${file}.txt`, text);
    if (process.env.LANGUAGES_DEBUG) await page.screenshot({ path: `${file}.png`, fullPage: true });
  };

  // A workshop of the spec's own with one item of every activity type: the full-day template, a preference vote and a talk.
  const { accessToken } = (await (await request.post('/api/auth/sign-in', { data: DEMO.facilitator })).json()) as { accessToken: string };
  const auth = { Authorization: `Bearer ${accessToken}` };
  const made = await request.post('/api/workshops', {
    headers: auth,
    data: { title: `Sprachen · Idiomas ${Date.now()}`, objective: 'Jede Sprache im Raum · Cada idioma en la sala', date: '2027-06-05', headcount: 6, templateId: 'full-day' },
  });
  expect(made.status()).toBe(201);
  const { id: workshopId, agenda: planned } = (await made.json()) as { id: string; agenda: { type: string }[] };
  const sortAt = planned.findIndex((i) => i.type === 'team_sort');
  for (const [type, position] of [['preference_vote', sortAt + 1], ['talk', 1]] as const) {
    expect((await request.post(`/api/workshops/${workshopId}/agenda`, { headers: auth, data: { type, position } })).ok()).toBe(true);
  }
  const workshop = (await (await request.get(`/api/workshops/${workshopId}`, { headers: auth })).json()) as { agenda: ({ id: string; type: string } & Record<string, unknown>)[] };
  const agenda = workshop.agenda;
  for (const [i, { id, ...rest }] of agenda.entries()) {
    const put = await request.put(`/api/workshops/${workshopId}/agenda/${id}`, { headers: auth, data: { ...rest, title: STEP(i), prompt: PROMPT } });
    expect(put.ok(), await put.text()).toBe(true);
  }

  // The console runs it as a rehearsal; the projector opens beside it.
  const consoleContext = await browser.newContext({ viewport: { width: 1180, height: 820 } });
  const consolePage = await consoleContext.newPage();
  await signIn(consolePage, DEMO.facilitator);
  await consolePage.goto(`/workshops/${workshopId}`);
  await runLive(consolePage, 'rehearsal');
  await expect(consolePage.getByTestId('console-activity')).toBeVisible();
  const code = (await consolePage.getByTestId('console-code').textContent())!.trim();
  const projectorHref = (await consolePage.getByTestId('open-projector').getAttribute('href'))!;
  const sessionId = projectorHref.split('/').pop()!;
  const projectorContext = await browser.newContext({ viewport: { width: 1280, height: 720 }, storageState: await consoleContext.storageState() });
  const projector = await projectorContext.newPage();
  await projector.goto(projectorHref);
  await expect(projector.getByTestId('projector-code')).toHaveText(code);
  const facilitator = io(new URL(consolePage.url()).origin, { auth: { token: accessToken }, transports: ['websocket'], forceNew: true });
  await cmd(facilitator, 'session:watch', { sessionId });

  // The facilitator sets the projector to German from the console: it switches at once and keeps it after a reload.
  const german = consolePage.getByTestId('projector-locale-de');
  await german.click();
  await expect(german).toHaveAttribute('aria-pressed', 'true');
  await expect(consolePage.getByTestId('projector-locale-en')).toHaveAttribute('aria-pressed', 'false');
  await expect(projector.locator('html')).toHaveAttribute('lang', 'de');
  await expect(projector.getByTestId('projector-joined')).toHaveText(OTHER.de.get('projector.joined')!.split('|')[1]!.replace('{n}', '0').trim());
  await projector.reload();
  await expect(projector.getByTestId('projector-code')).toHaveText(code);
  await expect(projector.locator('html')).toHaveAttribute('lang', 'de');
  await check(projector, 'de', 'projector before anyone joined');

  // Two phones join in their browsers' languages; the German one says yes to photos, the Spanish one no.
  const phones: Record<Lang, Page> = { de: await phoneIn(browser, 'de-DE'), es: await phoneIn(browser, 'es-ES') };
  const names: Record<Lang, string> = { de: 'Greta', es: 'Lucía' };
  for (const lang of ['de', 'es'] as const) {
    const p = phones[lang];
    await p.goto('/join');
    await expect(p.locator('html')).toHaveAttribute('lang', lang);
    await check(p, lang, 'join: the code');
    await p.getByLabel(OTHER[lang].get('join.code')!).fill(code);
    await p.getByRole('button', { name: OTHER[lang].get('join.find')! }).click();
    await expect(p.getByTestId('join-title')).toBeVisible();
    // Join without a name or an answer first: the form's own messages speak the phone's language too.
    await p.getByTestId('join').click();
    await p.locator('[data-test="policy"] summary').click();
    await check(p, lang, 'join: the name and photos');
    await p.getByLabel(OTHER[lang].get('join.name')!).fill(names[lang]);
    await p.getByTestId(lang === 'de' ? 'consent-yes' : 'consent-no').click();
    await p.getByTestId('join').click();
    await expect(p.getByTestId('connection')).toHaveText(OTHER[lang].get('phone.connected')!);
  }
  const members = await cmd<{ id: string; displayName: string }[]>(facilitator, 'participants:list');
  const idOf = (lang: Lang) => members.find((m) => m.displayName === names[lang])!.id;
  await cmd(facilitator, 'teams:set', {
    teams: [
      { name: 'Möwen', challenge: CHALLENGES[0], memberIds: [idOf('de')] },
      { name: 'Gaviotas', challenge: CHALLENGES[1], memberIds: [idOf('es')] },
    ],
  });

  const both = async (fn: (p: Page, lang: Lang) => Promise<void>) => {
    for (const lang of ['de', 'es'] as const) await fn(phones[lang], lang);
  };
  const checkPhones = (where: string) => both((p, lang) => check(p, lang, where));
  /** Writes a note in the first part offered (where the activity has parts) and waits until it is sent. */
  const note = async (p: Page, text: string) => {
    const parts = p.locator('[data-test^="choose-part-"]');
    if (await parts.count()) await parts.first().click();
    await p.getByTestId('note-input').fill(text);
    await p.getByTestId('send-note').click();
    await expect(p.getByTestId('sent-count').first()).toBeVisible();
  };
  const words: Record<Lang, string> = { de: 'Der Steg war voll', es: 'El muelle estaba lleno' };
  const vote = async (kind: 'dot_vote' | 'preference_vote' | 'team_sort') => {
    const options = (kind === 'team_sort' ? CHALLENGES : ['Karte · Mapa', 'Licht · Luz', 'Schild · Cartel']).map((text) => ({ text }));
    const rules =
      kind === 'dot_vote'
        ? { dotsPerVoter: 2, capPerOption: 2, allowStacking: true, topN: 2, criteria: [{ id: 'nutzen', label: 'Nutzen · Beneficio' }, { id: 'aufwand', label: 'Aufwand · Esfuerzo', dotMeans: 'low' }] }
        : { topN: 2 };
    await cmd(facilitator, 'vote:setup', { options, rules });
    await checkPhones(`${kind}: waiting to open`);
    await cmd(facilitator, 'vote:open');
    await both(async (p) => {
      if (kind === 'dot_vote') {
        for (const c of ['nutzen', 'aufwand']) {
          const left = p.getByTestId(`dots-left-${c}`);
          const before = await left.textContent();
          await p.getByTestId(`criterion-${c}`).getByTestId('dot-add').first().click();
          await expect(left).not.toHaveText(before ?? '');
        }
      } else {
        await expect(p.getByTestId('rank-item')).toHaveCount(options.length);
        await p.getByTestId('rank-item').first().getByTestId('rank-down').click();
        await p.getByTestId('send-ranking').click();
        await expect(p.getByTestId('ranking-sent')).toBeVisible();
      }
    });
    await checkPhones(`${kind}: voting`);
    await check(projector, 'de', `projector ${kind}: voting`);
    await cmd(facilitator, 'vote:close');
    await both((p) => expect(p.getByTestId('vote-closed')).toBeVisible());
    if (kind === 'team_sort') {
      const proposal = await cmd<{ teams: { challenge: string; memberIds: string[] }[] }>(facilitator, 'teams:propose', {});
      await cmd(facilitator, 'teams:confirm', { teams: proposal.teams.map((t, i) => ({ name: ['Möwen', 'Gaviotas'][i]!, challenge: t.challenge, memberIds: t.memberIds })) });
      await both((p) => expect(p.getByTestId('my-team')).toBeVisible());
    } else {
      const results = await cmd<{ top: { selected: string[]; tiedAtCutoff: string[] } }>(facilitator, 'vote:results');
      await cmd(facilitator, 'vote:choose', { optionIds: [...results.top.selected, ...results.top.tiedAtCutoff].slice(0, 2) });
    }
    await checkPhones(`${kind}: closed`);
  };

  const seen = new Set<string>();
  for (const [index, item] of agenda.entries()) {
    if (seen.has(item.type)) continue;
    seen.add(item.type);
    const t = item.type;
    if (process.env.LANGUAGES_DEBUG) console.log(((Date.now() - t0) / 1000).toFixed(1), t);
    await cmd(facilitator, 'session:goto', { index });
    await both((p) => expect(p.getByTestId('phone-activity')).toHaveText(STEP(index)));
    await expect(projector.getByTestId('projector-activity')).toHaveText(STEP(index));
    await both((p) => expect(p.getByTestId(['dot_vote', 'preference_vote', 'team_sort'].includes(t) ? 'vote-phone' : 'activity-phone')).toBeVisible());

    if (t === 'interview' || t === 'icebreaker') {
      await both((p) => expect(p.getByTestId('partner-name')).toBeVisible());
      if (t === 'interview') await both((p, lang) => note(p, words[lang]));
      if (t === 'interview') {
        // The Spanish phone switches to German from its picker, and back: the screen follows each time.
        const p = phones.es;
        await p.getByTestId('language').selectOption('de');
        await expect(p.locator('html')).toHaveAttribute('lang', 'de');
        await expect(p.getByTestId('phone-position')).toHaveText(new RegExp(`^${escape(OTHER.de.get('phone.position')!.split('{n}')[0]!)}`, 'i'));
        await expect(p.getByTestId('connection')).toHaveText(OTHER.de.get('phone.connected')!);
        await check(p, 'de', 'the Spanish phone switched to German');
        await p.getByTestId('language').selectOption('es');
        await expect(p.locator('html')).toHaveAttribute('lang', 'es');
        await expect(p.getByTestId('connection')).toHaveText(OTHER.es.get('phone.connected')!);
      }
    } else if (t === 'talk') {
      // A message from the console and answers paused: the phones' banners are theirs too.
      await cmd(facilitator, 'session:message', { text: 'Kaffee · Café' });
      await cmd(facilitator, 'session:lock', { locked: true });
      await both((p) => expect(p.getByTestId('locked')).toBeVisible());
      await both((p) => expect(p.getByTestId('phone-message')).toBeVisible());
      await checkPhones('talk: a message, answers paused');
      await cmd(facilitator, 'session:lock', { locked: false });
    } else if (['empathy_map', 'insights', 'storyboard', 'closing'].includes(t)) {
      await both((p, lang) => note(p, words[lang]));
    } else if (t === 'point_of_view' || t === 'how_might_we') {
      const fields: Record<string, string> =
        t === 'point_of_view' ? { user: 'Greta', need: 'einen Steg finden', insight: 'el muelle estaba lleno' } : { action: 'Stege zeigen', user: 'Lucía', outcome: 'encuentra un muelle' };
      await both(async (p, lang) => {
        // Sent empty first: the hints under the fields are the phone's language too.
        await p.getByTestId('send-guided').click();
        await expect(p.locator('[data-test^="hint-"]').first()).toBeVisible();
        await check(p, lang, `${t}: hints`);
        for (const [id, text] of Object.entries(fields)) await p.getByTestId(`guided-${id}`).fill(text);
        await p.getByTestId('send-guided').click();
        await expect(p.getByTestId(`guided-${Object.keys(fields)[0]}`)).toHaveValue('');
      });
    } else if (t === 'dot_vote' || t === 'preference_vote' || t === 'team_sort') {
      await vote(t);
    } else if (t === 'sketch') {
      await both(async (p, lang) => {
        await p.getByTestId('photo-input').setInputFiles({ name: 'skizze.png', mimeType: 'image/png', buffer: sketchPng() });
        await p.getByTestId('photo-caption').fill(words[lang]);
        await p.getByTestId('shows-people').click();
        await expect(p.getByTestId('people-caution')).toBeVisible();
        await check(p, lang, 'sketch: a photo with people');
        await p.getByTestId('shows-people').click();
        await p.getByTestId('send-photo').click();
        await expect(p.getByTestId('photo-sent')).toBeVisible();
      });
      await both(async (p, lang) => {
        await expect(p.getByTestId('sketch')).toHaveCount(2);
        await p.getByTestId('give-feedback').click();
        await note(p, words[lang]);
      });
    } else if (t === 'test_rounds') {
      await both(async (p, lang) => {
        await expect(p.getByTestId('visit-team')).toBeVisible();
        await note(p, words[lang]);
        await expect(p.getByTestId('grid-encourage')).toBeVisible();
      });
    }
    await checkPhones(t);
    await check(projector, 'de', `projector ${t}`);
    if (!['welcome', 'break', 'lunch', 'icebreaker', 'talk', 'team_sort'].includes(t)) {
      await cmd(facilitator, 'session:reveal', { revealed: true });
      await expect(projector.getByTestId('projector-qr')).toHaveCount(0);
      if (t === 'dot_vote' || t === 'preference_vote') await expect(projector.getByTestId('projector-results')).toBeVisible();
      await check(projector, 'de', `projector ${t}: results`);
      await checkPhones(`${t}: results shown`);
      await cmd(facilitator, 'session:reveal', { revealed: false });
    }
    if (t === 'closing') {
      // The data page, from the phone's settings.
      await both(async (p, lang) => {
        await p.getByRole('button', { name: OTHER[lang].get('phone.settings')! }).click();
        await p.getByTestId('my-data-link').click();
        await expect(p.getByRole('heading', { name: OTHER[lang].get('data.title')! })).toBeVisible();
        await expect(p.getByText(new RegExp(escape(OTHER[lang].get('data.notes')!))).first()).toBeVisible();
        await check(p, lang, 'the data page');
        await p.goBack();
      });
    }
  }
  expect([...seen].sort()).toHaveLength(17);
  await shot(phones.de, 'languages-phone-de');
  await shot(phones.es, 'languages-phone-es');
  await shot(projector, 'languages-projector-de');

  // The last step: the workshop ends, and the thanks are in each language.
  await consolePage.getByTestId('stop-session').click();
  await consolePage.getByRole('dialog').getByRole('button', { name: 'End the live session' }).click();
  await both((p) => expect(p.getByTestId('session-ended')).toBeVisible());
  await checkPhones('the end');
  await check(projector, 'de', 'projector at the end');
  facilitator.disconnect();
  expect(found).toEqual([]);
});
