/**
 * Requirement editing handlers: one cell at a time in engineering notation, add and remove
 * rows, undo and redo. Every edit is validated before it touches the project; a refused
 * edit returns a message naming the table, the row and the column, and changes nothing.
 */
import { z } from 'zod';
import type { Domain, Id, Load, OperatingMode, Requirements, Source } from '../engine/model.ts';
import { ISOLATION_CLASSES, NOISE_CLASSES } from '../engine/model.ts';
import { parseQuantity, parseTolerance } from '../engine/notation.ts';
import { checkText, showText } from '../engine/text-rules.ts';
import type { Amps, Ratio, Volts } from '../engine/units.ts';
import type { CellEdit, TableName } from './contract.ts';
import { ApiFailure, handler, noArgs } from './registry.ts';
import type { Session } from './session.ts';
import { buildSnapshot } from './snapshot.ts';
import { TABLE_COLUMNS, type ColumnDef } from './tables.ts';
import { editLibraryCell, addLibraryRow, removeLibraryRow } from './library.ts';
import { checkShapes } from './files.ts';
import { sourceCapacityProblems } from '../engine/validate.ts';

const tableName = z.enum(['sources', 'domains', 'modes', 'loads', 'limits', 'preferences', 'library']);
const id = z.string().min(1).max(200);

const cellEdit = z.object({
  table: tableName,
  rowId: id,
  field: z.string().min(1).max(200),
  text: z.string().max(500),
}).strict();

/** The row label used in messages: the row's name when it has one. */
function rowLabel(req: Requirements, table: TableName, rowId: Id): string {
  if (table === 'limits' || table === 'preferences') return table;
  const rows = req[table as 'sources' | 'domains' | 'modes' | 'loads'] as { id: Id; name: string }[];
  const r = rows.find((x) => x.id === rowId);
  return `${table} › ${showText(r?.name || rowId)}`;
}

