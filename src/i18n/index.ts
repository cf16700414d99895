import { ref } from 'vue';
import { createI18n } from 'vue-i18n';
import { registerMessageCompiler, compile } from '@intlify/core-base';
import { Lang } from 'quasar';
// Quasar starts in US English anyway; importing it here only names it.
import enUS from 'quasar/lang/en-US.js';
import en from './locales/en.json';
import { LOCALES, isPlainCount, pluralIndex, type Locale } from '../../shared/locales';
import { PHONE_LOCALE_KEY, phoneLocaleOf } from './phone-locale';

/** The English catalog's shape: every other catalog has the same keys (tests/shared/catalogs.test.ts). */
export type MessageSchema = typeof en;

// The catalogs arrive precompiled (vite.config.ts turns each message with placeholders or plural forms into
// its syntax tree at build time, and leaves plain text as it is), so the phone loads vue-i18n's runtime
// without the message compiler; `compile` here only turns a tree into a function.
registerMessageCompiler((message, context) => (typeof message === 'string' ? () => message : compile(message, context)));

const pluralRules = Object.fromEntries(LOCALES.map((l) => [l, (choice: number, forms: number) => pluralIndex(l, choice, forms)]));

/** Cairn's message catalogs: English loaded with the app, German and Spanish when first needed. */
export const i18n = createI18n<[MessageSchema], Locale, false>({
  legacy: false,
  locale: 'en',
  fallbackLocale: 'en',
  messages: { en } as Record<Locale, MessageSchema>,
  pluralRules,
  missingWarn: false,
  fallbackWarn: false,
});

// `n(count)` without a format writes whole numbers below 1,000 as their plain digits, which is what
// `Intl.NumberFormat` writes for them in every language Cairn speaks (`isPlainCount` in shared/locales.ts): the first
// `Intl.NumberFormat` a page makes loads the browser's number data, 30 to 200 ms in Debian's Chromium, and a
// phone's screens count on every load (the activity's position, the dots left). Anything else, or with a format,
// goes to vue-i18n's own `n`.
const formatNumber = i18n.global.n as (...args: unknown[]) => string;
i18n.global.n = ((...args: unknown[]) =>
  args.length === 1 && isPlainCount(args[0]) ? String(args[0]) : formatNumber(...args)) as typeof i18n.global.n;

const loaders: Record<Exclude<Locale, 'en'>, () => Promise<{ default: unknown }>> = {
  de: () => import('./locales/de.json'),
  es: () => import('./locales/es.json'),
};
type QuasarPack = Parameters<typeof Lang.set>[0];
// Quasar's language files are typed loosely (`quasar/lang/*`); each is a language pack.
const quasarPacks: Record<Locale, () => Promise<{ default: QuasarPack }>> = {
  en: async () => ({ default: enUS as QuasarPack }),
  de: async () => ({ default: (await import('quasar/lang/de.js')).default as QuasarPack }),
  es: async () => ({ default: (await import('quasar/lang/es.js')).default as QuasarPack }),
};

/** The language the participant's screens show now (reactive), set only through `setLocale`. */
export const currentLocale = ref<Locale>('en');

/**
 * Shows the screens in `locale`: loads its catalog and Quasar's language pack the first time, then
 * switches vue-i18n, Quasar's components and the page's `lang` together.
 */
export async function setLocale(locale: Locale): Promise<void> {
  if (locale !== 'en' && !i18n.global.availableLocales.includes(locale)) {
    const catalog = await loaders[locale]();
    i18n.global.setLocaleMessage(locale, catalog.default as MessageSchema);
  }
  const pack = await quasarPacks[locale]();
  Lang.set(pack.default);
  i18n.global.locale.value = locale;
  currentLocale.value = locale;
  document.documentElement.lang = locale;
}

// The facilitator's screens (sign-in, workshops, plan, console, results) speak from their own catalogs, loaded
// with the first of those screens, so a phone never downloads the facilitator's words.
const facilitatorLoaders: Record<Locale, () => Promise<{ default: unknown }>> = {
  en: () => import('./facilitator/en.json'),
  de: () => import('./facilitator/de.json'),
  es: () => import('./facilitator/es.json'),
};
const facilitatorLoaded = new Set<Locale>();

/** Adds the facilitator's screens' messages (src/i18n/facilitator) to the catalog of the language shown now. */
export async function loadFacilitatorMessages(): Promise<void> {
  const locale = currentLocale.value;
  if (facilitatorLoaded.has(locale)) return;
  const catalog = await facilitatorLoaders[locale]();
  i18n.global.mergeLocaleMessage(locale, catalog.default as MessageSchema);
  facilitatorLoaded.add(locale);
}

/** The phone's language: the one its participant picked, else the browser's first that Cairn speaks (phone-locale.ts). */
export function phoneLocale(): Locale {
  return phoneLocaleOf(localStorage, navigator.languages ?? [navigator.language]);
}

/** Keeps the participant's pick of language on this phone and shows it. */
export async function choosePhoneLocale(locale: Locale): Promise<void> {
  localStorage.setItem(PHONE_LOCALE_KEY, locale);
  await setLocale(locale);
}

/** One piece of a message cut at its placeholders: plain text, or the name of the placeholder that stands there. */
export type MessagePart = { text: string; slot?: undefined } | { slot: string; text?: undefined };

/**
 * A translated message cut at the named placeholders, so a template can put an element (a count with a test
 * hook, a bold time) where each stands, in whatever order the language puts them.
 * @example messageParts(t, 'console.inRoom', ['online', 'joined']) // [{ text: 'In the room: ' }, { slot: 'online' }, …]
 */
export function messageParts(t: (key: string, named: Record<string, string>) => string, key: string, slots: readonly string[]): MessagePart[] {
  const marks = Object.fromEntries(slots.map((name, i) => [name, `\uE000${i}\uE000`]));
  return t(key, marks)
    .split(/\uE000(\d+)\uE000/)
    .map((piece, i) => (i % 2 === 1 ? { slot: slots[Number(piece)]! } : { text: piece }))
    .filter((part) => part.slot !== undefined || part.text !== '');
}
