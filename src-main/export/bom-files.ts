/**
 * The BOM as CSV (RFC 4180, formula-neutralised; see csv.ts) and as XLSX (exceljs), with
 * units in the headers, a totals row, and the cost and safety notes under the table.
 */
import ExcelJS from 'exceljs';
import type { Bom } from '../engine/bom.ts';
import { compactRefs } from '../engine/bom.ts';
import { writeCsv, type CsvCell } from './csv.ts';
import { showText } from '../engine/text-rules.ts';

export const BOM_HEADER = [
  'Line', 'References', 'Qty (pcs)', 'Part class', 'Description', 'Value', 'Rating', 'Package',
  'Unit cost (currency units, estimate)', 'Extended cost (currency units, estimate)', 'Cost source', 'Library id', 'Stages', 'Specification sheet', 'Problem',
  'Manufacturer', 'Part number',
] as const;

/** What the manufacturer column says for a generic library row (no maker, no part number). */
export const GENERIC_MAKER = 'generic (procurement chooses a part meeting the rating)';

export const BOM_NOTES = [
  'Costs are estimates from the project part library; rows marked "invented estimate" are invented figures, not quotations.',
  'Planning aid only: the tool certifies nothing. Mains and isolation barriers can kill; creepage, clearance and touch current follow the applicable safety standard and local codes; a qualified engineer and the test lab decide.',
];

function round(x: number, d = 4): number {
  const p = 10 ** d;
  return Math.round(x * p) / p;
}

export function bomRows(bom: Bom): CsvCell[][] {
  return bom.lines.map((l) => [
    l.line, compactRefs(l.refs), l.quantity, l.partClass, l.description, l.value, l.rating, l.package,
    round(l.unitCost), round(l.extendedCost), l.costNote, l.libraryId ?? '', l.stages.join(' '), l.specRef ?? '', l.problem ?? '',
    l.manufacturer || (l.libraryId ? GENERIC_MAKER : ''), l.partNumber,
  ]);
}

/** Text cells with control, line-break and bidi characters shown as \u{..} (text-rules.ts). */
const safeCell = (c: CsvCell) => (typeof c === 'string' ? showText(c) : c);

export function bomToCsv(bom: Bom, title: string): string {
  const rows: CsvCell[][] = [
    [...BOM_HEADER],
    ...bomRows(bom).map((r) => r.map(safeCell)),
    ['Total', '', bom.totalParts, '', `${bom.lines.length} lines`, '', '', '', '', round(bom.totalCost), '', '', '', '', bom.problems.length ? `${bom.problems.length} parts not in the library` : '', '', ''],
    [],
    ...BOM_NOTES.map((n) => ['Note', n]),
    ['Project', showText(title)],
  ];
  return writeCsv(rows);
}

export async function bomToXlsx(bom: Bom, title: string): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'railwright';
  wb.created = new Date(0);
  wb.modified = new Date(0);
  const ws = wb.addWorksheet('BOM', { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.addRow([...BOM_HEADER]);
  ws.getRow(1).font = { bold: true };
  // exceljs writes text into sharedStrings.xml as is: what XML 1.0 forbids (and other
  // control, line-break and bidi characters) is written as \u{..} first (text-rules.ts).
  for (const r of bomRows(bom)) ws.addRow(r.map(safeCell));
  const first = 2;
  const last = bom.lines.length + 1;
  const total = ws.addRow(['Total', '', null, '', `${bom.lines.length} lines`, '', '', '', '', null, '', '', '', '', bom.problems.length ? `${bom.problems.length} parts not in the library` : '', '', '']);
  total.getCell(3).value = bom.lines.length ? { formula: `SUM(C${first}:C${last})`, result: bom.totalParts } : 0;
  total.getCell(10).value = bom.lines.length ? { formula: `SUM(J${first}:J${last})`, result: round(bom.totalCost) } : 0;
  total.font = { bold: true };
  ws.addRow([]);
  for (const n of BOM_NOTES) ws.addRow(['Note', n]);
  ws.addRow(['Project', showText(title)]);
  const widths = [6, 18, 9, 16, 44, 22, 22, 14, 14, 14, 18, 18, 20, 26, 40, 24, 22];
  widths.forEach((w, i) => { ws.getColumn(i + 1).width = w; });
  ws.getColumn(9).numFmt = '0.000';
  ws.getColumn(10).numFmt = '0.000';
  const buf = await wb.xlsx.writeBuffer();
  return new Uint8Array(buf as ArrayBuffer);
}
