import { describe, expect, it } from 'vitest';
import { hasVisibleText, normaliseText, textProblem } from '../../shared/text';
import { typedText } from '../../shared/schemas/text';

describe('normaliseText', () => {
  it('composes to NFC (UAX #15 §1.2: e + U+0301 COMBINING ACUTE ACCENT is canonically equivalent to U+00E9)', () => {
    expect(normaliseText('Ine\u0301s')).toBe('In\u00e9s');
  });

  it('drops bidi overrides, embeddings and isolates (UAX #9 §2.1–2.4) and control characters', () => {
    expect(normaliseText('\u202Eadmin\u202C')).toBe('admin');
    expect(normaliseText('\u2067Noor\u2069 Haddad')).toBe('Noor Haddad');
    expect(normaliseText('Kofi\u0007\u0000 Mensah\r\n')).toBe('Kofi Mensah');
  });

  it('keeps line breaks and tabs in text that may run over several lines', () => {
    expect(normaliseText('Dock was full\n\tagain\u0008', true)).toBe('Dock was full\n\tagain');
  });

  it('keeps a line break typed as CRLF or a lone CR as one LF, and as a space in one-line text', () => {
    expect(normaliseText('Windows line\r\nbreak', true)).toBe('Windows line\nbreak');
    expect(normaliseText('old\rline', true)).toBe('old\nline');
    expect(normaliseText('Ana\r\nLima')).toBe('Ana Lima');
  });
});

describe('hasVisibleText', () => {
  it.each([
    ['zero-width space, joiner and non-joiner', '\u200B\u200C\u200D'],
    ['byte order mark', '\uFEFF'],
    ['word joiner and soft hyphen', '\u2060\u00AD'],
    ['Hangul filler (a Default_Ignorable_Code_Point in Unicode DerivedCoreProperties.txt)', '\u3164'],
    ['left-to-right and right-to-left marks', '\u200E\u200F'],
    ['no-break and ideographic spaces', '\u00A0\u3000'],
  ])('is false for %s only', (_what, text) => {
    expect(hasVisibleText(text)).toBe(false);
  });

  it('is true as soon as one character shows, in any script', () => {
    for (const text of ['a', '\u200BA', 'ß', '山', '🚲', 'ن']) expect(hasVisibleText(text)).toBe(true);
  });
});

describe('typedText', () => {
  const Name = typedText({ required: 'Enter a name', max: 10, tooLong: 'Too long' });
  it('normalises before it measures, and refuses invisible text with a clear message', () => {
    expect(Name.parse('  \u202EAna\u202C ')).toBe('Ana');
    expect(Name.safeParse('\u200B\uFEFF').error?.issues[0]?.message).toMatch(/only invisible characters/);
    expect(Name.safeParse('   ').error?.issues[0]?.message).toBe('Enter a name');
    expect(Name.safeParse('Marchetti Cleo').error?.issues[0]?.message).toBe('Too long');
  });
});

describe('textProblem', () => {
  const rule = { required: 'Enter a name', max: 10, tooLong: 'Too long' };
  const Name = typedText(rule);
  it('says what typedText refuses, first message first, without the schema library (the phone checks a note with it)', () => {
    for (const input of ['  \u202EAna\u202C ', '\u200B\uFEFF', '   ', 'Marchetti Cleo', 'Ine\u0301s', '', '\u0007']) {
      expect(textProblem(input, rule)).toBe(Name.safeParse(input).error?.issues[0]?.message ?? null);
    }
  });
});
