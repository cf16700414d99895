import PDFDocument from 'pdfkit';
import { FACES, HAS_FONTS, hasRtl, layoutBidi, scriptRuns, useFace, type Weight } from './report-fonts';
import { LIGHT } from '../../../shared/palette';

/** Cairn's print colours, from the light palette (shared/palette.ts): teal headings, text, muted grey and the line of a rule. */
export const INK = { teal: LIGHT.primary, text: LIGHT.text, muted: LIGHT.muted, rule: LIGHT.line };

/** Space between lines of the report's text, in points. */
const LINE_GAP = 1.5;

/** What a PDF says about itself in its document information. */
export interface PdfInfo {
  title: string;
  author: string;
  subject: string;
  createdAt: number;
}

/**
 * Cairn's generic A4 PDF writer over pdfkit: text stays text (no markup is read), every script in
 * Source Sans 3 where it has one and in a shipped fallback where it has not, right-to-left text in order;
 * headings, labelled lines, bullets, pictures, rules, tables and page footers. What a document says lives
 * with its content (report-content.ts for the workshop report).
 */
export class PdfWriter {
  readonly doc: PDFKit.PDFDocument;
  private readonly left = 56;
  private readonly width: number;

  constructor(
    info: PdfInfo,
    private pictures: Map<string, Buffer> = new Map(),
  ) {
    this.doc = new PDFDocument({
      size: 'A4',
      margins: { top: 56, bottom: 64, left: 56, right: 56 },
      bufferPages: true,
      info: {
        Title: info.title,
        Author: info.author,
        Subject: info.subject,
        Creator: 'Cairn',
        CreationDate: new Date(info.createdAt),
      },
    });
    this.width = this.doc.page.width - this.left - 56;
  }

  /** Writes text in the fonts its scripts need; `at` places it, otherwise it flows on. */
  write(
    text: string,
    o: { size?: number; weight?: Weight; color?: string; at?: { x: number; y: number }; width?: number; indent?: number; gap?: number } = {},
  ): void {
    const doc = this.doc;
    doc.fontSize(o.size ?? 10.5).fillColor(o.color ?? INK.text);
    // Helvetica has no glyphs outside Windows-1252: without the shipped fonts, other letters become '?'.
    const safe = HAS_FONTS ? text : text.replace(/[^\x20-\x7e\u00a0-\u00ff\n]/g, '?');
    const width = o.width ?? this.width - (o.indent ?? 0);
    const x = o.at ? o.at.x : this.left + (o.indent ?? 0);
    if (HAS_FONTS && hasRtl(safe)) {
      this.writeBidi(safe, x, o.at ? o.at.y : doc.y, width, o.weight ?? 'regular');
    } else {
      const runs = scriptRuns(safe.length ? safe : ' ');
      const options = { width, lineGap: LINE_GAP };
      runs.forEach((run, i) => {
        useFace(doc, run.face, o.weight ?? 'regular');
        const continued = i < runs.length - 1;
        if (i === 0) doc.text(run.text, x, o.at ? o.at.y : doc.y, { ...options, continued });
        else doc.text(run.text, { continued });
      });
    }
    if (o.gap) doc.y += o.gap;
  }

  /**
   * Writes text that holds right-to-left letters line by line in display order (report-fonts.ts): a
   * right-to-left paragraph is set flush right, its first word at the right edge.
   */
  private writeBidi(text: string, x: number, y: number, width: number, weight: Weight): void {
    const doc = this.doc;
    let top = y;
    for (const line of layoutBidi(doc, text, width, weight)) {
      let at = line.rtl ? x + width - line.width : x;
      for (const piece of line.pieces) {
        useFace(doc, piece.face, weight);
        // Features make pdfkit shape the piece as one run, so the engine puts a right-to-left run in order.
        const options = { lineBreak: false, features: [] } as PDFKit.Mixins.TextOptions;
        doc.text(piece.text, at, top, options);
        at += doc.widthOfString(piece.text, options);
      }
      useFace(doc, FACES[0] ?? null, weight);
      top += doc.currentLineHeight(true) + LINE_GAP;
    }
    doc.x = x;
    doc.y = top;
  }

  /** The height a text takes at a width (measured in the regular Latin face, close enough for layout). */
  heightOf(text: string, width: number, size = 10.5): number {
    useFace(this.doc, FACES[0] ?? null, 'regular');
    this.doc.fontSize(size);
    if (HAS_FONTS && hasRtl(text)) return layoutBidi(this.doc, text, width, 'regular').length * (this.doc.currentLineHeight(true) + LINE_GAP);
    return this.doc.heightOfString(text || ' ', { width, lineGap: LINE_GAP });
  }

