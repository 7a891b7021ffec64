/**
 * The part library: generic part classes with the parameters the engine needs and an
 * estimated unit cost. Rows are plain data (the store keeps the project's editable copy as
 * `{ id, partClass, name, cost, params }`); this module defines what `params` means for each
 * class, validates rows, converts to and from the CSV table shape (cells as strings, parsed
 * and written elsewhere), and looks parts up. Every row is generic: no vendor, no part
 * number. The default rows (db/default-library.csv) carry invented cost estimates.
 */

import { isolationRank, type PartLibraryRow } from './model.ts';
import { checkText } from './text-rules.ts';
import { formatUnit } from './notation.ts';
import type { StageDesign } from './stages/index.ts';
import type { SwitchingDesignBase } from './stages/buck/index.ts';
import { rowTopology } from './stages/part-choice.ts';
// The registry imports the kind modules, whose parts functions import the pick rules here:
// each side uses the other only inside functions.
import { kindModuleOf } from './stages/registry.ts';
import type { CostModel, PartCounts } from './planner/types.ts';
import { INVENTED_UNIT_COST, TYPICAL_BUCK_PARTS } from './planner/cost-model.ts';

import { CLASS_PARAMS, PART_CLASSES, type PartClass, type ParamValue } from './part-classes.ts';
export { CLASS_PARAMS, PART_CLASSES, type PartClass, type ParamValue, type ParamSpec } from './part-classes.ts';

export interface LibraryRow {
  id: string;
  partClass: PartClass;
  name: string;
  /** Estimated unit cost in the library's currency units (default rows: invented estimates). */
  cost: number;
  params: Record<string, ParamValue>;
}


export interface RowProblem {
  /** 0-based row index in the input (header excluded). */
  row: number;
  field: string;
  message: string;
}

/** Check one row; returns every problem with the field it concerns. */
export function validateRow(r: LibraryRow, index = 0): RowProblem[] {
  const out: RowProblem[] = [];
  const p = (field: string, message: string) => out.push({ row: index, field, message });
  if (typeof r.id !== 'string' || !/^[A-Za-z0-9._:-]{1,64}$/.test(r.id)) p('id', 'must be 1–64 letters, digits or . _ : -');
  if (!PART_CLASSES.includes(r.partClass)) { p('class', `unknown part class "${String(r.partClass)}" (one of ${PART_CLASSES.join(', ')})`); return out; }
  if (typeof r.name !== 'string' || r.name.trim() === '' || r.name.length > 200) p('name', 'must be 1–200 characters');
  else { const bad = checkText(r.name, 'name'); if (bad) p('name', bad); }
  if (typeof r.cost !== 'number' || !Number.isFinite(r.cost) || r.cost < 0 || r.cost > 1e6) p('cost', 'must be a number from 0 to 1e6');
  const specs = CLASS_PARAMS[r.partClass];
  for (const s of specs) {
    const v = r.params?.[s.key];
    if (v === undefined || v === '') {
      if (s.required) p(s.key, `is required for class ${r.partClass}`);
      continue;
    }
    if (s.kind === 'number') {
      if (typeof v !== 'number' || !Number.isFinite(v)) { p(s.key, 'must be a number'); continue; }
      if (s.min !== undefined && v < s.min) p(s.key, `must be at least ${s.min}${s.unit ? ' ' + s.unit : ''}`);
      if (s.max !== undefined && v > s.max) p(s.key, `must be at most ${s.max}${s.unit ? ' ' + s.unit : ''}`);
    } else if (typeof v !== 'string') {
      p(s.key, 'must be text');
    } else {
      const bad = checkText(v, 'name');
      if (bad) p(s.key, bad);
    }
  }
  for (const k of Object.keys(r.params ?? {})) {
    if (k === COST_NOTE) {
      const note = r.params[k];
      if (typeof note !== 'string') p('cost_note', 'must be text');
      else { const bad = checkText(note, 'name'); if (bad) p('cost_note', bad); }
      continue;
    }
    if (!specs.some((s) => s.key === k)) p(k, `is not a parameter of class ${r.partClass}`);
  }
  const pr = r.params ?? {};
  for (const [lo, hi] of [['cMin', 'cMax'], ['lMin', 'lMax']] as const) {
    if (typeof pr[lo] === 'number' && typeof pr[hi] === 'number' && (pr[lo] as number) > (pr[hi] as number)) p(lo, `must not exceed ${hi}`);
  }
  return out;
}

