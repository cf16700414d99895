import { describe, expect, it } from 'vitest';
import PDFDocument from 'pdfkit';
import { FACES, faceOf, layoutBidi, scriptRuns, useFace } from '../../server/features/results/report-fonts';

// Notes as participants might write them (invented): Arabic, and Arabic with a number and a Latin word.
const ARABIC = 'مرحبا بالعالم';
const MIXED = 'رقم 42 في Harbour';
// Invented notes in the other scripts Source Sans 3 lacks, with their meaning: Hebrew "the lock is stuck",
// Korean "the bike lock is hard", Hindi (Devanagari) "the lock is stuck" with a conjunct (क्ष, "kṣa"), Thai
// "the lock is hard to open" with a tone mark above a vowel.
const HEBREW = 'המנעול תקוע';
const KOREAN = '자전거 자물쇠가 어려워요';
const DEVANAGARI = 'ताला फँसा है, रक्षा करें';
const THAI = 'ที่ล็อกเปิดยาก';

/** The glyph ids the face a text is drawn in gives each run, after shaping (pdfkit hands fontkit the run). */
function glyphIds(text: string): { face: string; ids: number[]; codePoints: number }[] {
  const doc = new PDFDocument({ size: 'A4' });
  return scriptRuns(text).map((run) => {
    useFace(doc, run.face, 'regular');
    // pdfkit keeps the font it embeds on `_font`; its fontkit font shapes a run as pdfkit will draw it.
    const embedded = (doc as unknown as { _font: { font: { layout(s: string): { glyphs: { id: number }[] } } } })._font;
    return { face: run.face?.key ?? 'Helvetica', ids: embedded.font.layout(run.text).glyphs.map((g) => g.id), codePoints: [...run.text].length };
  });
}

describe('the report’s fonts', () => {
  it('ships a fallback for the scripts Source Sans 3 lacks', () => {
    expect(FACES[0]!.key).toBe('source-sans-3-latin');
    expect(faceOf('a'.codePointAt(0)!)!.key).toBe('source-sans-3-latin');
    expect(faceOf('自'.codePointAt(0)!)!.key).toMatch(/^noto-sans-jp-/);
    expect(faceOf('ア'.codePointAt(0)!)!.key).toMatch(/^noto-sans-jp-/);
    expect(faceOf('م'.codePointAt(0)!)!.key).toBe('noto-sans-arabic-arabic');
    expect(faceOf('ש'.codePointAt(0)!)!.key).toBe('noto-sans-hebrew-hebrew');
    expect(faceOf('한'.codePointAt(0)!)!.key).toMatch(/^noto-sans-kr-/);
    expect(faceOf('न'.codePointAt(0)!)!.key).toBe('noto-sans-devanagari-devanagari');
    expect(faceOf('ก'.codePointAt(0)!)!.key).toBe('noto-sans-thai-thai');
  });

  it('draws Hebrew, Korean, Devanagari and Thai notes with real glyphs, never .notdef', () => {
    // OpenType spec (recommendations for OpenType fonts): glyph index 0 is the .notdef glyph, the box a
    // font draws for a character it lacks.
    for (const [note, script] of [[HEBREW, /hebrew/], [KOREAN, /noto-sans-kr/], [DEVANAGARI, /devanagari/], [THAI, /thai/]] as const) {
      const runs = glyphIds(note);
      for (const run of runs) expect(run.ids, `${note}: ${run.face}`).not.toContain(0);
      // The letters go to their script's face; spaces and Latin punctuation stay in Source Sans 3.
      for (const run of runs) expect(run.face, note).toMatch(new RegExp(`${script.source}|source-sans-3-latin`));
      expect(runs.some((r) => script.test(r.face)), note).toBe(true);
    }
    // The face shapes, not only maps: Devanagari's conjunct क्ष (three code points) and the candrabindu
    // syllable come out as fewer glyphs than code points (Unicode Standard, ch. 12: a virama joins consonants).
    const conjunct = glyphIds('रक्षा')[0]!;
    expect(conjunct.ids.length).toBeLessThan(conjunct.codePoints);
  });

  it('keeps a mark or joiner with the letter before it', () => {
    // A zero-width joiner (U+200D) lies in Source Sans 3's range too, but it shapes with the Devanagari
    // letters around it (Unicode Standard, ch. 12, "explicit half-consonants").
    const runs = scriptRuns('क्\u200dष ok');
    expect(runs.map((r) => r.text)).toEqual(['क्\u200dष', ' ok']);
    expect(runs[0]!.face!.key).toBe('noto-sans-devanagari-devanagari');
  });

  it('lays a Hebrew paragraph out from the right, as it does Arabic', () => {
    const doc = new PDFDocument({ size: 'A4' });
    doc.fontSize(10.5);
    const [line] = layoutBidi(doc, HEBREW, 400, 'regular');
    expect(line!.rtl).toBe(true);
    // Display order, left to right: the second word, the space, the first. Each Hebrew piece stays in
    // logical order, because fontkit reverses a right-to-left script's run as it shapes it.
    expect(line!.pieces.map((p) => p.text)).toEqual(['תקוע', ' ', 'המנעול']);
    expect(line!.pieces[0]!.face!.key).toBe('noto-sans-hebrew-hebrew');
    // …and fontkit does reverse it: the leftmost glyph it gives for המנעול is its last letter, ל.
    const doc2 = new PDFDocument({ size: 'A4' });
    useFace(doc2, line!.pieces[2]!.face, 'regular');
    const embedded = (doc2 as unknown as { _font: { font: { layout(s: string): { glyphs: { codePoints: number[] }[] } } } })._font;
    const glyphs = embedded.font.layout('המנעול').glyphs;
    expect(String.fromCodePoint(...glyphs[0]!.codePoints)).toBe('ל');
    expect(String.fromCodePoint(...glyphs.at(-1)!.codePoints)).toBe('ה');
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