  /** Starts a new page when less than `needed` points are left. */
  ensure(needed: number): void {
    if (this.doc.y + needed > this.doc.page.height - this.doc.page.margins.bottom) this.doc.addPage();
  }

  /** A heading kept with what follows it: level 1 and 2 in teal, 3 in the text colour. */
  heading(text: string, level: 1 | 2 | 3 = 1): void {
    const size = level === 1 ? 16 : level === 2 ? 13 : 11;
    // Keep a heading with at least two lines of what follows it.
    this.ensure(size * 2 + 60);
    this.doc.y += level === 1 ? 10 : 6;
    this.write(text, { size, weight: 'bold', color: level === 3 ? INK.text : INK.teal, gap: 3 });
  }

  /** A small bold label with its value below it. */
  line(label: string, value: string): void {
    this.ensure(28);
    this.write(label, { size: 9, weight: 'bold', color: INK.muted });
    this.write(value, { gap: 4 });
  }

  /** A bulleted line, with who wrote it when given. */
  bullet(text: string, by?: string): void {
    this.ensure(24);
    const y = this.doc.y;
    this.write('•', { at: { x: this.left + 4, y }, width: 10, color: INK.muted });
    this.doc.y = y;
    this.write(by ? `${text} — ${by}` : text, { indent: 16, gap: 2 });
  }

  /** Places a picture given to the writer by its id (only those the document may show are ever given) below the line before it. */
  picture(pictureId: string | null): void {
    const data = pictureId ? this.pictures.get(pictureId) : undefined;
    if (!data) return;
    this.ensure(126);
    try {
      this.doc.image(data, this.left + 16, this.doc.y + 2, { fit: [180, 116] });
      this.doc.y += 122;
    } catch {
      // A picture pdfkit cannot read is left out; its caption is already written.
    }
    this.doc.x = this.left;
  }

  /** A thin line across the page. */
  rule(): void {
    const y = this.doc.y + 4;
    this.doc.moveTo(this.left, y).lineTo(this.left + this.width, y).lineWidth(0.5).strokeColor(INK.rule).stroke();
    this.doc.y = y + 6;
  }

  /** A table of plain text cells; rows grow with their longest cell and never split across pages. */
  table(columns: { label: string; width: number; align?: 'left' | 'right' }[], rows: string[][]): void {
    const row = (cells: string[], bold: boolean) => {
      const height = Math.max(...cells.map((c, i) => this.heightOf(c, columns[i]!.width - 6, 9.5))) + 4;
      this.ensure(height + 2);
      const y = this.doc.y;
      let x = this.left;
      cells.forEach((c, i) => {
        const col = columns[i]!;
        this.write(c, { at: { x, y: y + 2 }, width: col.width - 6, size: 9.5, weight: bold ? 'bold' : 'regular', color: bold ? INK.muted : INK.text });
        x += col.width;
      });
      this.doc.y = y + height;
      this.doc.moveTo(this.left, this.doc.y).lineTo(this.left + this.width, this.doc.y).lineWidth(0.4).strokeColor(INK.rule).stroke();
    };
    row(columns.map((c) => c.label), true);
    for (const r of rows) row(r, false);
    this.doc.y += 6;
    this.doc.x = this.left;
  }

  /** A line at the foot of every page (`text` gets the page's number from 1 and the page count). */
  footers(text: (page: number, pages: number) => string): void {
    const range = this.doc.bufferedPageRange();
    for (let i = range.start; i < range.start + range.count; i++) {
      this.doc.switchToPage(i);
      const bottom = this.doc.page.margins.bottom;
      // Writing inside the bottom margin would add a page; lift the margin while the footer is written.
      this.doc.page.margins.bottom = 0;
      const y = this.doc.page.height - 40;
      this.write(text(i + 1, range.count), {
        at: { x: this.left, y },
        size: 8,
        color: INK.muted,
      });
      this.doc.page.margins.bottom = bottom;
    }
  }

  /** The width text flows in, between the margins, in points. */
  get contentWidth(): number {
    return this.width;
  }

  /** Ends the document and gives its bytes. */
  finish(): Promise<Buffer> {
    const chunks: Buffer[] = [];
    this.doc.on('data', (c: Buffer) => chunks.push(c));
    const done = new Promise<Buffer>((resolve, reject) => {
      this.doc.on('end', () => resolve(Buffer.concat(chunks)));
      this.doc.on('error', reject);
    });
    this.doc.end();
    return done;
  }
}
