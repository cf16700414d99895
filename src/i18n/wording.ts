import { useI18n } from 'vue-i18n';
import type { Wording } from '../../shared/wording';

/**
 * What the shared rules found, in the screen's language: a `Wording` over vue-i18n's `t` and `Intl` numbers in
 * the current locale, for `sayFinding` and `typeAndPhase` (shared/wording.ts). Call it in a component's setup.
 * @example const words = useWording(); sayFinding(words, 'scheduleWarning', SCHEDULE_MESSAGES, warning)
 */
export function useWording(): Wording {
  const { t, locale } = useI18n();
  return {
    t: (key, params = {}, plural) => (plural === undefined ? t(key, params) : t(key, params, plural)),
    num: (value, digits = 0) => new Intl.NumberFormat(locale.value, { maximumFractionDigits: digits }).format(value),
  };
}
