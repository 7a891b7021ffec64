/** Text of a PDF, page by page, extracted with pdfjs-dist (legacy build for Node). */
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';
import { join } from 'node:path';

const FONTS = join(import.meta.dirname, '../../node_modules/pdfjs-dist/standard_fonts/');

export async function pdfPages(bytes: Uint8Array): Promise<string[]> {
  const doc = await getDocument({ data: new Uint8Array(bytes), useSystemFonts: false, isEvalSupported: false, standardFontDataUrl: FONTS }).promise;
  const pages: string[] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const page = await doc.getPage(i);
    const tc = await page.getTextContent();
    let s = '';
    for (const it of tc.items) {
      if (!('str' in it)) continue;
      s += it.str + (it.hasEOL ? '\n' : '');
    }
    pages.push(s);
  }
  await doc.destroy();
  return pages;
}

/** All pages, with line breaks folded into spaces so phrases that wrap still match. */
export async function pdfPlainText(bytes: Uint8Array): Promise<string> {
  return (await pdfPages(bytes)).join('\n').replace(/\s*\n\s*/g, ' ').replace(/ {2,}/g, ' ');
}

/** Every text item of every page with its printed size in points (from the text matrix), and the page size. */
export async function pdfTextItems(bytes: Uint8Array): Promise<Array<{ width: number; height: number; items: Array<{ str: string; size: number }> }>> {
  const doc = await getDocument({ data: new Uint8Array(bytes), useSystemFonts: false, isEvalSupported: false, standardFontDataUrl: FONTS }).promise;
  const pages: Array<{ width: number; height: number; items: Array<{ str: string; size: number }> }> = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const page = await doc.getPage(i);
    const vp = page.getViewport({ scale: 1 });
    const tc = await page.getTextContent();
    const items: Array<{ str: string; size: number }> = [];
    for (const it of tc.items) {
      if (!('str' in it) || !it.str.trim()) continue;
      // The text matrix [a b c d e f]: the glyphs' vertical scale is the printed size.
      const [, , c, d] = it.transform as number[];
      items.push({ str: it.str, size: Math.hypot(c!, d!) });
    }
    pages.push({ width: vp.width, height: vp.height, items });
  }
  await doc.destroy();
  return pages;
}
