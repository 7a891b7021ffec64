/**
 * CSV as RFC 4180 describes it: CRLF line ends, fields with comma, quote, CR or LF quoted,
 * quotes doubled. Writing also neutralises spreadsheet formula injection.
 *
 * Neutralising rule (documented in docs/exports.md): a cell whose first character is one of
 * = + - @ TAB CR is a possible formula in a spreadsheet and is written with a leading
 * apostrophe ('), which spreadsheets show as text. Exception, so that negative values stay
 * readable: a cell that is a plain signed number, optionally followed by one space and a
 * unit made only of letters, µ, Ω, °, % or / (e.g. "-12", "-12 V", "+5.0 %", "-1.5e-3 A"),
 * is written as is; it can carry no formula because it holds no operator, reference or
 * function call after the sign.
 */

const NUMBER_WITH_UNIT = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?( ?[A-Za-zµΩ°%/]{1,8})?$/;

/** The cell text as it must be written to resist formula injection (see the rule above). */
export function neutraliseCell(text: string): string {
  if (text === '') return text;
  const c = text[0]!;
  if (c !== '=' && c !== '+' && c !== '-' && c !== '@' && c !== '\t' && c !== '\r') return text;
  if ((c === '+' || c === '-') && NUMBER_WITH_UNIT.test(text)) return text;
  return `'${text}`;
}

function quoteField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export type CsvCell = string | number | null | undefined;

function cellText(v: CsvCell): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  return v;
}

/** Rows → RFC 4180 text (CRLF after every record, including the last). */
export function writeCsv(rows: CsvCell[][], opts: { neutralise?: boolean } = {}): string {
  const neutralise = opts.neutralise ?? true;
  return rows
    .map((r) => r.map((v) => quoteField(neutralise ? neutraliseCell(cellText(v)) : cellText(v))).join(',') + '\r\n')
    .join('');
}

export class CsvError extends Error {
  constructor(message: string, readonly line: number) {
    super(`CSV line ${line}: ${message}`);
  }
}

/**
 * RFC 4180 reader (accepts LF or CRLF line ends and a UTF-8 byte-order mark). Throws CsvError
 * naming the line on a malformed quote. Blank lines are skipped.
 */
export function readCsv(text: string, opts: { unneutralise?: boolean } = {}): string[][] {
  const rows = readCsvRaw(text);
  return opts.unneutralise ? rows.map((r) => r.map(unneutraliseCell)) : rows;
}

function readCsvRaw(text: string): string[][] {
  const s = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let i = 0;
  let line = 1;
  let quoted = false;
  let fieldStarted = false;
  let quoteLine = 1;
  const endField = () => { row.push(field); field = ''; fieldStarted = false; };
  const endRow = () => {
    endField();
    if (!(row.length === 1 && row[0] === '')) rows.push(row);
    row = [];
  };
  while (i < s.length) {
    const c = s[i]!;
    if (quoted) {
      if (c === '"') {
        if (s[i + 1] === '"') { field += '"'; i += 2; continue; }
        quoted = false;
        i++;
        const n = s[i];
        if (n !== undefined && n !== ',' && n !== '\r' && n !== '\n') throw new CsvError('text after a closing quote', line);
        continue;
      }
      if (c === '\n') line++;
      field += c;
      i++;
      continue;
    }
    if (c === '"') {
      if (fieldStarted || field !== '') throw new CsvError('quote inside an unquoted field', line);
      quoted = true;
      quoteLine = line;
      fieldStarted = true;
      i++;
      continue;
    }
    if (c === ',') { endField(); i++; continue; }
    if (c === '\r' && s[i + 1] === '\n') { endRow(); line++; i += 2; continue; }
    if (c === '\n' || c === '\r') { endRow(); line++; i++; continue; }
    field += c;
    fieldStarted = true;
    i++;
  }
  if (quoted) throw new CsvError('a quoted field opened here is not closed', quoteLine);
  if (field !== '' || row.length > 0) endRow();
  return rows;
}

/** Undo the neutralising apostrophe on import (only where the writer would have added it). */
export function unneutraliseCell(text: string): string {
  if (text.startsWith("'") && text.length > 1 && neutraliseCell(text.slice(1)) === text) return text.slice(1);
  return text;
}