export function validateLibrary(rows: LibraryRow[]): RowProblem[] {
  const out = rows.flatMap((r, i) => validateRow(r, i));
  const seen = new Map<string, number>();
  rows.forEach((r, i) => {
    const j = seen.get(r.id);
    if (j !== undefined) out.push({ row: i, field: 'id', message: `duplicates the id of row ${j + 1}` });
    else seen.set(r.id, i);
  });
  return out;
}

// ---------------------------------------------------------------------------------------
// Table shape (for CSV): id, class, name, cost_estimate, params ("key=value; key=value")

export const LIBRARY_HEADER = ['id', 'class', 'name', 'cost_estimate', 'cost_note', 'params'] as const;

/** Param key (any class) holding where the cost comes from, e.g. "invented estimate". */
export const COST_NOTE = 'costNote';
export const INVENTED = 'invented estimate';

export function costNote(r: LibraryRow): string {
  const v = r.params[COST_NOTE];
  return typeof v === 'string' ? v : '';
}

function paramText(params: Record<string, ParamValue>, cls: PartClass): string {
  const order = CLASS_PARAMS[cls]?.map((s) => s.key) ?? [];
  const keys = Object.keys(params).filter((k) => k !== COST_NOTE).sort((a, b) => {
    const ia = order.indexOf(a);
    const ib = order.indexOf(b);
    return (ia < 0 ? 999 : ia) - (ib < 0 ? 999 : ib) || a.localeCompare(b);
  });
  return keys.map((k) => `${k}=${String(params[k])}`).join('; ');
}

export function rowsToTable(rows: LibraryRow[]): string[][] {
  return [
    [...LIBRARY_HEADER],
    ...rows.map((r) => [r.id, r.partClass, r.name, String(r.cost), costNote(r), paramText(r.params, r.partClass)]),
  ];
}

const NUMERIC = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Table (first row the header) → rows, with every problem named by row and field. Nothing
 * is returned as valid unless the whole table is valid: an import changes all or nothing.
 */
export function tableToRows(table: string[][]): { ok: true; rows: LibraryRow[] } | { ok: false; problems: RowProblem[] } {
  const problems: RowProblem[] = [];
  const header = table[0]?.map((h) => h.trim().toLowerCase());
  if (!header) return { ok: false, problems: [{ row: -1, field: 'header', message: 'the file is empty' }] };
  const col: Record<string, number> = {};
  for (const h of LIBRARY_HEADER) {
    const i = header.indexOf(h);
    if (i < 0 && h === 'cost_note') { col[h] = -1; continue; }
    if (i < 0) problems.push({ row: -1, field: h, message: `column "${h}" is missing from the header` });
    col[h] = i;
  }
  if (problems.length) return { ok: false, problems };
  const rows: LibraryRow[] = [];
  table.slice(1).forEach((cells, i) => {
    const get = (h: string) => (cells[col[h]!] ?? '').trim();
    const params: Record<string, ParamValue> = {};
    const ptext = get('params');
    if (ptext !== '') {
      for (const part of ptext.split(';')) {
        const t = part.trim();
        if (t === '') continue;
        const eq = t.indexOf('=');
        if (eq <= 0) { problems.push({ row: i, field: 'params', message: `"${t}" is not key=value` }); continue; }
        const k = t.slice(0, eq).trim();
        const v = t.slice(eq + 1).trim();
        const spec = CLASS_PARAMS[get('class') as PartClass]?.find((q) => q.key === k);
        params[k] = spec?.kind !== 'string' && NUMERIC.test(v) ? Number(v) : v;
      }
    }
    const note = col.cost_note! >= 0 ? get('cost_note') : '';
    if (note !== '') params[COST_NOTE] = note;
    const costText = get('cost_estimate');
    const cost = NUMERIC.test(costText) ? Number(costText) : NaN;
    const row: LibraryRow = { id: get('id'), partClass: get('class') as PartClass, name: get('name'), cost, params };
    problems.push(...validateRow(row, i));
    rows.push(row);
  });
  const ids = new Map<string, number>();
  rows.forEach((r, i) => {
    const j = ids.get(r.id);
    if (j !== undefined) problems.push({ row: i, field: 'id', message: `duplicates the id of row ${j + 1}` });
    else ids.set(r.id, i);
  });
  return problems.length ? { ok: false, problems } : { ok: true, rows };
}

