import { i18n } from './index';

/**
 * What a dot under a criterion means, in the screen's language: the facilitator's own words where they
 * wrote some, else Cairn's from the criterion's name and direction ("a dot for each idea with little effort").
 */
export function criterionMeaning(c: { label: string; hint?: string; dotMeans?: 'high' | 'low' }): string {
  const hint = c.hint?.trim();
  if (hint) return hint;
  const locale = i18n.global.locale.value;
  // Inside a sentence the name reads in lower case, except in German, which writes every noun with a capital.
  const name = locale === 'de' ? c.label.trim() : c.label.trim().toLocaleLowerCase(locale);
  return i18n.global.t(c.dotMeans === 'low' ? 'vote.dotMeansLow' : 'vote.dotMeansHigh', { name });
}
