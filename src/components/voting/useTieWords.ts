import { useI18n } from 'vue-i18n';
import type { TieLine } from '../../../shared/tally';

/**
 * Cairn's tie policy (shared/tally.ts selectTopN, as numbers by tieLine) in the screen's language: what is
 * selected, and what is left to pick. The console's carry-forward and the results page say it alike.
 * @example const tieWords = useTieWords(); tieWords({ places: 3, open: 1, count: 2, unvoted: false })
 */
export function useTieWords(): (line: TieLine) => string {
  const { t, n } = useI18n();
  return ({ places, open, count, unvoted }) => {
    let words = t('carryForward.policy', { n: n(places) });
    if (count > 0) {
      const named = { count: n(count), n: n(places), open: n(open) };
      const more = unvoted ? t('carryForward.policyUnvoted', named, count) : t(open === 1 ? 'carryForward.policyTiedOne' : 'carryForward.policyTied', named, count);
      words += ` ${more}`;
    }
    return words;
  };
}