/** Parse one typed value for a column; throws ApiFailure naming `where`. */
export function parseCell(col: ColumnDef, text: string, where: string, req: Requirements, field: string = where): unknown {
  const k = col.kind;
  const t = text.trim();
  switch (k.type) {
    case 'text': {
      if (t === '' && !k.optional) throw new ApiFailure(`${where}: must not be empty`, field);
      // The one rule for names (engine/text-rules.ts), length included.
      const bad = checkText(t, 'name');
      if (bad) throw new ApiFailure(`${where}: ${bad}`, field);
      return t;
    }
    case 'enum': {
      const opts = k.options === 'domains' ? req.domains.map((d) => d.id) : k.options;
      if (k.options === 'domains') {
        const byName = req.domains.find((d) => d.name.toLowerCase() === t.toLowerCase() || d.id === t);
        if (byName) return byName.id;
        throw new ApiFailure(`${where}: "${t}" is not a domain of this project (have: ${req.domains.map((d) => d.name).join(', ')})`, field);
      }
      const hit = opts.find((o) => o.toLowerCase() === t.toLowerCase());
      if (!hit) throw new ApiFailure(`${where}: "${t}" is not one of ${opts.join(', ')}`, field);
      return hit;
    }
    case 'list': {
      // Items are separated by commas or semicolons; an item is an option's key or its label
      // (case ignored). A piece that is neither is read as keys separated by spaces.
      const label = (o: string): string => k.labels?.[o] ?? o;
      const shown = k.options.map(label).join(', ');
      const match = (x: string): string | undefined => {
        const lx = x.toLowerCase();
        return k.options.find((o) => o.toLowerCase() === lx || label(o).toLowerCase() === lx);
      };
      const items: string[] = [];
      for (const piece of t.split(/[,;]/).map((x) => x.trim()).filter((x) => x !== '')) {
        if (match(piece)) items.push(piece);
        else items.push(...piece.split(/\s+/));
      }
      if (!items.length) throw new ApiFailure(`${where}: list at least one of ${shown}`, field);
      const out: string[] = [];
      for (const it of items) {
        const hit = match(it);
        if (!hit) throw new ApiFailure(`${where}: "${it.slice(0, 40)}" is not one of ${shown}`, field);
        if (out.includes(hit)) throw new ApiFailure(`${where}: "${label(hit)}" is listed twice`, field);
        out.push(hit);
      }
      return out;
    }
    case 'quantity': {
      const r = parseQuantity(t, k.quantity, where);
      if (!r.ok) throw new ApiFailure(r.message, field);
      if (k.min !== undefined && r.value < k.min) throw new ApiFailure(`${where}: ${t} is below the smallest allowed value ${k.min}`, field);
      if (k.max !== undefined && r.value > k.max) throw new ApiFailure(`${where}: ${t} is above the largest allowed value ${k.max}`, field);
      return r.value;
    }
    case 'tolerance': {
      const r = parseTolerance(t, where);
      if (!r.ok) throw new ApiFailure(r.message, field);
      if (r.value <= 0 || r.value > 0.5) throw new ApiFailure(`${where}: a tolerance must be above 0 and at most ±50 %`, field);
      return r.value;
    }
    case 'fraction': {
      const pct = /^([+]?\d+(?:\.\d*)?|\.\d+)\s*%$/.exec(t);
      const v = pct ? Number(pct[1]) / 100 : /^[+]?(\d+(?:\.\d*)?|\.\d+)(e[+-]?\d+)?$/i.test(t) ? Number(t) : NaN;
      if (!Number.isFinite(v)) throw new ApiFailure(`${where}: "${t}" is not a fraction (write 70% or 0.7)`, field);
      if (v < k.min || v > k.max) throw new ApiFailure(`${where}: ${t} is outside ${k.min * 100}…${k.max * 100} %`, field);
      return v;
    }
    case 'integer': {
      if (!/^[+]?\d+$/.test(t)) throw new ApiFailure(`${where}: "${t}" is not a whole number`, field);
      const v = Number(t);
      if (v < k.min || v > k.max) throw new ApiFailure(`${where}: ${t} is outside ${k.min}…${k.max}`, field);
      return v;
    }
    case 'number': {
      const unit = k.unit ? k.unit.replace(/[.*+?^${}()|[\]\\]/g, '\\$&') : '';
      const m = new RegExp(`^([+-]?(?:\\d+(?:\\.\\d*)?|\\.\\d+)(?:e[+-]?\\d+)?)\\s*${unit ? `(?:${unit})?` : ''}$`, 'i').exec(t);
      const v = m ? Number(m[1]) : NaN;
      if (!Number.isFinite(v)) throw new ApiFailure(`${where}: "${t}" is not a number${k.unit ? ` of ${k.unit}` : ''}`, field);
      if (v < k.min || v > k.max) throw new ApiFailure(`${where}: ${t} is outside ${k.min}…${k.max}${k.unit ? ' ' + k.unit : ''}`, field);
      return v;
    }
  }
}

/** Checks that involve more than one cell; messages name the row. */
function checkRow(req: Requirements, table: TableName, rowId: Id): void {
  if (table === 'sources') {
    const s = req.sources.find((x) => x.id === rowId);
    if (s && !(s.vMin <= s.vNom && s.vNom <= s.vMax)) {
      throw new ApiFailure(`${rowLabel(req, table, rowId)}: needs V min ≤ V nominal ≤ V max (have ${s.vMin} ≤ ${s.vNom} ≤ ${s.vMax} V)`, `sources.${rowId}`);
    }
  }
}

/**
 * Apply one cell edit to a copy of the requirements (throws on bad input). `rowChecks` off
 * leaves the checks across a row's cells to the caller (a paste fills a whole row first).
 */
