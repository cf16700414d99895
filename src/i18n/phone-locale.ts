import { isLocale, pickLocale, type Locale } from '../../shared/locales';

/** Where a phone keeps the language its participant picked. */
export const PHONE_LOCALE_KEY = 'cairn.locale';

/**
 * The phone's language: the one its participant picked on this phone, else the first of the browser's
 * `languages` that Cairn speaks. Without vue-i18n, so that the HTML shell's inline script paints the join
 * screen in the language the page will show (src/boot/join-screen.ts); a storage that cannot be read
 * counts as no pick.
 * @example phoneLocaleOf({ getItem: () => null }, ['de-AT', 'en']) // 'de'
 */
export function phoneLocaleOf(store: { getItem(key: string): string | null }, languages: readonly string[]): Locale {
  let saved: string | null = null;
  try {
    saved = store.getItem(PHONE_LOCALE_KEY);
  } catch {
    // Blocked storage: the browser's languages decide.
  }
  return isLocale(saved) ? saved : pickLocale(languages);
}
