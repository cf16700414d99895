import fs from 'node:fs';
import path from 'node:path';
import { createRequire } from 'node:module';
import bidiFactory from 'bidi-js';

/**
 * The report's type: Source Sans 3 (Cairn's typeface) for every script it has, and for the scripts it
 * lacks a fallback from an @fontsource package shipped with the app (Noto Sans Arabic, Hebrew,
 * Devanagari, Thai, JP and KR), so a note reads as its participant wrote it. Text with right-to-left letters is laid out line by line
 * and put in display order with the Unicode Bidirectional Algorithm (bidi-js), since pdfkit draws every
 * line left to right in the order it is given.
 */

/** A weight the report writes in. */
export type Weight = 'regular' | 'bold';

/** One font file pair (regular and bold) and the code points it draws. */
export interface Face {
  /** The name the face is registered under, without the weight. */
  key: string;
  files: Record<Weight, string>;
  ranges: [number, number][];
}

const require = createRequire(import.meta.url);

// The code point ranges of a subset, from the package's unicode.json ("U+0600-06FF,U+0750-077F").
function parseRanges(list: string): [number, number][] {
  return list
    .split(',')
    .filter(Boolean)
    .map((r) => {
      const [a, b] = r.trim().replace(/U\+/g, '').split('-');
      return [parseInt(a!, 16), parseInt(b ?? a!, 16)] as [number, number];
    });
}

/**
 * The faces of one @fontsource package, subset by subset in the order given (all of them when none
 * is), in WOFF (version 1): pdfkit reads WOFF, not WOFF2. A package that is missing gives none.
 */
function packageFaces(pkgName: string, family: string, subsets?: readonly string[]): Face[] {
  try {
    const pkg = path.dirname(require.resolve(`${pkgName}/package.json`));
    const unicode = JSON.parse(fs.readFileSync(path.join(pkg, 'unicode.json'), 'utf8')) as Record<string, string>;
    const keys = subsets ?? Object.keys(unicode);
    return keys.flatMap((key) => {
      const subset = key.replace(/^\[(\d+)\]$/, '$1');
      const file = (weight: number) => path.join(pkg, 'files', `${family}-${subset}-${weight}-normal.woff`);
      if (!unicode[key] || !fs.existsSync(file(400)) || !fs.existsSync(file(700))) return [];
      return [{ key: `${family}-${subset}`, files: { regular: file(400), bold: file(700) }, ranges: parseRanges(unicode[key]) }];
    });
  } catch {
    return [];
  }
}

/**
 * Every face the report may use, in the order a character is looked up: Cairn's Source Sans 3 first,
 * then the fallbacks for the scripts it lacks.
 */
export const FACES: readonly Face[] = [
  ...packageFaces('@fontsource/source-sans-3', 'source-sans-3', ['latin', 'latin-ext', 'vietnamese', 'greek', 'greek-ext', 'cyrillic', 'cyrillic-ext']),
  ...packageFaces('@fontsource/noto-sans-arabic', 'noto-sans-arabic', ['arabic']),
  ...packageFaces('@fontsource/noto-sans-hebrew', 'noto-sans-hebrew', ['hebrew']),
  ...packageFaces('@fontsource/noto-sans-devanagari', 'noto-sans-devanagari', ['devanagari']),
  ...packageFaces('@fontsource/noto-sans-thai', 'noto-sans-thai', ['thai']),
  // Japanese before Korean: the Han characters both cover are drawn in one face, Noto Sans JP's.
  ...packageFaces('@fontsource/noto-sans-jp', 'noto-sans-jp'),
  ...packageFaces('@fontsource/noto-sans-kr', 'noto-sans-kr'),
];

/** Whether Cairn's own typeface was found; without it the report falls back to pdfkit's Helvetica (Latin-1 only). */
export const HAS_FONTS = FACES.length > 0 && FACES[0]!.key === 'source-sans-3-latin';

