/**
 * Part library handlers. The library is the store's data; this module edits it generically:
 * the rows are the records of its first array (each with an `id`), the columns are their
 * scalar fields. Numbers are typed in engineering notation or plain; nothing else changes.
 */
import type { LibraryRow, LibraryView } from './contract.ts';
import { ApiFailure, handler, noArgs } from './registry.ts';
import type { Session } from './session.ts';
import { clone } from './session.ts';
import { checkText, showText } from '../engine/text-rules.ts';

type Rec = Record<string, unknown>;

/** The array of part records inside a library object, and its key. */
function partsOf(lib: unknown): { key: string; rows: Rec[] } | null {
  if (Array.isArray(lib)) return { key: '', rows: lib as Rec[] };
  if (lib && typeof lib === 'object') {
    for (const [k, v] of Object.entries(lib as Rec)) {
      if (Array.isArray(v) && v.every((x) => x && typeof x === 'object' && 'id' in (x as Rec))) return { key: k, rows: v as Rec[] };
    }
  }
  return null;
}

const isScalar = (v: unknown) => v === null || ['string', 'number', 'boolean'].includes(typeof v);

export function libraryView(lib: unknown): LibraryView {
  const p = partsOf(lib);
  const currency = lib && typeof lib === 'object' && typeof (lib as Rec).currency === 'string' ? String((lib as Rec).currency) : 'units';
  if (!p) return { columns: [], rows: [], currency };
  const kinds = new Map<string, LibraryView['columns'][number]['kind']>();
  const kindOf = (v: unknown) => (typeof v === 'number' ? 'number' : typeof v === 'boolean' ? 'enum' : 'text') as 'number' | 'enum' | 'text';
  for (const r of p.rows) {
    for (const [k, v] of Object.entries(r)) {
      if (isScalar(v)) {
        if (!kinds.has(k)) kinds.set(k, kindOf(v));
      } else if (v && typeof v === 'object' && !Array.isArray(v)) {
        // One level of nested parameters becomes columns `params.rdsOn` and so on.
        for (const [sk, sv] of Object.entries(v as Rec)) if (isScalar(sv) && !kinds.has(`${k}.${sk}`)) kinds.set(`${k}.${sk}`, kindOf(sv));
      }
    }
  }
  const columns = [...kinds].map(([key, kind]) => ({
    key, label: key.startsWith('params.') ? key.slice(7) : key, kind, ...(kind === 'enum' ? { options: ['true', 'false'] } : {}),
  }));
  const rows: LibraryRow[] = p.rows.map((r) => {
    const out: LibraryRow = {};
    for (const c of columns) {
      const v = getField(r, c.key);
      out[c.key] = isScalar(v) ? (v as string | number | boolean | null) : null;
    }
    return out;
  });
  return { columns, rows, currency };
}

function getField(r: Rec, key: string): unknown {
  const dot = key.indexOf('.');
  if (dot < 0) return r[key];
  const inner = r[key.slice(0, dot)];
  return inner && typeof inner === 'object' ? (inner as Rec)[key.slice(dot + 1)] : undefined;
}

// A number, an optional SI prefix, and optionally the unit the window shows (80n, 80ns, 8e-8;
// 110 K/W; 90 % for a share), so a value can be typed back as it is displayed.
const NUM = /^([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:e[+-]?\d+)?)([fpnuµmkKMG]?)(V|A|Ω|ohm|F|H|Hz|s|W|C|K\/W|°C\/W|dB|%)?$/;
const MULT: Record<string, number> = { f: 1e-15, p: 1e-12, n: 1e-9, u: 1e-6, 'µ': 1e-6, m: 1e-3, '': 1, k: 1e3, K: 1e3, M: 1e6, G: 1e9 };

export function editLibraryCell(lib: unknown, rowId: string, field: string, text: string): unknown {
  const out = clone(lib);
  const p = partsOf(out);
  if (!p) throw new ApiFailure('library: this project has no part list to edit', 'table');
  const row = p.rows.find((r) => String(r.id) === rowId);
  if (!row) throw new ApiFailure(`library: no part "${rowId}"`, 'rowId');
  const where = `library › ${showText(String(row.name ?? row.id))} › ${showText(field)}`;
  if (field === 'id') throw new ApiFailure(`${where}: the id of a part cannot be changed`, field);
  const dot = field.indexOf('.');
  const holder = (dot < 0 ? row : row[field.slice(0, dot)]) as Rec | undefined;
  const leaf = dot < 0 ? field : field.slice(dot + 1);
  if (!holder || typeof holder !== 'object' || !(leaf in holder) || !isScalar(holder[leaf])) throw new ApiFailure(`${where}: no such column`, field);
  const old = holder[leaf];
  const t = text.trim();
  if (typeof old === 'number') {
    const m = NUM.exec(t.replace(/\s+/g, ''));
    const v = m ? Number(m[1]) * MULT[m[2] ?? '']! / (m[3] === '%' ? 100 : 1) : NaN;
    if (!Number.isFinite(v)) throw new ApiFailure(`${where}: "${t}" is not a number`, field);
    if (v < 0) throw new ApiFailure(`${where}: must not be negative`, field);
    holder[leaf] = v;
  } else if (typeof old === 'boolean') {
    if (!/^(true|false|yes|no)$/i.test(t)) throw new ApiFailure(`${where}: write true or false`, field);
    holder[leaf] = /^(true|yes)$/i.test(t);
  } else {
    const bad = checkText(t, 'name');
    if (bad) throw new ApiFailure(`${where}: ${bad}`, field);
    holder[leaf] = t;
  }
  return out;
}

export function addLibraryRow(lib: unknown): { library: unknown; rowId: string } {
  const out = clone(lib);
  const p = partsOf(out);
  if (!p || !p.rows.length) throw new ApiFailure('library: this project has no part list to extend', 'table');
  const template = clone(p.rows[p.rows.length - 1]!);
  const ids = new Set(p.rows.map((r) => String(r.id)));
  let n = p.rows.length + 1;
  while (ids.has(`part${n}`)) n++;
  template.id = `part${n}`;
  if ('name' in template) template.name = `${String(template.name)} (copy)`;
  p.rows.push(template);
  return { library: out, rowId: String(template.id) };
}

export function removeLibraryRow(lib: unknown, rowId: string): unknown {
  const out = clone(lib);
  const p = partsOf(out);
  if (!p) throw new ApiFailure('library: this project has no part list', 'table');
  const i = p.rows.findIndex((r) => String(r.id) === rowId);
  if (i < 0) throw new ApiFailure(`library: no part "${rowId}"`, 'rowId');
  p.rows.splice(i, 1);
  return out;
}

export const libraryHandlers = {
  'library.get': handler('library.get', noArgs, (s: Session) => libraryView(s.library)),
};
