/**
 * Import handlers: a load list from a CSV or XLSX file (read here, mapped and checked by the
 * pure functions of load-import.ts, applied as one undoable edit), and a project file opened
 * from its bytes (the web host's file picker).
 */
import { z } from 'zod';
import ExcelJS from 'exceljs';
import { ProjectStore, OpenError } from '../store/project-store.ts';
import type { LoadImportFile } from './contract.ts';
import { ApiFailure, handler } from './registry.ts';
import type { Session } from './session.ts';
import { buildSnapshot } from './snapshot.ts';
import { checkShapes, adoptBytes } from './files.ts';
import { guardDiscard } from './project.ts';
import {
  IMPORT_MAX_BYTES, IMPORT_MAX_CELL, IMPORT_MAX_COLUMNS, IMPORT_MAX_ROWS, applyImport, detectDelimiter, guessMapping, previewImport, readCsv,
} from './load-import.ts';

/** Base64 of at most `max` bytes, decoded; refuses other text naming the field. */
function decodeBase64(b64: string, max: number, field: string): Buffer {
  if (!/^[A-Za-z0-9+/]*={0,2}$/.test(b64)) throw new ApiFailure(`${field}: the file's bytes did not arrive as base64`, field);
  const bytes = Buffer.from(b64, 'base64');
  if (bytes.length > max) throw new ApiFailure(`${field}: the file is ${(bytes.length / 1048576).toFixed(1)} MiB, more than the ${max / 1048576} MiB accepted`, field);
  return bytes;
}

/** Text of one XLSX cell as a spreadsheet shows it (a percentage as "5%", a formula by its result). */
function xlsxCellText(cell: ExcelJS.Cell): string {
  const v = cell.value as unknown;
  const fmt = cell.numFmt ?? '';
  const num = (n: number) => (fmt.includes('%') ? `${Number((n * 100).toPrecision(12))}%` : String(n));
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return num(v);
  if (typeof v === 'string') return v;
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  if (v instanceof Date) return v.toISOString().slice(0, 10);
  if (typeof v === 'object') {
    const o = v as { richText?: { text: string }[]; result?: unknown; text?: unknown; error?: string };
    if (Array.isArray(o.richText)) return o.richText.map((r) => r.text).join('');
    if ('result' in o) return typeof o.result === 'number' ? num(o.result) : o.result === undefined || o.result === null ? '' : String(o.result);
    if (typeof o.text === 'string') return o.text;
    if (o.error) return String(o.error);
  }
  return String(v);
}

export async function readXlsx(bytes: Buffer, sheet?: string): Promise<{ sheets: string[]; sheet: string; rows: string[][] }> {
  const wb = new ExcelJS.Workbook();
  try {
    await wb.xlsx.load(bytes as unknown as ArrayBuffer);
  } catch (e) {
    throw new ApiFailure(`file: not a readable XLSX workbook (${(e as Error).message.slice(0, 120)})`, 'file');
  }
  const sheets = wb.worksheets.map((w) => w.name);
  const ws = sheet === undefined ? wb.worksheets[0] : wb.worksheets.find((w) => w.name === sheet);
  if (!ws) throw new ApiFailure(sheet === undefined ? 'file: the workbook has no sheet' : `sheet: no sheet "${sheet}" (have: ${sheets.join(', ')})`, 'sheet');
  if (ws.rowCount > IMPORT_MAX_ROWS + 1) throw new ApiFailure(`file: sheet "${ws.name}" has ${ws.rowCount} rows, more than ${IMPORT_MAX_ROWS}; split it`, 'file');
  if (ws.columnCount > IMPORT_MAX_COLUMNS) throw new ApiFailure(`file: sheet "${ws.name}" has ${ws.columnCount} columns, more than ${IMPORT_MAX_COLUMNS}`, 'file');
  const rows: string[][] = [];
  for (let r = 1; r <= ws.rowCount; r++) {
    const row = ws.getRow(r);
    const cells: string[] = [];
    for (let c = 1; c <= ws.columnCount; c++) cells.push(xlsxCellText(row.getCell(c)).slice(0, IMPORT_MAX_CELL * 20));
    while (cells.length && cells[cells.length - 1] === '') cells.pop();
    rows.push(cells);
  }
  return { sheets, sheet: ws.name, rows };
}

