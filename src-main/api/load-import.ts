/**
 * Load-list import from a spreadsheet (CSV or XLSX): pure functions only, no IO.
 *
 * 1. `readCsv(text)` reads RFC 4180 text (quoted fields, doubled quotes, line breaks inside
 *    quotes, CRLF/LF/CR, a leading byte-order mark) with the delimiter detected from the first
 *    line (comma, semicolon or tab).
 * 2. `guessMapping(rows, req)` finds the header row and proposes, for every column of the
 *    file, the load field it fills (or none), with the unit named in the header
 *    ("Current (mA)", "Ripple [mV]").
 * 3. `previewImport(req, rows, mapping)` turns every data row into a load through the same
 *    cell rules as typing into the grid (`applyCell`, engineering notation, the text rule for
 *    names) and reports every bad cell by its row and column in the file. Nothing changes.
 * 4. `applyImport(req, rows, mapping, onlyGoodRows)` adds the loads (or replaces them) to a
 *    copy the caller owns; the handler wraps it in one undoable edit. With bad cells it
 *    refuses unless the user explicitly asked to import only the good rows.
 */
import type { Id, Requirements } from '../engine/model.ts';
import { formatQuantity, formatTolerance } from '../engine/notation.ts';
import { showText } from '../engine/text-rules.ts';
import type { LoadImportBadCell, LoadImportMapping, LoadImportPreview, LoadImportTarget } from './contract.ts';
import { ApiFailure } from './registry.ts';
import { addRow, applyCell } from './requirements.ts';
import { TABLE_COLUMNS } from './tables.ts';

/** Largest table accepted (rows × columns), so a hostile file cannot exhaust memory. */
export const IMPORT_MAX_ROWS = 5000;
export const IMPORT_MAX_COLUMNS = 100;
export const IMPORT_MAX_CELL = 500;
/** Largest file accepted, in bytes. */
export const IMPORT_MAX_BYTES = 8 * 1024 * 1024;

export type Delimiter = ',' | ';' | '\t';

/** The delimiter of the first line: the candidate seen most often outside quotes (comma on a tie). */
export function detectDelimiter(text: string): Delimiter {
  const counts: Record<Delimiter, number> = { ',': 0, ';': 0, '\t': 0 };
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (c === '"') quoted = !quoted;
    else if (!quoted && (c === '\n' || c === '\r')) break;
    else if (!quoted && (c === ',' || c === ';' || c === '\t')) counts[c]++;
  }
  let best: Delimiter = ',';
  for (const d of [';', '\t'] as Delimiter[]) if (counts[d] > counts[best]) best = d;
  return best;
}

/**
 * RFC 4180 reader. A quote opens a quoted field only at the start of a field (a stray quote
 * inside an unquoted field is kept as text, as spreadsheets write it); inside quotes a doubled
 * quote is one quote and line breaks are part of the field. Throws an ApiFailure naming the
 * line of an unterminated quoted field, or when the table is larger than the limits.
 */
export function readCsv(input: string, delimiter: Delimiter = detectDelimiter(input.replace(/^\uFEFF/, ''))): string[][] {
  const text = input.replace(/^\uFEFF/, '');
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let i = 0;
  let line = 1;
  const n = text.length;
  const endField = () => {
    if (field.length > IMPORT_MAX_CELL * 20) throw new ApiFailure(`line ${line}: a cell holds more than ${IMPORT_MAX_CELL * 20} characters; nothing changed`, 'file');
    row.push(field);
    field = '';
    if (row.length > IMPORT_MAX_COLUMNS) throw new ApiFailure(`line ${line}: more than ${IMPORT_MAX_COLUMNS} columns; nothing changed`, 'file');
  };
  const endRow = () => {
    endField();
    rows.push(row);
    row = [];
    if (rows.length > IMPORT_MAX_ROWS + 1) throw new ApiFailure(`more than ${IMPORT_MAX_ROWS} rows; split the file`, 'file');
  };
  while (i < n) {
    const c = text[i]!;
    if (c === '"' && field === '') {
      const start = line;
      i++;
      for (;;) {
        if (i >= n) throw new ApiFailure(`line ${start}: a quoted cell is never closed (a " is missing); nothing changed`, 'file');
        const d = text[i]!;
        if (d === '"') {
          if (text[i + 1] === '"') { field += '"'; i += 2; continue; }
          i++;
          break;
        }
        if (d === '\n' || (d === '\r' && text[i + 1] !== '\n')) line++;
        field += d;
        i++;
      }
      // Text after the closing quote up to the delimiter is kept (lenient, as spreadsheets read it).
      continue;
    }
    if (c === delimiter) { endField(); i++; continue; }
    if (c === '\r' || c === '\n') {
      endRow();
      i += c === '\r' && text[i + 1] === '\n' ? 2 : 1;
      line++;
      continue;
    }
    field += c;
    i++;
  }
  if (field !== '' || row.length) endRow();
  return rows;
}

