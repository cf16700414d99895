import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { baseCompile } from '@intlify/message-compiler';
import { LOCALES, pickLocale, pluralIndex } from '../../shared/locales';
import { PARTICIPANT_MAIL, participantMail } from '../../server/features/results/participant-mail';
import { DEFAULT_CONSENT_TEXT } from '../../shared/consent';
import { dotMeaning } from '../../shared/matrix';

type Tree = { [key: string]: string | Tree };
// Two sets of catalogs: the participant's screens' (locales/, loaded with the app) and the facilitator's
// screens' (facilitator/, merged in when a facilitator's screen opens).
const SETS = ['locales', 'facilitator'] as const;
const catalog = (locale: string, set: (typeof SETS)[number] = 'locales'): Tree =>
  JSON.parse(readFileSync(new URL(`../../src/i18n/${set}/${locale}.json`, import.meta.url), 'utf8'));

/** Every message of a catalog by its dotted key. */
function flatten(tree: Tree, prefix = ''): Map<string, string> {
  const out = new Map<string, string>();
  for (const [k, v] of Object.entries(tree)) {
    const key = prefix ? `${prefix}.${k}` : k;
    if (typeof v === 'string') out.set(key, v);
    else for (const [kk, vv] of flatten(v, key)) out.set(kk, vv);
  }
  return out;
}

/** A message's named placeholders, and how many plural forms it has (vue-i18n message syntax). */
function shape(message: string): { params: string[]; forms: number } {
  const params = [...message.matchAll(/\{(\w+)\}/g)].map((m) => m[1]!);
  return { params: [...new Set(params)].sort(), forms: message.split(' | ').length };
}

describe.each(SETS)('message catalogs (%s)', (set) => {
  const en = flatten(catalog('en', set));

  it.each(LOCALES.filter((l) => l !== 'en'))('%s has every English key, with the same placeholders and plural forms, and nothing more', (locale) => {
    const other = flatten(catalog(locale, set));
    expect([...other.keys()].sort()).toEqual([...en.keys()].sort());
    for (const [key, message] of en) {
      expect({ key, ...shape(other.get(key)!) }).toEqual({ key, ...shape(message) });
    }
  });

  it.each(LOCALES)('every message of %s compiles', (locale) => {
    for (const [key, message] of flatten(catalog(locale, set))) {
      const errors: string[] = [];
      baseCompile(message, { jit: true, location: false, onError: (e) => errors.push(e.message) });
      expect({ key, errors }).toEqual({ key, errors: [] });
    }
  });
});

describe('catalogs across sets', () => {
  it('never share a top-level section, so merging the facilitator’s into a language overwrites nothing', () => {
    const participant = Object.keys(catalog('en'));
    for (const key of Object.keys(catalog('en', 'facilitator'))) expect(participant, key).not.toContain(key);
  });

  it("shows the default data policy on an English phone word for word as the server keeps it", () => {
    // A phone shows join.defaultPolicy in its language where the workshop's policy is still the default.
    expect(flatten(catalog('en')).get('join.defaultPolicy')).toBe(DEFAULT_CONSENT_TEXT);
  });

  it("says what a dot means on an English phone as the console's preview does", () => {
    // The console's preview of the phone's words (shared/matrix.ts) and the phone's catalog agree.
    const en = flatten(catalog('en'));
    expect(en.get('vote.dotMeansLow')!.replace('{name}', 'cost')).toBe(dotMeaning({ label: 'Cost', dotMeans: 'low' }));
    expect(en.get('vote.dotMeansHigh')!.replace('{name}', 'joy')).toBe(dotMeaning({ label: 'Joy' }));
  });

  it('the participant e-mail has the same keys and placeholders in every language', () => {
    const keys = Object.keys(PARTICIPANT_MAIL.en).sort();
    for (const locale of LOCALES) {
      expect(Object.keys(PARTICIPANT_MAIL[locale]).sort()).toEqual(keys);
      for (const key of keys) expect(shape(PARTICIPANT_MAIL[locale][key]!)).toEqual(shape(PARTICIPANT_MAIL.en[key]!));
    }
  });
});

describe('languages', () => {
  it('takes the first browser language Cairn speaks, by its primary subtag', () => {
    // RFC 5646 §2.1: the primary language subtag comes first; region subtags follow a hyphen.
    expect(pickLocale(['fr-CH', 'de-AT', 'en'])).toBe('de');
    expect(pickLocale(['es-419'])).toBe('es');
    expect(pickLocale(['ja', 'zh-Hant'])).toBe('en');
    expect(pickLocale([])).toBe('en');
  });

  it('chooses plural forms by the CLDR plural categories of each language', () => {
    // CLDR plural rules (unicode.org, language_plural_rules): English, German and Spanish have "one" for 1 only among small integers.
    for (const l of LOCALES) {
      expect(pluralIndex(l, 1, 2)).toBe(0);
      expect(pluralIndex(l, 2, 2)).toBe(1);
      expect(pluralIndex(l, 0, 2)).toBe(1);
      expect(pluralIndex(l, 0, 3)).toBe(0);
      expect(pluralIndex(l, 1, 3)).toBe(1);
      expect(pluralIndex(l, 5, 3)).toBe(2);
    }
  });

  it('writes the participant e-mail in their language, with the date as that language writes it', () => {
    const mail = participantMail('de', { title: 'Erste Fahrt', date: '2027-04-15', retentionDays: 30 }, null);
    // German long date format (CLDR de, dateFormats long): "15. April 2027".
    // German quotation marks open low and close high (Duden, Anführungszeichen): „…“.
    expect(mail.subject).toBe('Bericht zum Workshop „Erste Fahrt“ (15. April 2027)');
    expect(mail.text).toMatch(/^Hallo,\n/);
    expect(mail.text).toContain('30 Tage nach dem Workshop gelöscht');
    const es = participantMail('es', { title: 'Primer viaje', date: '2027-04-15', retentionDays: null }, { from: 'Mira', text: 'Gracias.' });
    // Spanish long date format (CLDR es, dateFormats long): "15 de abril de 2027".
    expect(es.subject).toContain('15 de abril de 2027');
    // Spanish prefers angle quotation marks (RAE, Ortografía 2010, comillas): «…».
    expect(es.subject).toBe('Informe del taller «Primer viaje» (15 de abril de 2027)');
    expect(es.text).toContain('Mira añade:\n\nGracias.');
    expect(participantMail('en', { title: 'First ride', date: '2027-04-15', retentionDays: 0 }, null).text).toMatch(/^Hello,\n\nYou asked/);
  });
});
