/**
 * The part library as CSV (columns id, class, name, cost_estimate, cost_note, params): read
 * into stored rows, and written from them. The default library (default-library.ts) and the
 * CLI's `library` and `export --library-csv` go through here, so one rule reads and writes
 * the format. The row schema itself is the engine's (engine/library.ts).
 */
import type { PartLibraryRow } from '../engine/model.ts';
import { describeProblem, fromStoreRows, rowsToTable, tableToRows } from '../engine/library.ts';
import { CsvError, readCsv, writeCsv } from '../export/csv.ts';

/** CSV cells (already split) as stored library rows, or every problem by row and column. */
export function libraryFromTable(table: string[][]): { ok: true; rows: PartLibraryRow[] } | { ok: false; problems: string[] } {
  const r = tableToRows(table);
  // Checked rows are stored rows as they are (tableToRows builds fresh objects).
  return r.ok ? { ok: true, rows: r.rows } : { ok: false, problems: r.problems.map(describeProblem) };
}

/**
 * CSV text (as `libraryCsv` writes it, formula-neutralised cells read back) as stored library
 * rows: the CSV's own syntax error, or every problem by row and column.
 */
export function libraryFromCsv(text: string): { ok: true; rows: PartLibraryRow[] } | { ok: false; csvError: string } | { ok: false; problems: string[] } {
  let table: string[][];
  try {
    table = readCsv(text, { unneutralise: true });
  } catch (e) {
    if (e instanceof CsvError) return { ok: false, csvError: e.message };
    throw e;
  }
  return libraryFromTable(table);
}

/** Stored library rows as CSV text. */
export function libraryCsv(rows: PartLibraryRow[]): string {
  const typed = fromStoreRows(rows);
  if (typed.ok) return writeCsv(rowsToTable(typed.rows));
  // Rows the library schema does not accept are still exported, parameter by parameter.
  return writeCsv([
    ['id', 'class', 'name', 'cost_estimate', 'cost_note', 'params'],
    ...rows.map((r) => [r.id, r.partClass, r.name, r.cost, typeof r.params.costNote === 'string' ? r.params.costNote : '',
      Object.entries(r.params).filter(([k]) => k !== 'costNote').map(([k, v]) => `${k}=${String(v)}`).join('; ')]),
  ]);
}