export function describeProblem(p: RowProblem): string {
  return p.row < 0 ? `${p.field}: ${p.message}` : `row ${p.row + 1}, ${p.field}: ${p.message}`;
}

// ---------------------------------------------------------------------------------------
// Look-ups

export function numParam(r: LibraryRow, key: string, fallback = NaN): number {
  const v = r.params[key];
  return typeof v === 'number' ? v : fallback;
}

export function strParam(r: LibraryRow, key: string, fallback = ''): string {
  const v = r.params[key];
  return typeof v === 'string' ? v : v === undefined ? fallback : String(v);
}

/** The cheapest row of a class that passes `fits`; ties broken by id for stable results. */
export function cheapest(library: LibraryRow[], cls: PartClass, fits: (r: LibraryRow) => boolean): LibraryRow | null {
  let best: LibraryRow | null = null;
  for (const r of library) {
    if (r.partClass !== cls || !fits(r)) continue;
    if (!best || r.cost < best.cost || (r.cost === best.cost && r.id < best.id)) best = r;
  }
  return best;
}

// ---------------------------------------------------------------------------------------
// Store rows (params opaque JSON) ↔ typed rows

/** Check rows as the project store keeps them; all or nothing, every problem named. */
export function fromStoreRows(rows: PartLibraryRow[]): { ok: true; rows: LibraryRow[] } | { ok: false; problems: RowProblem[] } {
  const out: LibraryRow[] = [];
  const problems: RowProblem[] = [];
  rows.forEach((r, i) => {
    const params: Record<string, ParamValue> = {};
    const raw = r.params && typeof r.params === 'object' && !Array.isArray(r.params) ? r.params : null;
    if (!raw) problems.push({ row: i, field: 'params', message: 'must be an object' });
    for (const [k, v] of Object.entries(raw ?? {})) {
      if (typeof v === 'number' || typeof v === 'string') params[k] = v;
      else problems.push({ row: i, field: k, message: 'must be a number or text' });
    }
    out.push({ id: r.id, partClass: r.partClass as PartClass, name: r.name, cost: r.cost, params });
  });
  problems.push(...validateLibrary(out));
  return problems.length ? { ok: false, problems } : { ok: true, rows: out };
}

// A checked row is already a stored row (same fields; `partClass` and `params` only narrower),
// so no conversion back exists: only fromStoreRows, the check when rows come from a file.

// ---------------------------------------------------------------------------------------
// Stage design → concrete parts