/** Read a load-list file's bytes into text cells (CSV or XLSX by content, then by name). */
export async function readLoadFile(s: Session, fileName: string, bytes: Buffer, sheet?: string): Promise<LoadImportFile> {
  const isZip = bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04;
  if (isZip || /\.xlsx$/i.test(fileName)) {
    if (!isZip) throw new ApiFailure(`file: ${fileName} is named .xlsx but is not an XLSX workbook`, 'file');
    const x = await readXlsx(bytes, sheet);
    return { fileName, format: 'xlsx', sheets: x.sheets, sheet: x.sheet, delimiter: null, decimalComma: false, rows: x.rows, preview: previewImport(s.requirements, x.rows, guessMapping(x.rows, s.requirements)) };
  }
  if (/\.xls$/i.test(fileName) || (bytes[0] === 0xd0 && bytes[1] === 0xcf)) throw new ApiFailure(`file: ${fileName} is an old binary workbook (.xls); save it as .xlsx or CSV`, 'file');
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    // Spreadsheets on some systems write CSV in a single-byte code page: read it as Latin-1.
    text = new TextDecoder('latin1').decode(bytes);
  }
  if (text.includes('\u0000')) throw new ApiFailure(`file: ${fileName} holds binary data, not CSV text`, 'file');
  const delimiter = detectDelimiter(text.replace(/^\uFEFF/, ''));
  const rows = readCsv(text, delimiter);
  const decimalComma = delimiter === ';';
  return { fileName, format: 'csv', sheets: [], sheet: null, delimiter, decimalComma, rows, preview: previewImport(s.requirements, rows, guessMapping(rows, s.requirements), decimalComma) };
}

const cells = z.array(z.array(z.string().max(IMPORT_MAX_CELL * 20)).max(IMPORT_MAX_COLUMNS)).max(IMPORT_MAX_ROWS + 1);
const mapping = z.object({
  headerRow: z.number().int().min(0).max(IMPORT_MAX_ROWS),
  columns: z.array(z.string().min(1).max(200).nullable()).max(IMPORT_MAX_COLUMNS),
  replace: z.boolean(),
}).strict();
/** A project opened from bytes travels in one request (the web host reads at most 16 MiB of body). */
const PROJECT_MAX_BYTES = 11 * 1024 * 1024;
const b64 = z.string().max(Math.ceil((IMPORT_MAX_BYTES * 4) / 3) + 8);

export const importHandlers = {
  'loads.importRead': handler('loads.importRead', z.object({ fileName: z.string().min(1).max(255), base64: b64, sheet: z.string().max(100).optional() }).strict(), async (s: Session, a) => {
    const bytes = decodeBase64(a.base64, IMPORT_MAX_BYTES, 'file');
    if (!bytes.length) throw new ApiFailure(`file: ${a.fileName} is empty`, 'file');
    return readLoadFile(s, a.fileName, bytes, a.sheet);
  }),
  'loads.importPreview': handler('loads.importPreview', z.object({ rows: cells, mapping, decimalComma: z.boolean().optional() }).strict(), (s: Session, a) =>
    previewImport(s.requirements, a.rows, a.mapping, a.decimalComma ?? false)),
  'loads.importApply': handler('loads.importApply', z.object({ rows: cells, mapping, decimalComma: z.boolean().optional(), onlyGoodRows: z.boolean().optional() }).strict(), async (s: Session, a) => {
    const r = applyImport(s.requirements, a.rows, a.mapping, { onlyGoodRows: a.onlyGoodRows, decimalComma: a.decimalComma });
    const { imported, skipped } = r;
    s.edit(`Import ${imported} load${imported === 1 ? '' : 's'}${a.mapping.replace ? ' (replacing the loads)' : ''}`, (_req, lib) => {
      checkShapes(r.requirements, lib);
      return { requirements: r.requirements };
    });
    return { ...(await buildSnapshot(s)), imported, skipped };
  }),
  'project.openBytes': handler('project.openBytes', z.object({ fileName: z.string().min(1).max(255), base64: z.string().max(Math.ceil((PROJECT_MAX_BYTES * 4) / 3) + 8), discard: z.boolean().optional() }).strict(), async (s: Session, a) => {
    guardDiscard(s, a.discard);
    if (!/\.rwproj$/i.test(a.fileName)) throw new ApiFailure(`file: ${a.fileName} is not a project file (.rwproj)`, 'file');
    const bytes = decodeBase64(a.base64, PROJECT_MAX_BYTES, 'file');
    let store: ProjectStore;
    try {
      // Read from the bytes into memory: nothing is written, no file on disk is touched.
      store = ProjectStore.fromBytes(bytes, null, {}, a.fileName);
    } catch (e) {
      if (e instanceof OpenError) throw new ApiFailure(e.message, 'file');
      throw e;
    }
    adoptBytes(s, store);
    return buildSnapshot(s);
  }),
};
