// Issue 15 item 2: the design report prints the tree on landscape A4 pages with no text
// below 6 pt, cut into overlapping parts when the tree is wide; read back with pdfjs-dist
// (an npm library), page sizes and every text item's printed size from the text matrix.
import { describe, expect, it } from 'vitest';
import ELK from 'elkjs/lib/elk.bundled.js';
import { prepareExport, exportReportPdf } from '../../src-main/export/bundle.ts';
import { REPORT_SECTIONS, TREE_MIN_PT } from '../../src-main/export/report-pdf.ts';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { tableToRows, type LibraryRow } from '../../src-main/engine/library.ts';
import { readCsv } from '../../src-main/export/csv.ts';
import type { ElkLike } from '../../src-main/engine/layout.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { demoHandPlan } from './demo-plan.ts';
import { bigPlan, bigRequirements } from './big-plan.ts';
import { pdfTextItems } from './pdf-text.ts';

const elk = new ELK() as unknown as ElkLike;

function defaultLibraryRows(): LibraryRow[] {
  const r = tableToRows(readCsv(readFileSync(join(import.meta.dirname, '../../db/default-library.csv'), 'utf8')));
  if (!r.ok) throw new Error('default library invalid');
  return r.rows;
}

async function treePages(req: ReturnType<typeof demoDocument>['requirements'], result: ReturnType<typeof demoHandPlan>) {
  const b = await prepareExport({ req, result, library: defaultLibraryRows(), elk });
  const pages = await pdfTextItems(await exportReportPdf(b));
  const tree = pages.filter((p) => p.items.some((i) => i.str.startsWith(REPORT_SECTIONS[1]!)));
  return { b, tree };
}

describe('report: the tree pages', () => {
  for (const [name, make] of [
    ['demo', () => { const req = demoDocument().requirements; return { req, result: demoHandPlan(req) }; }],
    ['40 rails', () => { const req = bigRequirements(120, 3, 5); return { req, result: bigPlan(req) }; }],
  ] as const) {
    it(`prints on landscape pages with every text ≥ ${TREE_MIN_PT} pt and every rail named (${name})`, { timeout: 60_000 }, async () => {
      const { req, result } = make();
      const { b, tree } = await treePages(req, result);
      expect(tree.length).toBeGreaterThanOrEqual(1);
      for (const p of tree) {
        // A4 landscape: 842 × 595 pt (ISO 216).
        expect(p.width).toBeCloseTo(841.89, 0);
        expect(p.height).toBeCloseTo(595.28, 0);
        for (const it of p.items) expect(it.size, `"${it.str}"`).toBeGreaterThanOrEqual(TREE_MIN_PT - 1e-6);
      }
      const text = tree.flatMap((p) => p.items.map((i) => i.str)).join('\n');
      for (const n of b.tree.nodes) expect(text, n.id).toContain(n.name);
      if (name === '40 rails') expect(tree.length).toBeGreaterThan(1);
    });
  }
});