/** One part (or a bank of equal parts) a stage needs. */
export interface PartPick {
  stageId: string;
  role: string;
  /** Reference-designator letter. */
  prefix: 'U' | 'Q' | 'L' | 'T' | 'D' | 'C' | 'R';
  partClass: PartClass;
  /** Library row chosen, or null when no row fits (then `problem` says why). */
  libraryId: string | null;
  description: string;
  /** Value as shown (e.g. "10 µF", "49.9 kΩ"), empty when the part has none. */
  value: string;
  /** Rating as shown (e.g. "25 V", "1 A", "0.1 W"). */
  rating: string;
  package: string;
  quantity: number;
  unitCost: number;
  costNote: string;
  /** From the row's manufacturer and partNumber (absent or empty: a generic row). */
  manufacturer?: string;
  partNumber?: string;
  /** For custom magnetics: the file name of the specification sheet. */
  specRef?: string;
  problem?: string;
}

export interface PickOptions {
  /** Fraction of a resistor's rated power it may dissipate (DesignLimits.powerDerating). */
  powerDerating: number;
  /** Fraction of an aluminium/polymer capacitor's rating it may see (DesignLimits.electrolyticDerating). */
  electrolyticDerating: number;
  /** The strictest barrier the stage's windings cross (from the plan), if the design does not carry it. */
  isolation?: { class: string; workingVoltage: number } | null;
}

const DEFAULT_PICK: PickOptions = { powerDerating: 0.5, electrolyticDerating: 0.8 };

/** The pick options with the defaults filled in (a kind's parts function takes them partial). */
export function pickOptions(opts: Partial<PickOptions> = {}): PickOptions {
  return { ...DEFAULT_PICK, ...opts };
}

/** A part value or rating: the one quantity formatter (engine/notation.ts); not finite: "NaN Ω". */
export function eng(value: number, unit: string, digits = 3): string {
  if (!Number.isFinite(value)) return `${value} ${unit}`;
  return formatUnit(value, unit, digits);
}

export interface CapLike { role: string; value: number; count: number; ratedVoltage: number; workingVoltage: number; rmsCurrent?: number }
/** A feedback divider; `tolerance` is the resistor grade the design was analysed with (default 1 %). */
export interface DividerLike { rTop: number; rBottom: number; vout: number; tolerance?: number }

export function pickFromRow(stageId: string, role: string, prefix: PartPick['prefix'], row: LibraryRow, value: string, rating: string, quantity: number, extra: Partial<PartPick> = {}): PartPick {
  return {
    stageId, role, prefix, partClass: row.partClass, libraryId: row.id, description: row.name, value, rating,
    package: strParam(row, 'package'), quantity, unitCost: row.cost, costNote: costNote(row),
    manufacturer: strParam(row, 'manufacturer'), partNumber: strParam(row, 'partNumber'), ...extra,
  };
}

export function missing(stageId: string, role: string, prefix: PartPick['prefix'], cls: PartClass, value: string, rating: string, quantity: number, why: string): PartPick {
  return { stageId, role, prefix, partClass: cls, libraryId: null, description: `${role} (no library part)`, value, rating, package: '', quantity, unitCost: 0, costNote: '', problem: why };
}

export function pickCap(lib: LibraryRow[], stageId: string, c: CapLike, o: PickOptions): PartPick {
  const value = eng(c.value, 'F');
  const ceramic = cheapest(lib, 'cap-ceramic', (r) =>
    numParam(r, 'vRated') >= c.ratedVoltage - 1e-9 && numParam(r, 'cMin') <= c.value * (1 + 1e-9) && numParam(r, 'cMax') >= c.value * (1 - 1e-9));
  if (ceramic) return pickFromRow(stageId, c.role, 'C', ceramic, value, `${numParam(ceramic, 'vRated')} V ${strParam(ceramic, 'dielectric')}`, c.count);
  // No ceramic in the library holds it: a polymer or aluminium part derated for its kind.
  for (const cls of ['cap-polymer', 'cap-aluminium'] as const) {
    const row = cheapest(lib, cls, (r) =>
      numParam(r, 'vRated') * o.electrolyticDerating >= c.workingVoltage && numParam(r, 'cMin') <= c.value && numParam(r, 'cMax') >= c.value);
    if (row) {
      const problem = rippleProblem(row, c);
      return pickFromRow(stageId, c.role, 'C', row, value, `${numParam(row, 'vRated')} V`, c.count, problem ? { problem } : {});
    }
  }
  return missing(stageId, c.role, 'C', 'cap-ceramic', value, `≥ ${c.ratedVoltage} V`, c.count,
    `no capacitor in the library offers ${value} at ${c.ratedVoltage} V or more`);
}