/** The face that draws a code point: the first that has it, else Source Sans 3's Latin (a missing-glyph box). */
export function faceOf(codePoint: number): Face | null {
  if (!HAS_FONTS) return null;
  for (const face of FACES) {
    for (const [a, b] of face.ranges) if (codePoint >= a && codePoint <= b) return face;
  }
  return FACES[0]!;
}

// Marks and joiners shape with the letter before them (a Devanagari virama and zero-width joiner, a Thai
// tone mark): they stay in that letter's run when its face has them, rather than falling to Source Sans 3.
const CLUSTER_PART = /^[\p{M}\u200c\u200d]$/u;

function covers(face: Face | null, codePoint: number): boolean {
  return face !== null && face.ranges.some(([a, b]) => codePoint >= a && codePoint <= b);
}

/** Splits text into runs that one face can draw, in the order given. */
export function scriptRuns(text: string): { face: Face | null; text: string }[] {
  const runs: { face: Face | null; text: string }[] = [];
  for (const ch of text) {
    const last = runs.at(-1);
    const cp = ch.codePointAt(0)!;
    const face = last && CLUSTER_PART.test(ch) && covers(last.face, cp) ? last.face : faceOf(cp);
    if (last && last.face === face) last.text += ch;
    else runs.push({ face, text: ch });
  }
  return runs;
}

const registered = new WeakMap<PDFKit.PDFDocument, Set<string>>();

/**
 * Selects a face and weight on a document, registering its file the first time it is used (a report
 * in Latin letters never loads the Japanese files).
 */
export function useFace(doc: PDFKit.PDFDocument, face: Face | null, weight: Weight): void {
  if (!face) {
    doc.font(weight === 'bold' ? 'Helvetica-Bold' : 'Helvetica');
    return;
  }
  const name = `${face.key}-${weight}`;
  let done = registered.get(doc);
  if (!done) registered.set(doc, (done = new Set()));
  if (!done.has(name)) {
    doc.registerFont(name, face.files[weight]);
    done.add(name);
  }
  doc.font(name);
}

// Letters of the right-to-left scripts (Hebrew, Arabic, Syriac, Thaana, N'Ko, … and their presentation forms).
const RTL_LETTER = /[\u0590-\u08ff\ufb1d-\ufdff\ufe70-\ufefc\u{10800}-\u{10fff}\u{1e800}-\u{1efff}]/u;
// Scripts whose runs the shaping engine (fontkit) itself turns into display order: it reverses a run whose
// script reads right to left (Arabic, Hebrew).
const RTL_FACE = /noto-sans-(arabic|hebrew)/;

/** Whether text holds a right-to-left letter, so it needs the bidirectional layout. */
export function hasRtl(text: string): boolean {
  return RTL_LETTER.test(text);
}

const bidi = bidiFactory();

/** A piece of a line in display order: its face and the characters to hand to pdfkit. */
export interface LinePiece {
  face: Face | null;
  text: string;
}

/** One laid-out line: its pieces left to right, its width, and whether the paragraph reads right to left. */
export interface BidiLine {
  pieces: LinePiece[];
  width: number;
  rtl: boolean;
}

/**
 * Lays out text that holds right-to-left letters: each paragraph's direction from its first strong
 * letter (UAX #9, rules P2–P3), lines broken at spaces to fit `width` in logical order, then each line
 * put in display order (rules L1–L4 through bidi-js: reversed runs, mirrored brackets). A piece drawn in
 * a right-to-left script keeps its logical order, because the shaping engine joins its letters and
 * reverses the run itself; every other piece is handed over in display order.
 * @example layoutBidi(doc, 'مرحبا بالعالم', 400, 'regular')[0].rtl // true
 */
export function layoutBidi(doc: PDFKit.PDFDocument, text: string, width: number, weight: Weight): BidiLine[] {
  const lines: BidiLine[] = [];
  for (const paragraph of text.split('\n')) {
    if (paragraph.length === 0) {
      lines.push({ pieces: [], width: 0, rtl: false });
      continue;
    }
    const levels = bidi.getEmbeddingLevels(paragraph);
    const rtl = (levels.paragraphs[0]?.level ?? 0) % 2 === 1;
    for (const [start, end] of breakLines(doc, paragraph, width, weight)) {
      const pieces = displayPieces(paragraph, levels, start, end);
      lines.push({ pieces, width: piecesWidth(doc, pieces, weight), rtl });
    }
  }
  return lines;
}

