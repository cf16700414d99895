import { describe, expect, it } from 'vitest';
import { hex } from 'wcag-contrast';
import { LIGHT, PROJECTOR, TEXT_PAIRS, CRITERION_MARKS } from '../../src/theme/palette';
import { classPairsOf, pairsOf, styleFiles, textColoursOf } from './css-colours';

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

describe('every text/background pair the stylesheets set meets WCAG 2.2', () => {
  // Read from the components' <style> blocks and src/**/*.css, colours resolved through the palette.
  const files = styleFiles();
  // Quasar's colour classes on one element in the templates count too (`class="bg-red-1 text-negative"`).
  const pairs = [...files.flatMap(pairsOf), ...files.flatMap(classPairsOf)];

  it('finds the pairs (the reader still understands the stylesheets)', () => {
    expect(pairs.length).toBeGreaterThan(40);
  });

  for (const p of pairs) {
    // WCAG 2.2 success criterion 1.4.3 (Contrast, Minimum): 4.5:1, or 3:1 for large-scale text
    // (at least 18 pt = 24 CSS px, or 14 pt = 18.66 CSS px bold).
    const need = p.large ? 3 : 4.5;
    it(`${p.where}: ${p.fg} on ${p.bg} reaches ${need}:1`, () => {
      expect(hex(p.fg, p.bg)).toBeGreaterThanOrEqual(need);
    });
  }

  it('a light projector text colour set without its own background reads on both projector grounds (page and card)', () => {
    // Such a rule's text sits on the projector's page or on one of its cards; WCAG 2.2 SC 1.4.3, 4.5:1.
    const light: string[] = [PROJECTOR.text, PROJECTOR.muted, PROJECTOR.teal, PROJECTOR.sand, PROJECTOR.coral];
    const used = files.flatMap(textColoursOf).filter((c) => light.includes(c.colour));
    expect(used.length).toBeGreaterThan(10);
    for (const c of used) {
      for (const ground of [PROJECTOR.background, PROJECTOR.surface]) expect(hex(c.colour, ground), `${c.where} on ${ground}`).toBeGreaterThanOrEqual(4.5);
    }
  });

  it('every text colour the stylesheets set is checked on at least one background it sits on', () => {
    const checked = new Set([...TEXT_PAIRS.map(([fg]) => fg), ...pairs.map((p) => p.fg)]);
    const unchecked = files.flatMap(textColoursOf).filter((c) => !checked.has(c.colour));
    expect(unchecked).toEqual([]);
  });
});