/** A resistor pick for a stage kind's own parts function (library.ts pick rules). */
export function pickResistorPart(lib: LibraryRow[], stageId: string, role: string, ohms: number, watts: number, opts: Partial<PickOptions> = {}): PartPick {
  return pickResistor(lib, stageId, role, ohms, watts, { ...DEFAULT_PICK, ...opts });
}

/** Cheapest resistor of at least the grade (tolerance ≤ `tolerance`, default 1 %) that takes the power. */
export function pickResistor(lib: LibraryRow[], stageId: string, role: string, ohms: number, watts: number, o: PickOptions, quantity = 1, tolerance = 0.01): PartPick {
  const value = eng(ohms, 'Ω');
  const grade = `${+(tolerance * 100).toPrecision(3)} %`;
  const row = cheapest(lib, 'resistor', (r) => numParam(r, 'power') * o.powerDerating >= watts && numParam(r, 'tolerance') <= tolerance + 1e-12);
  if (row) return pickFromRow(stageId, role, 'R', row, value, `${eng(numParam(row, 'power'), 'W')} ${+(numParam(row, 'tolerance') * 100).toPrecision(3)} %`, quantity);
  return missing(stageId, role, 'R', 'resistor', value, `≥ ${eng(watts / o.powerDerating, 'W')}, ${grade}`, quantity, `no ${grade} resistor in the library takes ${eng(watts, 'W')} within the power derating`);
}

export function pickDivider(lib: LibraryRow[], stageId: string, d: DividerLike, o: PickOptions): PartPick[] {
  const i = d.vout / (d.rTop + d.rBottom);
  return [
    pickResistor(lib, stageId, `feedback top (sets ${eng(d.vout, 'V')})`, d.rTop, i * i * d.rTop, o, 1, d.tolerance ?? 0.01),
    pickResistor(lib, stageId, 'feedback bottom', d.rBottom, i * i * d.rBottom, o, 1, d.tolerance ?? 0.01),
  ];
}

export interface PartRefLike { role: string; libraryId: string }

/**
 * The parts the stage designer chose from the library (design.parts) for some roles, as BOM
 * picks of exactly those rows. A row the library no longer holds is listed with a problem
 * (the design was analysed with it: plan again after editing the library).
 */
function picksFromRefs(lib: LibraryRow[], stageId: string, refs: PartRefLike[], roles: (role: string) => boolean, value: (ref: PartRefLike, row: LibraryRow) => { value: string; rating: string; prefix: PartPick['prefix']; quantity?: number }): PartPick[] | null {
  const chosen = refs.filter((r) => roles(r.role));
  if (chosen.length === 0) return null;
  return chosen.map((ref) => {
    const row = lib.find((r) => r.id === ref.libraryId);
    if (!row) return missing(stageId, ref.role, 'U', 'controller', '', '', 1, `the design was analysed with library part ${ref.libraryId}, which the library no longer holds: plan again`);
    const v = value(ref, row);
    return pickFromRow(stageId, ref.role, v.prefix, row, v.value, v.rating, v.quantity ?? 1);
  });
}

const SWITCHER_ROLES = new Set(['regulator (integrated switches)', 'controller', 'high-side switch', 'low-side switch']);

