import { finite } from './numbers';

// English plural categories from the CLDR rules the runtime ships (Intl.PluralRules): "one" for exactly 1.
const ENGLISH_PLURAL = new Intl.PluralRules('en');

/** Plurals English does not make with a plain "s", for the nouns Cairn counts. */
const IRREGULAR: Readonly<Record<string, string>> = { person: 'people', criterion: 'criteria', child: 'children' };

/**
 * The plural of an English noun Cairn counts: irregular ones from a short list, "-es" after s, x, z,
 * ch and sh ("sketches", "boxes"), "-ies" after a consonant and y ("copies"), else "-s".
 * @example pluralOf('sketch') // 'sketches'
 */
export function pluralOf(word: string): string {
  const irregular = IRREGULAR[word];
  if (irregular) return irregular;
  if (/(?:s|x|z|ch|sh)$/.test(word)) return `${word}es`;
  if (/[^aeiou]y$/.test(word)) return `${word.slice(0, -1)}ies`;
  return `${word}s`;
}

/**
 * A count with its noun in the form English's plural rule (CLDR, through `Intl.PluralRules`) asks for:
 * `countOf(1, 'option')` is "1 option", `countOf(5, 'sketch')` "5 sketches". Give the noun in the
 * singular; `pluralWord` overrides the plural. Refuses a count that is not a finite number ("NaN dots").
 * @example countOf(1, 'person') // '1 person'
 */
export function countOf(n: number, word: string, pluralWord?: string): string {
  finite('A count', n);
  return `${n} ${ENGLISH_PLURAL.select(n) === 'one' ? word : (pluralWord ?? pluralOf(word))}`;
}

/** Number words a prompt may use for a count of dots ("Spend your three dots …"). */
const NUMBER_WORDS = ['zero', 'one', 'two', 'three', 'four', 'five', 'six', 'seven', 'eight', 'nine', 'ten', 'eleven', 'twelve'];

/** A count of dots written as the `{dots}` placeholder, digits or a number word ("{dots} dots", "3 dots", "three dots", "one dot"). */
const DOT_COUNT = new RegExp(`(?:\\{dots\\}|\\b(?:\\d+|${NUMBER_WORDS.join('|')}))\\s+dots?\\b`, 'gi');

/**
 * A dot vote's prompt with every count of dots it names taken from the vote's budget, so a prompt
 * written for three dots reads right when the vote gives four; `{dots}` is the number alone (as in
 * shared/templates.ts showPrompt), and "{dots} dots" agrees in number ("1 dot").
 * "a dot" is left alone: it names a single dot to place, not the budget.
 * @example fillDots('Spend your three dots on the best ideas.', 4) // 'Spend your 4 dots on the best ideas.'
 */
export function fillDots(prompt: string, dots: number | null | undefined): string {
  if (dots === null || dots === undefined || !Number.isInteger(dots) || dots < 1) return prompt;
  return prompt.replace(DOT_COUNT, () => countOf(dots, 'dot')).replace(/\{dots\}/gi, String(dots));
}

/**
 * A percentage with a no-break space before the sign, so "85 %" never breaks across two lines. Refuses a
 * value that is not a finite number (it would read "Infinity %") and digits that are not a whole number.
 * @example percentText(85.04, 1) // '85\u00a0%'
 */
export function percentText(value: number, digits = 0): string {
  finite('A percentage', value);
  if (!Number.isInteger(digits) || digits < 0 || digits > 10) throw new RangeError(`Digits must be a whole number from 0 to 10, not ${digits}`);
  const f = 10 ** digits;
  return `${Math.round(value * f) / f}\u00a0%`;
}

/**
 * A sketching prompt with the `{sketches}` placeholder taken from the item's setting: "{sketches}
 * sketches" agrees in number ("1 sketch") and `{sketches}` alone is the number.
 * @example fillSketches('Draw {sketches} sketches.', 6) // 'Draw 6 sketches.'
 */
export function fillSketches(prompt: string, sketches: number | null | undefined): string {
  if (sketches === null || sketches === undefined || !Number.isInteger(sketches) || sketches < 1) return prompt;
  return prompt.replace(/\{sketches\}\s+sketch(?:es)?\b/gi, () => countOf(sketches, 'sketch')).replace(/\{sketches\}/gi, String(sketches));
}

/**
 * A calendar date (`YYYY-MM-DD`) as the reader's locale writes it in full ("15 April 2027",
 * "April 15, 2027", "15. April 2027"), through `Intl`; the one date format of Cairn's pages. An empty
 * or malformed date reads as it is.
 * @example dayText('2027-04-15', 'en-GB') // '15 April 2027'
 */
export function dayText(isoDate: string | null | undefined, locale?: string): string {
  if (!isoDate || !/^\d{4}-\d{2}-\d{2}$/.test(isoDate)) return isoDate ?? '';
  // Read and written in UTC, so the day never moves with the viewer's time zone.
  return new Intl.DateTimeFormat(locale, { dateStyle: 'long', timeZone: 'UTC' }).format(new Date(`${isoDate}T00:00:00Z`));
}

/**
 * An instant as the reader's locale writes a date and a 24-hour time ("15 April 2027, 14:05"), through
 * `Intl`, in the reader's time zone unless one is given.
 * @example dateTimeText(Date.UTC(2027, 3, 15, 12, 5), 'en-GB', 'UTC') // '15 April 2027 at 12:05'
 */
export function dateTimeText(ms: number, locale?: string, timeZone?: string): string {
  return new Intl.DateTimeFormat(locale, { dateStyle: 'long', timeStyle: 'short', hourCycle: 'h23', timeZone }).format(new Date(ms));
}

/**
 * The calendar date of an instant as the reader's locale writes it in full ("16 December 2026"), in the
 * reader's time zone unless one is given: the same format as `dayText`, for instants.
 * @example dateText(Date.UTC(2026, 11, 16, 15, 5), 'en-GB', 'UTC') // '16 December 2026'
 */
export function dateText(ms: number, locale?: string, timeZone?: string): string {
  return new Intl.DateTimeFormat(locale, { dateStyle: 'long', timeZone }).format(new Date(ms));
}

/**
 * The time of day of an instant on a 24-hour clock ("15:05"), as Cairn's plans write times, in the reader's
 * time zone unless one is given.
 * @example timeText(Date.UTC(2026, 11, 16, 15, 5), 'en-US', 'UTC') // '15:05'
 */
export function timeText(ms: number, locale?: string, timeZone?: string): string {
  return new Intl.DateTimeFormat(locale, { hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZone }).format(new Date(ms));
}
