/**
 * The join screen's first paint, before Cairn's scripts arrive. `/join` and `/join/<code>` are what a
 * participant opens first, on whatever connection the room has: the HTML shell's inline script (built from
 * `first-screen-paint.ts` by `firstScreenScript` in vite.config.ts) paints the screen's heading, the language
 * picker and the code form with the classes the page itself uses (src/pages/join.vue,
 * src/components/live/LanguagePicker.vue, their boxes in the unscoped styles of src/layouts/PhoneLayout.vue),
 * in the language the page will show, so the page then mounts over it with the same boxes in the same places.
 * Nothing of a session is painted: only the catalogs' words and the code the address holds.
 *
 * The painted screen is `inert` (nothing in it can be focused, typed into or pressed): it is a picture of the
 * form until the page, which does the work, replaces it.
 *
 * Pure apart from the DOM it is given: it imports no Vue, no Quasar and no whole catalog (the build puts the
 * few words it needs into the inline script: `joinWordsOf`).
 */
import { LOCALES, LOCALE_NAMES, type Locale } from '../../shared/locales';
import { mdiTranslate } from '../theme/phone-icons';

/** The catalog keys of the words the join screen's first paint shows (src/i18n/locales/*.json). */
export const JOIN_WORD_KEYS = {
  title: 'join.title',
  codeHelp: 'join.codeHelp',
  code: 'join.code',
  find: 'join.find',
  language: 'language.label',
} as const;

/** The join screen's first words in one language. */
export type JoinWords = Record<keyof typeof JOIN_WORD_KEYS, string>;

/**
 * The join screen's words from one language's catalog, for the inline script. Each must be plain text, which
 * the page shows as it is (vite.config.ts leaves such a message uncompiled); a message with placeholders or
 * vue-i18n's special characters fails the build rather than paint something the page would not show.
 * @example joinWordsOf(en).title // 'Join the workshop'
 */
export function joinWordsOf(catalog: unknown): JoinWords {
  const words = {} as JoinWords;
  for (const [name, key] of Object.entries(JOIN_WORD_KEYS) as [keyof JoinWords, string][]) {
    const word = key.split('.').reduce<unknown>((node, part) => (node as Record<string, unknown> | undefined)?.[part], catalog);
    if (typeof word !== 'string' || !word || /[{}@$|]/.test(word)) throw new Error(`${key} is not a plain message: the join screen's first paint cannot show it`);
    words[name] = word;
  }
  return words;
}

/**
 * The join code a join route's address holds (`''` on `/join`), or null when the path is not a join route's
 * (the same paths as the join shell's, server/common/client-assets.ts).
 * @example joinCodeOf('/join/K7Q2M') // 'K7Q2M'
 */
export function joinCodeOf(pathname: string): string | null {
  const match = /^\/join(?:\/([^/]+))?\/?$/.exec(pathname);
  if (!match) return null;
  try {
    return match[1] ? decodeURIComponent(match[1]) : '';
  } catch {
    return null;
  }
}

/** The heading's font as the page sets it (`.text-h5` in Cairn's font, src/css/app.css). */
const HEADING_FONT = '400 1.5rem "Source Sans 3"';

/**
 * Keeps `heading` hidden until its font has arrived (as `font-display: block` would, for at most 3 s). Painted in
 * a fallback font, the heading is narrower than the page's own heading in Cairn's font, and the browser would
 * count the page's, drawn once the scripts have run, as a later and larger paint: the largest contentful paint
 * would wait for the scripts again. The font is preloaded by the shell, so it comes right after the HTML.
 */
function waitForFont(doc: Document, heading: HTMLElement, text: string): Promise<void> {
  const fonts = doc.fonts as FontFaceSet | undefined;
  if (!fonts || fonts.check(HEADING_FONT, text)) return Promise.resolve();
  heading.style.visibility = 'hidden';
  return new Promise<void>((resolve) => {
    const show = () => {
      heading.style.removeProperty('visibility');
      resolve();
    };
    fonts.load(HEADING_FONT, text).then(show, show);
    setTimeout(show, 3000);
  });
}

/** The name of the join shell's `<meta>` that lists the join page's files (written by `routeShells` in vite.config.ts). */
export const PRELOAD_AFTER_PAINT = 'cairn-preload-after-paint';

/**
 * Asks for the files listed in the shell's `PRELOAD_AFTER_PAINT` meta (the join page's, beyond the first script)
 * once the painted screen is on the screen: beside the first script rather than once it has run (the page mounts
 * about half a second sooner on a phone's link), yet after the first paint, which `modulepreload` links in the
 * shell's head made Lighthouse's simulation wait for.
 */
