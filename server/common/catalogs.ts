import { compile, createCoreContext, registerMessageCompiler, registerMessageResolver, resolveValue, translate, type CoreContext } from '@intlify/core-base';
import en from '../../src/i18n/facilitator/en.json';
import de from '../../src/i18n/facilitator/de.json';
import es from '../../src/i18n/facilitator/es.json';
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
    messages: { en, de, es },
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
