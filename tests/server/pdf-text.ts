import * as pdfjs from 'pdfjs-dist/legacy/build/pdf.mjs';

/** The text of every page of a PDF, read back with PDF.js (an independent reader), whitespace collapsed. */
export async function pdfText(pdf: Buffer): Promise<string> {
  const doc = await pdfjs.getDocument({ data: new Uint8Array(pdf), useSystemFonts: false, isEvalSupported: false }).promise;
  const pages: string[] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const content = await (await doc.getPage(i)).getTextContent();
    pages.push(content.items.map((item) => ('str' in item ? item.str + (item.hasEOL ? '\n' : '') : '')).join(''));
  }
  await doc.destroy();
  return pages.join('\n').replace(/\s+/g, ' ');
}
