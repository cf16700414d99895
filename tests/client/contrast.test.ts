import { describe, expect, it } from 'vitest';
import { hex } from 'wcag-contrast';
import { LIGHT, PROJECTOR, TEXT_PAIRS, CRITERION_MARKS } from '../../src/theme/palette';

describe('the contrast checker agrees with the W3C worked values', () => {
  // W3C "Understanding relative luminance" / WCAG 2.x contrast ratio (L1 + 0.05) / (L2 + 0.05).
  it('#777777 on white is 4.48:1 and fails AA (4.5, no rounding)', () => {
    expect(hex('#777777', '#ffffff')).toBeCloseTo(4.48, 2);
    expect(hex('#777777', '#ffffff')).toBeLessThan(4.5);
  });
  it('#767676 on white is 4.54:1, #595959 is 7.00:1, black is 21:1', () => {
    expect(hex('#767676', '#ffffff')).toBeCloseTo(4.54, 2);
    expect(hex('#595959', '#ffffff')).toBeCloseTo(7.0, 2);
    expect(hex('#000000', '#ffffff')).toBeCloseTo(21, 5);
  });
});

describe("Cairn's palettes meet WCAG 2.x AA for text", () => {
  // WCAG 2.x success criterion 1.4.3: at least 4.5:1 for normal text.
  for (const [fg, bg, where] of TEXT_PAIRS) {
    it(`${where}: ${fg} on ${bg}`, () => {
      expect(hex(fg, bg)).toBeGreaterThanOrEqual(4.5);
    });
  }

  it('the projector pairs reach 7:1 (AAA), since the screen is read from 8 m in a lit room', () => {
    // Common practice for projection: aim above AA, since projectors wash out contrast.
    for (const [fg, bg] of TEXT_PAIRS.filter(([, b]) => b === PROJECTOR.background)) {
      expect(hex(fg, bg)).toBeGreaterThanOrEqual(7);
    }
  });

  it('criterion dot colours stand out from the page (3:1 for graphics, WCAG 2.x 1.4.11) and each has its own shape and letter', () => {
    for (const m of CRITERION_MARKS) expect(hex(m.colour, LIGHT.surface)).toBeGreaterThanOrEqual(3);
    expect(new Set(CRITERION_MARKS.map((m) => m.shape)).size).toBe(CRITERION_MARKS.length);
    expect(new Set(CRITERION_MARKS.map((m) => m.letter)).size).toBe(CRITERION_MARKS.length);
  });
});