export function switcherFromRefs(lib: LibraryRow[], stageId: string, refs: PartRefLike[] | undefined): PartPick[] | null {
  if (!refs) return null;
  return picksFromRefs(lib, stageId, refs, (r) => SWITCHER_ROLES.has(r), (ref, row) => row.partClass === 'switch'
    ? { prefix: 'Q', value: '', rating: `${numParam(row, 'vds')} V, ${numParam(row, 'id')} A` }
    : { prefix: 'U', value: '', rating: ref.role === 'controller' ? `${numParam(row, 'vinMax')} V` : `${numParam(row, 'vinMax')} V, ${numParam(row, 'iMax')} A` });
}

/** The BOM's check of a bank's ripple current against its parts' rating (× count). */
function rippleProblem(row: LibraryRow, c: CapLike): string | undefined {
  const rating = numParam(row, 'iRipple');
  if (!(c.rmsCurrent !== undefined && c.rmsCurrent > 0) || !(rating > 0)) return undefined;
  const total = rating * c.count;
  return c.rmsCurrent > total * (1 + 1e-9)
    ? `ripple current ${eng(c.rmsCurrent, 'A')} rms exceeds the bank's rating ${c.count} × ${eng(rating, 'A')} = ${eng(total, 'A')}`
    : undefined;
}

export function capFromRefs(lib: LibraryRow[], stageId: string, refs: PartRefLike[] | undefined, c: CapLike, o: PickOptions): PartPick {
  const ref = refs?.find((r) => r.role === c.role);
  const row = ref ? lib.find((r) => r.id === ref.libraryId) : undefined;
  if (ref && row) {
    const problem = rippleProblem(row, c);
    return pickFromRow(stageId, c.role, 'C', row, eng(c.value, 'F'), `${numParam(row, 'vRated')} V${strParam(row, 'dielectric') ? ' ' + strParam(row, 'dielectric') : ''}`, c.count, problem ? { problem } : {});
  }
  return pickCap(lib, stageId, c, o);
}

/** Switching stage: one integrated regulator, or a controller plus two external switches, whichever costs less. */
export function pickSwitcher(lib: LibraryRow[], stageId: string, vinMax: number, iNeed: number, needForcedPwm: boolean, ipk: number, topology = 'buck'): PartPick[] {
  const options: PartPick[][] = [];
  const okCtl = (r: LibraryRow) => numParam(r, 'vinMax') >= vinMax && (!needForcedPwm || numParam(r, 'forcedPwm') === 1) && rowTopology(r) === topology;
  const integ = cheapest(lib, 'controller', (r) => okCtl(r) && numParam(r, 'integrated') === 1 && numParam(r, 'iMax') >= iNeed);
  if (integ) options.push([pickFromRow(stageId, 'regulator (integrated switches)', 'U', integ, '', `${numParam(integ, 'vinMax')} V, ${numParam(integ, 'iMax')} A`, 1)]);
  const ext = cheapest(lib, 'controller', (r) => okCtl(r) && numParam(r, 'integrated') === 0 && numParam(r, 'iMax') >= iNeed);
  // Switch ratings: Vds ≥ 1.25·Vin max and Id ≥ 1.5·peak (common practice margins).
  const sw = cheapest(lib, 'switch', (r) => numParam(r, 'vds') >= 1.25 * vinMax && numParam(r, 'id') >= 1.5 * ipk);
  if (ext && sw) {
    options.push([
      pickFromRow(stageId, 'controller', 'U', ext, '', `${numParam(ext, 'vinMax')} V`, 1),
      pickFromRow(stageId, 'high-side switch', 'Q', sw, '', `${numParam(sw, 'vds')} V, ${numParam(sw, 'id')} A`, 1),
      pickFromRow(stageId, 'low-side switch', 'Q', sw, '', `${numParam(sw, 'vds')} V, ${numParam(sw, 'id')} A`, 1),
    ]);
  }
  if (options.length === 0) {
    return [missing(stageId, 'regulator', 'U', 'controller', '', `${eng(vinMax, 'V')}, ${eng(iNeed, 'A')}${needForcedPwm ? ', forced PWM' : ''}`, 1,
      `no controller in the library handles ${eng(vinMax, 'V')} and ${eng(iNeed, 'A')}${needForcedPwm ? ' in forced PWM' : ''}`)];
  }
  const total = (ps: PartPick[]) => ps.reduce((a, p) => a + p.unitCost * p.quantity, 0);
  options.sort((a, b) => total(a) - total(b));
  return options[0]!;
}


