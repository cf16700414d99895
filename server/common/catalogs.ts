import { compile, createCoreContext, registerMessageCompiler, registerMessageResolver, resolveValue, translate, type CoreContext } from '@intlify/core-base';
import en from '../../src/i18n/facilitator/en.json';
import de from '../../src/i18n/facilitator/de.json';
import es from '../../src/i18n/facilitator/es.json';
import enPhone from '../../src/i18n/locales/en.json';
import dePhone from '../../src/i18n/locales/de.json';
import esPhone from '../../src/i18n/locales/es.json';
import { madeNameOf } from '../../shared/made-names';
import { LOCALES, pluralIndex, type Locale } from '../../shared/locales';
import type { Wording } from '../../shared/wording';

// The server writes what the facilitator's screens write (activity types and phases in the report, …) from
// the same catalogs, compiled here at first use by vue-i18n's own message compiler: one copy of the words.
// Plain text (none of vue-i18n's special characters) is shown as it is, as on the client (src/i18n/index.ts).
registerMessageCompiler((message, context) => (typeof message === 'string' && !/[{}@$|]/.test(message) ? () => message : compile(message, context)));
registerMessageResolver(resolveValue);

const pluralRules = Object.fromEntries(LOCALES.map((l) => [l, (choice: number, forms: number) => pluralIndex(l, choice, forms)]));
let context: CoreContext<string> | undefined;

function catalogs(): CoreContext<string> {
  context ??= createCoreContext({
    locale: 'en',
    fallbackLocale: 'en',
    // The names Cairn gives ("Team 3", "Participant 12") are worded from the participant catalogs' `madeName`,
    // as every screen words them (src/i18n/names.ts); the sets share no top-level section (tests/shared/catalogs.test.ts).
    messages: { en: { ...en, madeName: enPhone.madeName }, de: { ...de, madeName: dePhone.madeName }, es: { ...es, madeName: esPhone.madeName } },
    pluralRules,
    missingWarn: false,
    fallbackWarn: false,
  }) as unknown as CoreContext<string>;
  return context;
}

/**
 * The facilitator catalogs' words in one language, as the shared rules' findings need them (shared/wording.ts):
 * `t(key, params, plural)` with the language's CLDR plural forms, and numbers through `Intl`.
 * @example facilitatorWording('de').t('phase.ideate') // 'Ideen finden'
 */
export function facilitatorWording(locale: Locale = 'en'): Wording {
  return {
    t: (key, params = {}, plural) => {
      const ctx = catalogs();
      ctx.locale = locale;
      const out = plural === undefined ? translate(ctx, key, params) : translate(ctx, key, params, plural);
      return typeof out === 'string' ? out : key;
    },
    num: (value, digits = 0) => new Intl.NumberFormat(locale, { maximumFractionDigits: digits }).format(value),
  };
}

/**
 * The language of the files Cairn writes of a workshop's results: the PDF report and the CSV exports.
 * English for now; this is the one place that picks it, so letting the facilitator choose is one change.
 */
export const RESULTS_FILE_LOCALE: Locale = 'en';

/**
 * A stored name in a language: a name Cairn gave ("Team 3", "Participant 12", shared/made-names.ts) worded
 * from the catalogs (`madeName.<kind>`), a name a person chose as it is.
 * @example nameIn(facilitatorWording('de'), 'Participant 2') // 'Person 2'
 */
export function nameIn(w: Wording, name: string): string {
  const made = madeNameOf(name);
  return made ? w.t(`madeName.${made.kind}`, { n: w.num(made.n) }) : name;
}