/** A unit named in a header: "Current (mA)", "Ripple [mV]", "Voltage / V", "I_run mA". */
export function headerUnit(header: string): string | null {
  const m = /[([]\s*([^()[\]]{1,12}?)\s*[)\]]\s*$/.exec(header) ?? /\/\s*([^/\s]{1,8})\s*$/.exec(header) ?? /\s(m?A|[mµu]?V|%)\s*$/.exec(header);
  if (!m) return null;
  const u = m[1]!.trim().replace(/^u/, 'µ');
  return /^(?:[fpnuµmkKMG]|meg)?(?:A|V|Hz|W|Ω|ohm)?$|^%$/.test(u) && u !== '' ? u : null;
}

const BARE_NUMBER = /^(?:±\s*|\+\/-\s*)?[+\-\u2212]?(\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/**
 * The text a cell stands for: a bare number under a header that names a unit gets that unit
 * ("250" under "Current (mA)" reads as 250 mA); a cell that writes its own unit or multiplier
 * keeps it. With `decimalComma` (semicolon files), "3,3" reads as 3.3.
 */
export function cellText(raw: string, unit: string | null, decimalComma = false): string {
  let t = raw.trim();
  if (decimalComma && /^[+\-\u2212]?\d+,\d+$/.test(t)) t = t.replace(',', '.');
  if (unit && BARE_NUMBER.test(t)) return `${t} ${unit}`;
  return t;
}

/** Fields a column can fill, as the grid names them. `current:*` fills every mode. */
export function importTargets(req: Requirements): LoadImportTarget[] {
  const cols = TABLE_COLUMNS.loads;
  const label = (k: string) => cols.find((c) => c.key === k)!.label;
  const t: LoadImportTarget[] = [
    { key: 'name', label: label('name'), required: true },
    { key: 'domainId', label: label('domainId'), required: false },
    { key: 'voltage', label: label('voltage'), required: true },
    { key: 'current:*', label: req.modes.length > 1 ? 'Current (every mode)' : `Current`, required: false },
    ...req.modes.map((m) => ({ key: `current:${m.id}`, label: `Current in ${showText(m.name)}`, required: false })),
    { key: 'tolerance', label: label('tolerance'), required: false },
    { key: 'rippleLimit', label: label('rippleLimit'), required: false },
    { key: 'noiseClass', label: label('noiseClass'), required: false },
    { key: 'railKey', label: label('railKey'), required: false },
  ];
  return t;
}

const norm = (s: string) => s.toLowerCase().replace(/[([].*?[)\]]/g, ' ').replace(/[^a-z0-9%]+/g, ' ').trim();

/** Which field a header names, or null. Mode names are matched before the generic current. */
function guessField(header: string, req: Requirements, taken: Set<string>): string | null {
  const h = norm(header);
  const unit = headerUnit(header);
  if (!h && !unit) return null;
  const free = (k: string) => (taken.has(k) ? null : k);
  const isCurrent = /\b(current|curr|amps?|i)\b/.test(h) || /^i[ _]/.test(h) || (unit !== null && /A$/.test(unit));
  if (isCurrent || req.modes.some((m) => h.includes(norm(m.name)) && norm(m.name) !== '')) {
    for (const m of req.modes) {
      const mn = norm(m.name);
      if (mn && new RegExp(`\\b${mn.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}\\b`).test(h) && free(`current:${m.id}`)) return `current:${m.id}`;
    }
    if (isCurrent) return free('current:*');
  }
  if (/\btol(erance)?\b/.test(h)) return free('tolerance');
  if (/\bripple\b/.test(h)) return free('rippleLimit');
  if (/\bnoise\b/.test(h)) return free('noiseClass');
  if (/\brail\b/.test(h) && /\b(key|group)\b/.test(h)) return free('railKey');
  if (/\b(domain|ground|gnd)\b/.test(h)) return free('domainId');
  if (/\b(volt|voltage|vout|v|rail)\b/.test(h) || (unit !== null && /V$/.test(unit))) return free('voltage');
  if (/\b(name|load|consumer|part|description|designator|ref)\b/.test(h)) return free('name');
  return null;
}

/**
 * The header row (the first of the first ten rows in which at least two cells name a field)
 * and a field for every column. Without a recognisable header the first row is taken as the
 * header and nothing is mapped: the user maps the columns.
 */
export function guessMapping(rows: string[][], req: Requirements): LoadImportMapping {
  for (let r = 0; r < Math.min(10, rows.length); r++) {
    const taken = new Set<string>();
    const columns = (rows[r] ?? []).map((h) => {
      const f = guessField(h, req, taken);
      if (f) taken.add(f);
      return f;
    });
    if (columns.filter(Boolean).length >= 2) return { headerRow: r, columns, replace: false };
  }
  return { headerRow: 0, columns: (rows[0] ?? []).map(() => null), replace: false };
}

/** Spreadsheet column letters: 0 → A, 25 → Z, 26 → AA. */
export function columnLetter(i: number): string {
  let s = '';
  for (let n = i + 1; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
  return s;
}

interface Built {
  preview: LoadImportPreview;
  /** Ids of the loads the file's rows became, by data row index; null for a bad or empty row. */
  work: Requirements;
  goodIds: Id[];
  badIds: Id[];
}

function build(req: Requirements, rows: string[][], mapping: LoadImportMapping, decimalComma: boolean): Built {
  const work = structuredClone(req);
  if (mapping.replace) work.loads = [];
  const header = rows[mapping.headerRow] ?? [];
  const width = Math.max(header.length, mapping.columns.length);
  const targets = importTargets(req);
  const mapped = mapping.columns.map((k, j) => ({ k, j })).filter((x): x is { k: string; j: number } => !!x.k);
  const problems: string[] = [];
  for (const t of targets) {
    if (t.required && !mapped.some((m) => m.k === t.key)) problems.push(`map a column to "${t.label}": every load needs one`);
  }
  for (const m of mapped) {
    if (!targets.some((t) => t.key === m.k)) problems.push(`column ${columnLetter(m.j)}: "${showText(m.k)}" is not a field of a load`);
    if (mapped.some((o) => o.k === m.k && o.j < m.j)) problems.push(`column ${columnLetter(m.j)} fills "${targets.find((t) => t.key === m.k)?.label ?? m.k}" as an earlier column does: map it once`);
  }
  const hasAll = mapped.some((m) => m.k === 'current:*');
  const unmappedModes = req.modes.filter((mo) => !hasAll && !mapped.some((m) => m.k === `current:${mo.id}`));
  const notes: string[] = [];
  if (unmappedModes.length) notes.push(`no current column for ${unmappedModes.map((m) => showText(m.name)).join(', ')}: those loads draw 0 A there until edited`);
  if (decimalComma) notes.push('semicolon-separated file: a decimal comma (3,3) reads as a decimal point');
  const units = Array.from({ length: width }, (_, j) => headerUnit(header[j] ?? ''));
  const bad: LoadImportBadCell[] = [];
  const out: LoadImportPreview['rows'] = [];
  const goodIds: Id[] = [];
  const badIds: Id[] = [];
  const dom = work.domains[0];
  if (problems.length === 0) {
    for (let r = mapping.headerRow + 1; r < rows.length; r++) {
      const line = rows[r]!;
      if (line.every((c) => c.trim() === '')) continue;
      const rowNo = r + 1;
      let id: Id;
      try { id = addRow(work, 'loads'); } catch (e) { problems.push((e as Error).message); break; }
      const load = work.loads.find((l) => l.id === id)!;
      for (const mo of unmappedModes) load.current[mo.id] = 0 as never;
      let rowBad = false;
      const mark = (j: number, field: string, message: string) => {
        rowBad = true;
        bad.push({ row: rowNo, column: columnLetter(j), header: showText(header[j] ?? ''), field, message: showText(message) });
      };
      for (const { k, j } of mapped) {
        const raw = line[j] ?? '';
        if (raw.length > IMPORT_MAX_CELL) { mark(j, k, `more than ${IMPORT_MAX_CELL} characters`); continue; }
        const text = cellText(raw, units[j] ?? null, decimalComma);
        if (text === '' && k !== 'name' && k !== 'voltage') continue; // an empty optional cell keeps the default
        const fields = k === 'current:*' ? req.modes.map((m) => `current:${m.id}`).filter((f) => !mapped.some((o) => o.k === f)) : [k];
        for (const field of fields) {
          try {
            applyCell(work, { table: 'loads', rowId: id, field, text });
          } catch (e) {
            mark(j, k, (e as Error).message.replace(/^loads › [^›]*› /, ''));
            break;
          }
        }
      }
      if (!dom) rowBad = true;
      (rowBad ? badIds : goodIds).push(id);
      out.push({
        row: rowNo,
        bad: rowBad,
        cells: {
          name: showText(load.name),
          domainId: showText(work.domains.find((d) => d.id === load.domainId)?.name ?? load.domainId),
          voltage: formatQuantity(load.voltage, 'voltage', 4),
          tolerance: formatTolerance(load.tolerance),
          rippleLimit: formatQuantity(load.rippleLimit, 'voltage'),
          noiseClass: load.noiseClass,
          railKey: showText(load.railKey ?? ''),
          ...Object.fromEntries(req.modes.map((m) => [`current:${m.id}`, formatQuantity(load.current[m.id] ?? 0, 'current', 4)])),
        },
      });
    }
  }
  if (problems.length === 0 && out.length === 0) problems.push(`no data rows below the header (row ${mapping.headerRow + 1})`);
  return {
    preview: {
      headerRow: mapping.headerRow,
      headers: Array.from({ length: width }, (_, j) => ({ column: columnLetter(j), text: showText(header[j] ?? ''), unit: units[j] ?? null })),
      mapping,
      targets,
      rows: out,
      bad,
      good: goodIds.length,
      total: out.length,
      problems,
      notes,
    },
    work,
    goodIds,
    badIds,
  };
}

/** What the rows become under `mapping`, with every bad cell; changes nothing. */
export function previewImport(req: Requirements, rows: string[][], mapping: LoadImportMapping, decimalComma = false): LoadImportPreview {
  return build(req, rows, mapping, decimalComma).preview;
}

/**
 * The requirements with the imported loads. With any bad cell this refuses (listing each by
 * row and column) unless `onlyGoodRows`, which drops the rows that hold a bad cell.
 */
export function applyImport(req: Requirements, rows: string[][], mapping: LoadImportMapping, opts: { onlyGoodRows?: boolean; decimalComma?: boolean } = {}): { requirements: Requirements; imported: number; skipped: number } {
  const b = build(req, rows, mapping, opts.decimalComma ?? false);
  const p = b.preview;
  if (p.problems.length) throw new ApiFailure(`import refused, nothing changed: ${p.problems.join('; ')}`, 'mapping');
  if (p.bad.length && !opts.onlyGoodRows) {
    throw new ApiFailure(`import refused, nothing changed: ${p.bad.length} bad cell${p.bad.length === 1 ? '' : 's'}\n${p.bad.map(describeBad).join('\n')}`, 'rows');
  }
  if (!b.goodIds.length) throw new ApiFailure('import refused, nothing changed: no row without a bad cell', 'rows');
  const drop = new Set(b.badIds);
  b.work.loads = b.work.loads.filter((l) => !drop.has(l.id));
  // A name clash between a good row and a dropped one cannot arise (names are checked per row).
  return { requirements: b.work, imported: b.goodIds.length, skipped: b.badIds.length };
}

export function describeBad(b: LoadImportBadCell): string {
  return `row ${b.row}, column ${b.column}${b.header ? ` ("${b.header}")` : ''}: ${b.message}`;
}