/**
 * The parts of a single-inductor switching stage (buck, boost…): regulator or controller and
 * switch pair (the design's own library choice, else the cheapest fit for `vRating` and
 * `iNeed` made for `topology`), the inductor, the capacitors and the feedback divider.
 */
export function inductorStageParts(stageId: string, d: SwitchingDesignBase, library: LibraryRow[], opts: Partial<PickOptions>, need: { vRating: number; iNeed: number; topology?: string }): PartPick[] {
  const o = { ...DEFAULT_PICK, ...opts };
  const picks: PartPick[] = [];
  // The `?.` and `??` below also hold for a saved design that is incomplete (plan-types.ts).
  const out0 = d.outputs?.[0];
  if (!out0) return [missing(stageId, 'stage', 'U', 'controller', '', '', 1, 'the stage carries no design')];
  const iMax = need.iNeed;
  picks.push(...(switcherFromRefs(library, stageId, d.parts) ?? pickSwitcher(library, stageId, need.vRating, iMax, false, d.isat ?? iMax, need.topology)));
  const L = d.inductance ?? 0;
  const isat = d.isat ?? iMax;
  const fromRef = d.parts ? picksFromRefs(library, stageId, d.parts, (r) => r === 'inductor', () => ({ prefix: 'L', value: eng(L, 'H'), rating: `Isat ≥ ${eng(isat, 'A')}` })) : null;
  const ind = fromRef ? null : cheapest(library, 'inductor', (r) =>
    numParam(r, 'lMin') <= L * (1 + 1e-9) && numParam(r, 'lMax') >= L * (1 - 1e-9) && numParam(r, 'iSat') * Math.sqrt(numParam(r, 'lMax') / L) >= isat);
  picks.push(...(fromRef ?? [ind
    ? pickFromRow(stageId, 'inductor', 'L', ind, eng(L, 'H'), `Isat ≥ ${eng(isat, 'A')}`, 1)
    : missing(stageId, 'inductor', 'L', 'inductor', eng(L, 'H'), `Isat ≥ ${eng(isat, 'A')}`, 1, `no inductor in the library offers ${eng(L, 'H')} with ${eng(isat, 'A')} saturation current`)]));
  if (d.cin) picks.push(capFromRefs(library, stageId, d.parts, d.cin, o));
  if (d.cout) picks.push(capFromRefs(library, stageId, d.parts, d.cout, o));
  if (d.divider) picks.push(...pickDivider(library, stageId, d.divider, o));
  return picks;
}

/**
 * The concrete parts a stage design implies, chosen from the library (cheapest row that
 * fits): each kind's own parts function (registry.ts `parts`), with the pick rules above. A
 * part no row fits is still listed, with `problem` set and no cost.
 */
export function partsForStage(stageId: string, design: StageDesign | null, library: LibraryRow[], opts: Partial<PickOptions> = {}): PartPick[] {
  // A stage without a design, or a saved design without its outputs (plan-types.ts); the
  // kinds' parts functions keep `?.` and `??` for a saved design otherwise incomplete.
  const out0 = design?.outputs?.[0];
  if (!design || !out0) return [missing(stageId, 'stage', 'U', 'controller', '', '', 1, 'the stage carries no design')];
  const m = kindModuleOf(design.kind);
  if (m) return m.parts(stageId, design, library, opts);
  const kind: string = design.kind;
  return [missing(stageId, `stage of kind ${kind}`, 'U', 'controller', '', '', 1, `no part mapping for stage kind ${kind}`)];
}