export function applyCell(req: Requirements, e: CellEdit, rowChecks = true): void {
  const where = `${rowLabel(req, e.table, e.rowId)} › ${e.field}`;
  if (e.table === 'loads' && e.field.startsWith('current:')) {
    const modeId = e.field.slice('current:'.length);
    const mode = req.modes.find((m) => m.id === modeId);
    if (!mode) throw new ApiFailure(`${where}: no operating mode "${modeId}"`, e.field);
    const load = req.loads.find((l) => l.id === e.rowId);
    if (!load) throw new ApiFailure(`loads: no row "${e.rowId}"`, 'rowId');
    const label = `${rowLabel(req, 'loads', e.rowId)} › current in ${mode.name}`;
    const r = parseQuantity(e.text.trim(), 'current', label);
    if (!r.ok) throw new ApiFailure(r.message, e.field);
    if (r.value < 0 || r.value > 1000) throw new ApiFailure(`${label}: must be between 0 and 1000 A`, e.field);
    load.current[modeId] = r.value as Amps;
    return;
  }
  const cols = TABLE_COLUMNS[e.table as Exclude<TableName, 'library'>];
  const col = cols.find((c) => c.key === e.field);
  if (!col) throw new ApiFailure(`${e.table}: no column "${e.field}"`, 'field');
  // Messages name the column as the grid shows it ("V min"), the field carries the key.
  const value = parseCell(col, e.text, `${rowLabel(req, e.table, e.rowId)} › ${col.label}`, req, `${e.table}.${e.rowId}.${e.field}`);
  if (e.table === 'limits') {
    (req.limits as unknown as Record<string, unknown>)[e.field] = value;
    if (req.limits.tjMax - req.limits.tjMargin <= req.limits.ambient) {
      throw new ApiFailure(`limits: Tj max minus the margin (${req.limits.tjMax - req.limits.tjMargin} °C) must stay above the ambient (${req.limits.ambient} °C)`, e.field);
    }
    return;
  }
  if (e.table === 'preferences') {
    const p = req.preferences as unknown as Record<string, unknown>;
    if (e.field.startsWith('weights.')) (req.preferences.weights as unknown as Record<string, unknown>)[e.field.slice(8)] = value;
    else p[e.field] = value;
    return;
  }
  const rows = req[e.table as 'sources' | 'domains' | 'modes' | 'loads'] as unknown as Record<string, unknown>[];
  const row = rows.find((r) => r.id === e.rowId);
  if (!row) throw new ApiFailure(`${e.table}: no row "${e.rowId}"`, 'rowId');
  if (col.key === 'railKey' && value === '') delete row.railKey;
  else row[col.key] = value;
  if (col.key === 'name') {
    const dup = rows.find((r) => r !== row && String(r.name).toLowerCase() === String(value).toLowerCase());
    if (dup) throw new ApiFailure(`${where}: another row of ${e.table} is already called "${String(value)}"`, where);
  }
  if (rowChecks) checkRow(req, e.table, e.rowId);
}

/** Column name as the grid shows it (a load current column names its mode). */
function columnLabel(req: Requirements, table: TableName, field: string): string {
  if (field.startsWith('current:')) return `I ${req.modes.find((m) => m.id === field.slice(8))?.name ?? field.slice(8)}`;
  return TABLE_COLUMNS[table as Exclude<TableName, 'library'>]?.find((c) => c.key === field)?.label ?? field;
}

export interface PasteArgs {
  table: Exclude<TableName, 'library'>;
  /** Existing rows the block lands on, top to bottom; rows of the block past these are added. */
  rowIds: Id[];
  /** Column keys the block's columns land on, left to right. */
  fields: string[];
  /** The block as typed in a spreadsheet (tab-separated text split into cells). */
  cells: string[][];
}

/**
 * Paste a rectangular block in one undoable step. Every cell is checked; when any is bad the
 * error lists each bad cell by row and column and nothing changes.
 */
export function applyPaste(req: Requirements, a: PasteArgs): void {
  if (!a.cells.length) throw new ApiFailure('paste: the clipboard holds no cells', 'cells');
  const width = Math.max(...a.cells.map((r) => r.length));
  if (width > a.fields.length) throw new ApiFailure(`paste: the block is ${width} columns wide but only ${a.fields.length} column(s) lie from the selected cell to the right; nothing changed`, 'cells');
  const single = a.table === 'limits' || a.table === 'preferences';
  if (single && a.cells.length > 1) throw new ApiFailure(`paste: ${a.table} has one row; the block has ${a.cells.length}; nothing changed`, 'cells');
  const bad: string[] = [];
  const rowsOf = () => (single ? [{ id: 'project' }] : (req[a.table as 'sources' | 'domains' | 'modes' | 'loads'] as { id: Id }[]));
  a.cells.forEach((line, i) => {
    const rowId = a.rowIds[i] ?? addRow(req, a.table);
    const rowNo = rowsOf().findIndex((x) => x.id === rowId) + 1;
    line.forEach((text, j) => {
      const field = a.fields[j]!;
      try {
        applyCell(req, { table: a.table, rowId, field, text }, false);
      } catch (e) {
        bad.push(`row ${rowNo}, column "${columnLabel(req, a.table, field)}": ${(e as Error).message}`);
      }
    });
    try { checkRow(req, a.table, rowId); } catch (e) { bad.push(`row ${rowNo}: ${(e as Error).message}`); }
  });
  if (bad.length) {
    throw new ApiFailure(`paste refused, nothing changed: ${bad.length} bad cell${bad.length === 1 ? '' : 's'}\n${bad.join('\n')}`, 'cells');
  }
}

