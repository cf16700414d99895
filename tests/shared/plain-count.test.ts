import { describe, expect, it } from 'vitest';
import { isPlainCount, LOCALES } from '../../shared/locales';

describe('isPlainCount', () => {
  it('takes whole numbers from 0 to 999 only', () => {
    expect([0, 1, 12, 999].every(isPlainCount)).toBe(true);
    expect([-1, 1000, 1.5, NaN, Infinity, '3', null].some(isPlainCount)).toBe(false);
  });

  it.each(LOCALES)('writes each plain count as Intl.NumberFormat does in %s', (locale) => {
    const format = new Intl.NumberFormat(locale);
    for (let n = 0; n < 1000; n++) expect(String(n)).toBe(format.format(n));
    // Just past the range, some language groups or writes it otherwise, or at least the check must not claim it.
    expect(isPlainCount(1000)).toBe(false);
  });
});
