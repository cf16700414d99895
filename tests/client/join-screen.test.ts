import { describe, expect, it } from 'vitest';
import { JOIN_WORD_KEYS, joinCodeOf, joinWordsOf } from '../../src/boot/join-screen';
import { PHONE_LOCALE_KEY, phoneLocaleOf } from '../../src/i18n/phone-locale';
import { ROUTE_SHELLS, shellFor } from '../../server/common/client-assets';
import { LOCALES } from '../../shared/locales';
import en from '../../src/i18n/locales/en.json';
import de from '../../src/i18n/locales/de.json';
import es from '../../src/i18n/locales/es.json';

const CATALOGS = { en, de, es } as const;

describe("the join screen's first paint", () => {
  it('is painted on the join routes, the paths the join shell is sent for, and nowhere else', () => {
    const joinShell = ROUTE_SHELLS.find((s) => s.file.includes('join'))!.file;
    for (const [path, code] of [
      ['/join', ''],
      ['/join/', ''],
      ['/join/K7Q2M', 'K7Q2M'],
      ['/join/K7Q2M/', 'K7Q2M'],
      ['/join/K7%20Q2', 'K7 Q2'],
    ] as const) {
      expect(joinCodeOf(path), path).toBe(code);
      expect(shellFor(path, [joinShell]), path).toBe(`/${joinShell}`);
    }
    for (const path of ['/joins', '/join/a/b', '/phone/3f2a', '/', '/sign-in', '/join/%E0%A4%A']) expect(joinCodeOf(path), path).toBeNull();
  });

  it("shows the catalogs' own words in every language, as the page shows them", () => {
    for (const locale of LOCALES) {
      const words = joinWordsOf(CATALOGS[locale]);
      expect(words.title).toBe(CATALOGS[locale].join.title);
      expect(words.codeHelp).toBe(CATALOGS[locale].join.codeHelp);
      expect(words.code).toBe(CATALOGS[locale].join.code);
      expect(words.find).toBe(CATALOGS[locale].join.find);
      expect(words.language).toBe(CATALOGS[locale].language.label);
      expect(Object.keys(words).sort()).toEqual(Object.keys(JOIN_WORD_KEYS).sort());
    }
  });

  it('refuses a word the page would not show as it is written (placeholders, special characters) or one that is missing', () => {
    const withPlaceholder = { ...en, join: { ...en.join, title: 'Join {workshop}' } };
    expect(() => joinWordsOf(withPlaceholder)).toThrow(/join\.title/);
    const without = { ...en, language: {} };
    expect(() => joinWordsOf(without)).toThrow(/language\.label/);
  });

  it("is in the phone's language: the one picked on the phone, else the browser's first that Cairn speaks", () => {
    const store = (saved: string | null) => ({ getItem: (k: string) => (k === PHONE_LOCALE_KEY ? saved : null) });
    expect(phoneLocaleOf(store('es'), ['de-AT', 'en'])).toBe('es');
    expect(phoneLocaleOf(store(null), ['fr-CH', 'de-AT', 'en'])).toBe('de');
    expect(phoneLocaleOf(store('xx'), ['fr'])).toBe('en');
    const blocked = {
      getItem: () => {
        throw new Error('storage blocked');
      },
    };
    expect(phoneLocaleOf(blocked, ['es-MX'])).toBe('es');
  });
});