function freshId(prefix: string, taken: { id: Id }[]): Id {
  const ids = new Set(taken.map((t) => t.id));
  for (let i = taken.length + 1; ; i++) if (!ids.has(`${prefix}${i}`)) return `${prefix}${i}`;
}

function freshName(base: string, taken: { name: string }[]): string {
  const names = new Set(taken.map((t) => t.name.toLowerCase()));
  for (let i = taken.length + 1; ; i++) if (!names.has(`${base} ${i}`.toLowerCase())) return `${base} ${i}`;
}

export function addRow(req: Requirements, table: TableName): Id {
  switch (table) {
    case 'sources': {
      const s: Source = { id: freshId('src', req.sources), name: freshName('Input', req.sources), vNom: 12 as Volts, vMin: 10 as Volts, vMax: 14 as Volts, currentLimit: 2 as Amps };
      req.sources.push(s);
      return s.id;
    }
    case 'domains': {
      const d: Domain = { id: freshId('dom', req.domains), name: freshName('Domain', req.domains), isolation: 'none', workingVoltage: 0 as Volts };
      req.domains.push(d);
      return d.id;
    }
    case 'modes': {
      const m: OperatingMode = { id: freshId('mode', req.modes), name: freshName('Mode', req.modes), share: 0 as Ratio };
      req.modes.push(m);
      return m.id;
    }
    case 'loads': {
      const dom = req.domains[0];
      if (!dom) throw new ApiFailure('loads: add a domain first (every load belongs to one)', 'table');
      const l: Load = {
        id: freshId('load', req.loads), name: freshName('Load', req.loads), domainId: dom.id, voltage: 3.3 as Volts,
        tolerance: 0.05 as Ratio, current: Object.fromEntries(req.modes.map((m) => [m.id, 0.1 as Amps])),
        rippleLimit: 0.05 as Volts, noiseClass: 'standard',
      };
      req.loads.push(l);
      return l.id;
    }
    default:
      throw new ApiFailure(`${table}: rows cannot be added to this table`, 'table');
  }
}

export function removeRow(req: Requirements, table: TableName, rowId: Id): void {
  if (table === 'limits' || table === 'preferences' || table === 'library') throw new ApiFailure(`${table}: rows cannot be removed`, 'table');
  const rows = req[table] as { id: Id; name: string }[];
  const i = rows.findIndex((r) => r.id === rowId);
  if (i < 0) throw new ApiFailure(`${table}: no row "${rowId}"`, 'rowId');
  const name = rows[i]!.name;
  if (table === 'domains') {
    const users = req.loads.filter((l) => l.domainId === rowId);
    if (users.length) throw new ApiFailure(`domains › ${name}: still used by ${users.length} load(s) (${users.slice(0, 3).map((l) => l.name).join(', ')}); move or remove them first`, 'rowId');
  }
  if (table === 'sources' && req.sources.length === 1) throw new ApiFailure(`sources › ${name}: a project needs at least one source`, 'rowId');
  if (table === 'modes' && req.modes.length === 1) throw new ApiFailure(`modes › ${name}: a project needs at least one operating mode`, 'rowId');
  rows.splice(i, 1);
  if (table === 'modes') for (const l of req.loads) delete l.current[rowId];
}

