// No zod here: the phone's first script imports this file, and zod would add a fifth to it.

/** Every language Cairn's participant screens (join, phone, projector, the participant's e-mail) speak, English first (the fallback). */
export const LOCALES = ['en', 'de', 'es'] as const;
/** A language Cairn's participant screens speak, e.g. `'de'`. */
export type Locale = (typeof LOCALES)[number];

/** Whether a value names a language Cairn speaks. */
export function isLocale(value: unknown): value is Locale {
  return typeof value === 'string' && (LOCALES as readonly string[]).includes(value);
}

/** Each language's own name, as a picker shows it (a language is named in itself, so a reader finds theirs). */
export const LOCALE_NAMES: Readonly<Record<Locale, string>> = { en: 'English', de: 'Deutsch', es: 'Español' };

/**
 * The first of a browser's preferred languages (BCP 47 tags, most wanted first, as `navigator.languages`)
 * that Cairn speaks, matched on the primary language subtag; English when none is.
 * @example pickLocale(['fr-CH', 'de-AT', 'en']) // 'de'
 */
export function pickLocale(languages: readonly string[]): Locale {
  for (const tag of languages) {
    const primary = tag.trim().toLowerCase().split(/[-_]/)[0] ?? '';
    if (isLocale(primary)) return primary;
  }
  return 'en';
}

/**
 * Which of a message's plural forms a count takes, by the language's CLDR plural category
 * (`Intl.PluralRules`): catalogs write two forms, "one | other", or three, "none | one | other", where
 * nothing at all reads differently ("No notes yet").
 * @example pluralIndex('de', 1, 2) // 0
 */
export function pluralIndex(locale: string, count: number, forms: number): number {
  if (forms === 3) {
    if (count === 0) return 0;
    return new Intl.PluralRules(locale).select(count) === 'one' ? 1 : 2;
  }
  if (forms < 2) return 0;
  return new Intl.PluralRules(locale).select(count) === 'one' ? 0 : 1;
}

/**
 * Whether `Intl.NumberFormat` writes a value, in every language Cairn speaks, as its plain digits: a whole
 * number from 0 to 999 (no grouping, no sign, Latin digits in each of LOCALES; tests/shared/plain-count.test.ts
 * checks it against `Intl` for each). A screen can then write it with `String(value)` and make no formatter.
 * @example isPlainCount(12) // true
 * @example isPlainCount(1200) // false
 */
export function isPlainCount(value: unknown): value is number {
  return typeof value === 'number' && Number.isInteger(value) && value >= 0 && value < 1000;
}
