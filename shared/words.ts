import { finite } from './numbers';

/**
 * A count with its noun, singular for exactly one: `countOf(1, 'option')` is "1 option". Refuses a count
 * that is not a finite number (it would read "NaN dots").
 * @example countOf(4, 'dot') // '4 dots'
 */
export function countOf(n: number, word: string, pluralWord = `${word}s`): string {
  finite('A count', n);
  return `${n} ${n === 1 ? word : pluralWord}`;
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
