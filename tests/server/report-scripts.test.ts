import { describe, expect, it } from 'vitest';
import PDFDocument from 'pdfkit';
import { FACES, faceOf, layoutBidi } from '../../server/features/results/report-fonts';

// Notes as participants might write them (invented): Arabic, and Arabic with a number and a Latin word.
const ARABIC = 'مرحبا بالعالم';
const MIXED = 'رقم 42 في Harbour';

describe('the report’s fonts', () => {
  it('ships a fallback for the scripts Source Sans 3 lacks', () => {
    expect(FACES[0]!.key).toBe('source-sans-3-latin');
    expect(faceOf('a'.codePointAt(0)!)!.key).toBe('source-sans-3-latin');
    expect(faceOf('自'.codePointAt(0)!)!.key).toMatch(/^noto-sans-jp-/);
    expect(faceOf('ア'.codePointAt(0)!)!.key).toMatch(/^noto-sans-jp-/);
    expect(faceOf('م'.codePointAt(0)!)!.key).toBe('noto-sans-arabic-arabic');
  });

  it('lays a right-to-left paragraph out flush right, its first word rightmost', () => {
    const doc = new PDFDocument({ size: 'A4' });
    doc.fontSize(10.5);
    const [line] = layoutBidi(doc, ARABIC, 400, 'regular');
    expect(line!.rtl).toBe(true);
    // Display order, left to right: the second word, the space, then the first word.
    expect(line!.pieces.map((p) => p.text)).toEqual(['بالعالم', ' ', 'مرحبا']);
    // Unicode Bidirectional Algorithm (UAX #9, rules W and L2): in a right-to-left paragraph a number and a
    // Latin word keep their own left-to-right order, and the runs read from the right.
    const [mixed] = layoutBidi(doc, MIXED, 400, 'regular');
    // Pieces split where the face changes: the Latin word, number and spaces are drawn in Source Sans 3.
    expect(mixed!.pieces.map((p) => p.text).join('|')).toBe('Harbour |في| 42 |رقم');
  });
});