// ---------------------------------------------------------------------------------------
// The library as the planner's cost model

/** Median unit cost of the rows of some classes (0 when the library has none). */
function medianCost(library: LibraryRow[], classes: PartClass[], extra: (r: LibraryRow) => number = () => 0, keep: (r: LibraryRow) => boolean = () => true): number {
  const xs = library.filter((r) => classes.includes(r.partClass) && keep(r)).map((r) => r.cost + extra(r)).sort((a, b) => a - b);
  if (xs.length === 0) return 0;
  const m = Math.floor(xs.length / 2);
  return xs.length % 2 ? xs[m]! : (xs[m - 1]! + xs[m]!) / 2;
}

/**
 * Unit prices per planner part category taken from the library (the median row of each
 * class, a custom magnetic with two secondaries), so the planner ranks plans with the
 * project's own prices. The planner counts parts by category; the BOM then picks the rows.
 * Categories the library has no class for (such as the insulation system of a barrier) keep
 * the planner's invented estimate.
 */
export function libraryUnitCosts(library: LibraryRow[]): Record<keyof PartCounts, number> {
  return {
    ...INVENTED_UNIT_COST,
    // The buck controllers only: the reference stage is a buck (rows of other topologies do not move it).
    controller: medianCost(library, ['controller'], undefined, (r) => rowTopology(r) === 'buck'),
    switch: medianCost(library, ['switch']),
    magnetic: medianCost(library, ['inductor']),
    coupledMagnetic: medianCost(library, ['magnetic-custom'], (r) => 2 * numParam(r, 'costPerWinding', 0)),
    rectifier: medianCost(library, ['rectifier']),
    capacitor: medianCost(library, ['cap-ceramic']),
    resistor: medianCost(library, ['resistor']),
    ldo: medianCost(library, ['ldo']),
  };
}

/**
 * Cost and part count of some stages from the parts partsForStage lists for their designs:
 * the numbers the BOM shows for the same stages (barriers are in the magnetic's row).
 */
export function priceStagesFromLibrary(library: LibraryRow[], stages: readonly { localId: string; design: StageDesign | null; barriers?: readonly { isolation: string; workingVoltage: number }[] }[], opts: Partial<PickOptions> = {}): { cost: number; parts: number } {
  let cost = 0;
  let parts = 0;
  for (const st of stages) {
    const iso = (st.barriers ?? []).map((b) => ({ class: b.isolation, workingVoltage: b.workingVoltage }))
      .sort((a, b) => isolationRank(b.class) - isolationRank(a.class) || b.workingVoltage - a.workingVoltage)[0] ?? null;
    for (const p of partsForStage(st.localId, st.design, library, { ...opts, isolation: iso })) {
      cost += p.unitCost * p.quantity;
      parts += p.quantity;
    }
  }
  return { cost: Math.round(cost * 1e6) / 1e6, parts };
}

/** A planner cost model priced from the library (see libraryUnitCosts, priceStagesFromLibrary). */
export function libraryCostModel(library: LibraryRow[], opts: Partial<PickOptions> = {}): CostModel {
  const unit = libraryUnitCosts(library);
  const price = (p: PartCounts) => {
    let c = 0;
    for (const k of Object.keys(p) as (keyof PartCounts)[]) c += (p[k] ?? 0) * (unit[k] ?? 0);
    return Math.round(c * 1e6) / 1e6;
  };
  // Reference stage: the planner's typical synchronous buck.
  const refParts = (Object.keys(TYPICAL_BUCK_PARTS) as (keyof PartCounts)[]).filter((k) => String(k) !== 'barrier').reduce((a, k) => a + TYPICAL_BUCK_PARTS[k], 0);
  return {
    cost: (p) => price(p), referenceStageCost: price(TYPICAL_BUCK_PARTS) || 1, referenceStageParts: refParts,
    priceStages: (stages) => priceStagesFromLibrary(library, stages, opts),
  };
}
