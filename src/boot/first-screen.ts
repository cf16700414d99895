/**
 * A joined phone's first screen, painted before Cairn's scripts arrive. The phone page keeps what it shows
 * at the top of the screen (the activity's position, title, timer and prompt, in the words it showed them)
 * under `cairn.screen.<session>`; on a reload or a return to the page, the HTML shell's inline script
 * (built from `first-screen-paint.ts` by `firstScreenScript` in vite.config.ts) paints it with the classes
 * the page itself uses, so a participant on a slow connection reads the current activity at once instead
 * of after the scripts have arrived, run and connected. The page then mounts over it and the socket brings
 * it up to date. Nothing of a session is painted without the participant's token for it on this phone, and
 * nothing of it ever comes from the server in the HTML.
 *
 * Pure apart from the DOM it is given: it imports no Vue, no Quasar and no catalog, so the inline script stays
 * a few kilobytes.
 */
import { formatCountdown, remainingMs } from '../../shared/clock';
import type { TimerState } from '../../shared/schemas/live';

/** What the phone page keeps of its first screen: the texts exactly as it showed them. */
export interface FirstScreen {
  sessionId: string;
  /** The language the texts are in (the page's `lang`). */
  lang: string;
  /** The participant's display name, as the top row shows it. */
  name: string;
  /** The top row's height in CSS pixels as it was shown (a long name takes a line of its own above the controls). */
  topHeight: number;
  /** How far below the top row's top edge the name stood (beside the controls it is centred on them; above them, at the top). */
  nameOffset: number;
  /** "Activity 2 of 9", in the phone's language. */
  position: string;
  title: string;
  prompt: string;
  timer: TimerState;
}

/** The storage key of a session's kept first screen. */
export const firstScreenKey = (sessionId: string): string => `cairn.screen.${sessionId}`;
/** The storage key of the participant's token for a session (set when the phone joins). */
export const participantTokenKey = (sessionId: string): string => `cairn.participant.${sessionId}`;

/** The session a path shows a phone page of (`/phone/<session>`, not its sub-pages), or null. */
export function phoneSessionOf(pathname: string): string | null {
  const match = /^\/phone\/([^/]+)\/?$/.exec(pathname);
  return match ? decodeURIComponent(match[1]!) : null;
}

const isText = (v: unknown): v is string => typeof v === 'string';
const TIMER_STATUSES = new Set(['idle', 'running', 'paused', 'ended']);
const isNumberOrNull = (v: unknown): boolean => v === null || (typeof v === 'number' && Number.isFinite(v));

/** The kept record if it is whole and of `sessionId`, else null (an old or damaged record paints nothing). */
export function parseFirstScreen(raw: string | null, sessionId: string): FirstScreen | null {
  if (!raw) return null;
  let value: unknown;
  try {
    value = JSON.parse(raw);
  } catch {
    return null;
  }
  const r = value as Partial<FirstScreen> | null;
  if (!r || typeof r !== 'object' || r.sessionId !== sessionId) return null;
  if (![r.lang, r.name, r.position, r.title, r.prompt].every(isText)) return null;
  if (![r.topHeight, r.nameOffset].every((n) => typeof n === 'number' && n >= 0 && n < 1000)) return null;
  const t = r.timer as Partial<TimerState> | undefined;
  if (!t || !TIMER_STATUSES.has(t.status as string) || !isNumberOrNull(t.endsAt) || !isNumberOrNull(t.remainingMs)) return null;
  if (typeof t.durationMs !== 'number' || !Number.isFinite(t.durationMs)) return null;
  return r as FirstScreen;
}

/** Read access to the phone's storage (localStorage, or a map in tests). */
export interface KeptStore {
  getItem(key: string): string | null;
}

/**
 * The first screen to paint for `pathname`: only on a phone page, only when this phone holds the
 * participant's token for that session and a whole kept screen of it.
 * @example firstScreenFor('/join', localStorage) // null
 */
export function firstScreenFor(pathname: string, store: KeptStore): FirstScreen | null {
  const sessionId = phoneSessionOf(pathname);
  if (!sessionId || !store.getItem(participantTokenKey(sessionId))) return null;
  return parseFirstScreen(store.getItem(firstScreenKey(sessionId)), sessionId);
}

/** The countdown's text at `nowMs` (the page shows the same before its clock sync: it starts from the phone's clock). */
export const countdownText = (screen: FirstScreen, nowMs: number): string => formatCountdown(remainingMs(screen.timer, nowMs));

/**
 * Paints `screen` into `root` with the phone page's own classes (src/layouts/PhoneLayout.vue, src/pages/phone.vue,
 * src/components/live/CountdownClock.vue): the same column, top row and activity card, so the page's mount replaces
 * it with the same boxes in the same places. Texts go in as text, never as markup.
 */
export function paintFirstScreen(doc: Document, root: HTMLElement, screen: FirstScreen, nowMs: number): void {
  const el = <K extends keyof HTMLElementTagNameMap>(tag: K, className: string, text?: string): HTMLElementTagNameMap[K] => {
    const node = doc.createElement(tag);
    node.className = className;
    if (text !== undefined) node.textContent = text;
    return node;
  };
  const append = (parent: HTMLElement, ...children: HTMLElement[]): HTMLElement => {
    children.forEach((c) => parent.appendChild(c));
    return parent;
  };
  doc.documentElement.lang = screen.lang;
  // The name alone where it stood, in a row as tall as it was with the controls beside or below it (they come with the page).
  // Only classes the page's own scripts name: a phone route's shell carries just the rules those can use (vite.config.ts).
  const name = el('div', 'text-weight-bold cairn-me-name', screen.name);
  name.style.marginTop = `${screen.nameOffset}px`;
  const top = append(el('div', 'row items-center q-py-sm cairn-phone-top'), name);
  Object.assign(top.style, { minHeight: `${screen.topHeight}px`, alignItems: 'flex-start', paddingTop: '0' });
  const section = append(
    el('div', 'q-card__section q-card__section--vert'),
    el('div', 'text-overline text-muted', screen.position),
    el('h1', 'text-h5 q-my-xs', screen.title),
    el('div', `cairn-countdown cairn-countdown--large q-my-sm cairn-phone-countdown${screen.timer.status === 'paused' ? ' cairn-countdown--paused' : ''}`, countdownText(screen, nowMs)),
    el('p', 'cairn-prompt', screen.prompt),
  );
  const card = append(el('div', 'q-card q-card--bordered q-card--flat no-shadow cairn-activity-card'), section);
  const page = append(el('main', 'cairn-phone-page'), top, card);
  const layout = append(el('div', 'cairn-phone'), append(el('div', 'cairn-phone-column'), page));
  root.replaceChildren(layout);
}

/** Write access to the phone's storage. */
export interface KeepingStore {
  setItem(key: string, value: string): void;
  removeItem(key: string): void;
}

/**
 * Keeps `screen` as the first screen of its session's next load, or forgets the session's kept screen
 * (`null`: the session has ended, or the phone shows no activity). A full or blocked storage only costs
 * the early paint.
 */
export function keepFirstScreen(store: KeepingStore, sessionId: string, screen: FirstScreen | null): void {
  try {
    if (screen) store.setItem(firstScreenKey(sessionId), JSON.stringify(screen));
    else store.removeItem(firstScreenKey(sessionId));
  } catch {
    // Nothing to do: the next load paints once its scripts have run.
  }
}
