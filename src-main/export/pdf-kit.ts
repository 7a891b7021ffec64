/**
 * pdfkit helpers shared by the tree PDF and the design report: a document that collects its
 * bytes, text made safe for the standard PDF fonts, the scene renderer, and a paginating
 * table writer.
 */
import PDFDocument from 'pdfkit';
import type { Scene } from './tree-scene.ts';

export type Doc = PDFKit.PDFDocument;

/**
 * The standard PDF fonts carry the WinAnsi character set only; symbols outside it are
 * spelled out so the file reads the same in every viewer (µ ± ° · × … stay as they are).
 */
const SPELL: Record<string, string> = {
  'Ω': 'ohm', 'θ': 'theta', 'η': 'eff', '−': '-', 'Δ': 'delta ', '≤': '<=', '≥': '>=', '√': 'sqrt', '→': '->',
  '←': '<-', '≈': '~', '≲': '<~',
};

/** The characters WinAnsi places at 0x80–0x9F. */
const WIN_ANSI_EXTRA = '€‚ƒ„…†‡ˆ‰Š‹ŒŽ‘’“”•–—˜™š›œžŸ';

export function pdfText(s: string): string {
  let out = '';
  for (const ch of s) {
    const m = SPELL[ch];
    if (m !== undefined) { out += m; continue; }
    const c = ch.codePointAt(0)!;
    // Printable ASCII and the Latin-1 supplement are in WinAnsi; anything else becomes '?'.
    if ((c >= 0x20 && c < 0x7f) || (c >= 0xa0 && c <= 0xff) || WIN_ANSI_EXTRA.includes(ch) || ch === '\n') out += ch;
    else if (c < 0x20) out += ' ';
    else out += '?';
  }
  return out;
}

export function newDoc(opts: PDFKit.PDFDocumentOptions = {}): { doc: Doc; done: Promise<Uint8Array> } {
  const doc = new PDFDocument({ autoFirstPage: true, compress: true, info: { Title: 'Railwright', Producer: 'railwright', Creator: 'railwright', CreationDate: new Date(0) }, ...opts });
  const chunks: Uint8Array[] = [];
  const done = new Promise<Uint8Array>((resolve, reject) => {
    doc.on('data', (c: Uint8Array) => chunks.push(c));
    doc.on('end', () => {
      const n = chunks.reduce((a, c) => a + c.length, 0);
      const out = new Uint8Array(n);
      let o = 0;
      for (const c of chunks) { out.set(c, o); o += c.length; }
      resolve(out);
    });
    doc.on('error', reject);
  });
  return { doc, done };
}

/** Draw a scene with its top-left corner at (x, y), scaled by `scale`. */
export function drawScene(doc: Doc, scene: Scene, x: number, y: number, scale: number): void {
  doc.save();
  doc.translate(x, y);
  doc.scale(scale);
  for (const p of scene.prims) {
    if (p.t === 'rect') {
      if (p.w <= 0 || p.h <= 0) continue;
      if (p.r > 0) doc.roundedRect(p.x, p.y, p.w, p.h, p.r); else doc.rect(p.x, p.y, p.w, p.h);
      if (p.dash) doc.dash(p.dash[0]!, { space: p.dash[1] ?? p.dash[0]! });
      doc.lineWidth(p.width || 0.5);
      if (p.fill && p.stroke) doc.fillAndStroke(p.fill, p.stroke);
      else if (p.fill) doc.fill(p.fill);
      else if (p.stroke) doc.stroke(p.stroke);
      doc.undash();
    } else if (p.t === 'line') {
      if (p.pts.length < 2) continue;
      doc.moveTo(p.pts[0]!.x, p.pts[0]!.y);
      for (const q of p.pts.slice(1)) doc.lineTo(q.x, q.y);
      if (p.dash) doc.dash(p.dash[0]!, { space: p.dash[1] ?? p.dash[0]! });
      doc.lineWidth(p.width).stroke(p.stroke);
      doc.undash();
      if (p.arrow) {
        const b = p.pts[p.pts.length - 1]!;
        const a = p.pts[p.pts.length - 2]!;
        const len = Math.hypot(b.x - a.x, b.y - a.y) || 1;
        const ux = (b.x - a.x) / len, uy = (b.y - a.y) / len;
        doc.moveTo(b.x, b.y).lineTo(b.x - 6 * ux - 3 * uy, b.y - 6 * uy + 3 * ux).lineTo(b.x - 6 * ux + 3 * uy, b.y - 6 * uy - 3 * ux).closePath().fill(p.stroke);
      }
    } else {
      const font = p.bold ? (p.italic ? 'Helvetica-BoldOblique' : 'Helvetica-Bold') : p.italic ? 'Helvetica-Oblique' : 'Helvetica';
      doc.font(font).fontSize(p.size).fillColor(p.fill);
      doc.text(pdfText(p.text), p.x, p.y, { lineBreak: false, baseline: 'alphabetic' });
    }
  }
  doc.restore();
}

export interface Column {
  header: string;
  width: number;
  align?: 'left' | 'right';
}

/** A table that breaks across pages, repeating its header; returns the y after it. */
export function table(doc: Doc, cols: Column[], rows: string[][], opts: { x?: number; size?: number; zebra?: boolean } = {}): number {
  const x0 = opts.x ?? doc.page.margins.left;
  const size = opts.size ?? 8;
  const pad = 2.5;
  const bottom = () => doc.page.height - doc.page.margins.bottom;
  const rowHeight = (cells: string[], font: string) => {
    doc.font(font).fontSize(size);
    const one = doc.currentLineHeight(true);
    let h = one;
    cells.forEach((c, i) => {
      const t = pdfText(c || ' ');
      const w = cols[i]!.width - 2 * pad;
      // Measuring a wrapped height is slow; most cells fit on one line.
      if (doc.widthOfString(t) > w || t.includes('\n')) h = Math.max(h, doc.heightOfString(t, { width: w }));
    });
    return h + 2 * pad;
  };
  const drawRow = (cells: string[], y: number, font: string, fill: string | null) => {
    const h = rowHeight(cells, font);
    const total = cols.reduce((a, c) => a + c.width, 0);
    if (fill) doc.rect(x0, y, total, h).fill(fill);
    let x = x0;
    doc.font(font).fontSize(size).fillColor('#1d2733');
    cells.forEach((c, i) => {
      doc.text(pdfText(c ?? ''), x + pad, y + pad, { width: cols[i]!.width - 2 * pad, align: cols[i]!.align ?? 'left' });
      x += cols[i]!.width;
    });
    doc.moveTo(x0, y + h).lineTo(x0 + total, y + h).lineWidth(0.3).stroke('#c5ccd5');
    return y + h;
  };
  let y = doc.y;
  const header = cols.map((c) => c.header);
  if (y + rowHeight(header, 'Helvetica-Bold') * 2 > bottom()) { doc.addPage(); y = doc.page.margins.top; }
  y = drawRow(header, y, 'Helvetica-Bold', '#e3e8ee');
  rows.forEach((r, i) => {
    const h = rowHeight(r, 'Helvetica');
    if (y + h > bottom()) {
      doc.addPage();
      y = doc.page.margins.top;
      y = drawRow(header, y, 'Helvetica-Bold', '#e3e8ee');
    }
    y = drawRow(r, y, 'Helvetica', opts.zebra !== false && i % 2 === 1 ? '#f6f8fa' : null);
  });
  doc.x = x0;
  doc.y = y + 6;
  return doc.y;
}