function preloadAfterPaint(doc: Document, painted: Promise<void>): void {
  const files = doc.querySelector(`meta[name="${PRELOAD_AFTER_PAINT}"]`)?.getAttribute('content')?.split(' ').filter(Boolean) ?? [];
  if (!files.length) return;
  const ask = () =>
    files.forEach((href) => {
      const link = doc.createElement('link');
      link.rel = 'modulepreload';
      link.crossOrigin = '';
      link.href = href;
      doc.head.appendChild(link);
    });
  void painted.then(() => requestAnimationFrame(() => setTimeout(ask, 0)));
}

/**
 * Paints the join screen into `root` in `locale`, with the code form's field holding `code`, as src/pages/join.vue
 * draws it before its page has looked the code up. Texts go in as text, never as markup.
 */
export function paintJoinScreen(doc: Document, root: HTMLElement, words: JoinWords, locale: Locale, code: string): void {
  const el = <K extends keyof HTMLElementTagNameMap>(tag: K, className: string, text?: string): HTMLElementTagNameMap[K] => {
    const node = doc.createElement(tag);
    if (className) node.className = className;
    if (text !== undefined) node.textContent = text;
    return node;
  };
  const append = <E extends HTMLElement>(parent: E, ...children: Element[]): E => {
    children.forEach((c) => parent.appendChild(c));
    return parent;
  };
  doc.documentElement.lang = locale;

  // The language picker, as LanguagePicker.vue draws it: its icon, its hidden name and the list of languages.
  const svg = doc.createElementNS('http://www.w3.org/2000/svg', 'svg');
  svg.setAttribute('viewBox', '0 0 24 24');
  const path = doc.createElementNS('http://www.w3.org/2000/svg', 'path');
  path.setAttribute('d', mdiTranslate);
  const icon = append(el('i', 'q-icon'), append(svg as unknown as HTMLElement, path));
  icon.setAttribute('aria-hidden', 'true');
  icon.style.fontSize = '20px';
  const select = append(
    el('select', ''),
    ...LOCALES.map((l) => {
      const option = el('option', '', LOCALE_NAMES[l]);
      option.value = l;
      option.lang = l;
      option.selected = l === locale;
      return option;
    }),
  );
  const picker = append(el('label', 'language-picker'), icon, el('span', 'visually-hidden', words.language), select);
  const heading = el('h1', 'col text-h5 q-mt-md q-mb-sm', words.title);
  const head = append(el('div', 'row items-center no-wrap'), heading, picker);
  const shown = waitForFont(doc, heading, words.title);

  // The code field, as Quasar's outlined input draws it (its label floats above a field that holds a code).
  const input = el('input', 'q-field__native q-placeholder join-code-input');
  Object.assign(input, { type: 'text', value: code, maxLength: 9, autocomplete: 'off' });
  input.setAttribute('aria-label', words.code);
  const control = append(
    el('div', 'q-field__control relative-position row no-wrap'),
    append(el('div', 'q-field__control-container col relative-position row no-wrap q-anchor--skip'), el('div', 'q-field__label no-pointer-events absolute ellipsis', words.code), input),
  );
  const bottom = append(el('div', 'q-field__bottom row items-start q-field__bottom--animated'), el('div', 'q-field__messages col'));
  const field = append(
    el('label', `q-field row no-wrap items-start q-field--outlined q-input q-field--labeled${code ? ' q-field--float' : ''} q-field--with-bottom`),
    append(el('div', 'q-field__inner relative-position col self-stretch'), control, bottom),
  );
  const button = append(
    el('button', 'q-btn q-btn-item non-selectable no-outline q-btn--unelevated q-btn--rectangle bg-primary text-white q-btn--actionable q-focusable q-hoverable q-btn--no-uppercase full-width'),
    el('span', 'q-focus-helper'),
    append(el('span', 'q-btn__content text-center col items-center q-anchor--skip justify-center row'), el('span', 'block', words.find)),
  );
  button.type = 'button';
  const form = append(el('form', 'q-form join-form'), el('p', 'text-muted', words.codeHelp), field, button);

  const page = append(el('main', 'cairn-phone-page'), head, form);
  page.inert = true;
  root.replaceChildren(append(el('div', 'cairn-phone'), append(el('div', 'cairn-phone-column'), page)));
  preloadAfterPaint(doc, shown);
}