/** Problems of the project as a whole (shown beside the grids, not blocking an edit). */
export function projectProblems(req: Requirements): { field?: string; message: string }[] {
  const out: { field?: string; message: string }[] = [];
  const share = req.modes.reduce((a, m) => a + m.share, 0);
  if (req.modes.length && Math.abs(share - 1) > 1e-6) out.push({ field: 'modes', message: `operating modes: shares of time add up to ${(share * 100).toFixed(1)} %, not 100 %` });
  if (!req.sources.length) out.push({ field: 'sources', message: 'sources: the project has no source' });
  if (!req.loads.length) out.push({ field: 'loads', message: 'loads: the project has no load' });
  for (const l of req.loads) {
    if (!req.domains.some((d) => d.id === l.domainId)) out.push({ field: `loads.${l.id}.domainId`, message: `loads › ${showText(l.name)}: domain "${showText(l.domainId)}" does not exist` });
  }
  // Text that breaks the one rule (a file from elsewhere may hold it): shown, escaped.
  const bad = (field: string, label: string, text: unknown, kind: 'name' | 'description' = 'name') => {
    const why = typeof text === 'string' ? checkText(text, kind) : null;
    if (why) out.push({ field, message: `${label}: ${why}` });
  };
  bad('meta.name', 'project name', req.meta.name);
  bad('meta.description', 'project description', req.meta.description, 'description');
  for (const table of ['sources', 'domains', 'modes', 'loads'] as const) {
    for (const r of req[table] as { id: Id; name: string; railKey?: string }[]) {
      const label = `${table} › ${showText(String(r.name || r.id))}`;
      bad(`${table}.${showText(String(r.id))}.id`, `${label} › id`, r.id);
      bad(`${table}.${showText(String(r.id))}.name`, `${label} › name`, r.name);
      if (table === 'loads') bad(`loads.${showText(String(r.id))}.railKey`, `${label} › rail key`, r.railKey);
    }
  }
  for (const p of sourceCapacityProblems(req)) out.push({ field: p.path, message: p.message });
  return out;
}

/** Undo title in words: the row's name and the column as the grid shows it. */
function describe(e: CellEdit, req: Requirements): string {
  const col = e.field.startsWith('current:')
    ? `current in ${req.modes.find((m) => m.id === e.field.slice(8))?.name ?? 'a mode'}`
    : TABLE_COLUMNS[e.table as Exclude<TableName, 'library'>]?.find((c) => c.key === e.field)?.label ?? e.field;
  return `Edit ${rowLabel(req, e.table, e.rowId)} › ${col}`;
}

export const requirementHandlers = {
  'requirements.editCell': handler('requirements.editCell', cellEdit, async (s: Session, e) => {
    if (e.table === 'library') {
      s.edit(`Edit library › ${e.rowId} › ${e.field}`, (req, lib) => {
        const library = editLibraryCell(lib, e.rowId, e.field, e.text);
        checkShapes(req, library);
        return { library };
      });
    } else {
      s.edit(describe(e, s.requirements), (req, lib) => {
        applyCell(req, e);
        checkShapes(req, lib);
      });
    }
    return buildSnapshot(s);
  }),
  'requirements.paste': handler('requirements.paste', z.object({
    table: z.enum(['sources', 'domains', 'modes', 'loads', 'limits', 'preferences']),
    rowIds: z.array(id).max(5000),
    fields: z.array(z.string().min(1).max(200)).min(1).max(100),
    cells: z.array(z.array(z.string().max(500)).max(100)).min(1).max(5000),
  }).strict(), async (s: Session, a) => {
    s.edit(`Paste ${a.cells.length} row${a.cells.length === 1 ? '' : 's'} into ${a.table}`, (req, lib) => {
      applyPaste(req, a);
      checkShapes(req, lib);
    });
    return buildSnapshot(s);
  }),
  'requirements.addRow': handler('requirements.addRow', z.object({ table: tableName }).strict(), async (s: Session, a) => {
    let rowId = '';
    s.edit(`Add a row to ${a.table}`, (req, lib) => {
      if (a.table === 'library') {
        const r = addLibraryRow(lib);
        rowId = r.rowId;
        return { library: r.library };
      }
      rowId = addRow(req, a.table);
    });
    return { ...(await buildSnapshot(s)), rowId };
  }),
  'requirements.removeRow': handler('requirements.removeRow', z.object({ table: tableName, rowId: id }).strict(), async (s: Session, a) => {
    s.edit(a.table === 'library' ? `Remove library › ${a.rowId}` : `Remove ${rowLabel(s.requirements, a.table, a.rowId)}`, (req, lib) => {
      if (a.table === 'library') return { library: removeLibraryRow(lib, a.rowId) };
      removeRow(req, a.table, a.rowId);
    });
    return buildSnapshot(s);
  }),
  'requirements.undo': handler('requirements.undo', noArgs, async (s: Session) => {
    if (!s.undo()) throw new ApiFailure('nothing to undo');
    return buildSnapshot(s);
  }),
  'requirements.redo': handler('requirements.redo', noArgs, async (s: Session) => {
    if (!s.redo()) throw new ApiFailure('nothing to redo');
    return buildSnapshot(s);
  }),
};

export { ISOLATION_CLASSES, NOISE_CLASSES };