// The width of pieces drawn one after the other.
function piecesWidth(doc: PDFKit.PDFDocument, pieces: LinePiece[], weight: Weight): number {
  let w = 0;
  for (const p of pieces) {
    useFace(doc, p.face, weight);
    w += doc.widthOfString(p.text, { features: [] } as PDFKit.Mixins.TextOptions);
  }
  return w;
}

// Where lines start and end (end exclusive) in a paragraph, broken after spaces; a word longer than a line
// is cut where it must be. Widths are measured in logical order: reordering never changes a line's width.
function breakLines(doc: PDFKit.PDFDocument, paragraph: string, width: number, weight: Weight): [number, number][] {
  const measure = (s: string) => piecesWidth(doc, scriptRuns(s).map((r) => ({ face: r.face, text: r.text })), weight);
  const words = paragraph.match(/\S+\s*|\s+/g) ?? [paragraph];
  const out: [number, number][] = [];
  let start = 0;
  let end = 0;
  for (const word of words) {
    const candidate = paragraph.slice(start, end + word.length);
    if (end > start && measure(candidate.trimEnd()) > width) {
      out.push([start, end]);
      start = end;
    }
    end += word.length;
    // A single word wider than the line: cut it character by character.
    while (measure(paragraph.slice(start, end).trimEnd()) > width && end - start > 1) {
      let cut = start + 1;
      while (cut < end && measure(paragraph.slice(start, cut + 1)) <= width) cut++;
      out.push([start, cut]);
      start = cut;
    }
  }
  if (end > start) out.push([start, end]);
  return out;
}

// The pieces of one line in display order.
function displayPieces(paragraph: string, levels: ReturnType<typeof bidi.getEmbeddingLevels>, start: number, end: number): LinePiece[] {
  // Trailing spaces take the paragraph's level (rule L1) and are not drawn at a line's end.
  let last = end;
  while (last > start && /\s/.test(paragraph[last - 1]!)) last--;
  if (last === start) return [];
  const order: number[] = [];
  for (let i = start; i < last; i++) order.push(i);
  // Rule L2: reverse each run of levels, highest first (bidi-js lists the ranges in the order to apply them).
  // The ranges are places on the line as it is being reordered, not characters.
  for (const [from, to] of bidi.getReorderSegments(paragraph, levels, start, last - 1)) {
    const lo = from - start;
    const hi = to - start;
    order.splice(lo, hi - lo + 1, ...order.slice(lo, hi + 1).reverse());
  }
  const mirrored = bidi.getMirroredCharactersMap(paragraph, levels.levels, start, last - 1);
  const pieces: (LinePiece & { rtlRun: boolean; indices: number[] })[] = [];
  for (const i of order) {
    // The low half of a surrogate pair belongs to the character the high half starts.
    const low = i > start && /[\udc00-\udfff]/.test(paragraph[i]!) && /[\ud800-\udbff]/.test(paragraph[i - 1]!);
    const face = faceOf(paragraph.codePointAt(low ? i - 1 : i)!);
    const ch = mirrored.get(i) ?? paragraph[i]!;
    const rtlRun = face !== null && RTL_FACE.test(face.key) && levels.levels[i]! % 2 === 1;
    const prev = pieces.at(-1);
    if (prev && prev.face === face && prev.rtlRun === rtlRun) {
      prev.indices.push(i);
      prev.text += ch;
    } else pieces.push({ face, text: ch, rtlRun, indices: [i] });
  }
  return pieces.map((p) => ({
    face: p.face,
    // The shaping engine reverses a right-to-left script's run itself: hand it the letters in logical order.
    text: p.rtlRun ? [...p.indices].sort((x, y) => x - y).map((i) => paragraph[i]!).join('') : p.text,
  }));
}
