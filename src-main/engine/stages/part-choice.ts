/**
 * Part choice at design time: the stage designers pick the concrete library rows a stage
 * is built from (regulator or controller and switches, inductor, capacitors, LDO) and copy
 * those rows' parameters into the design, so every loss, junction temperature and window the
 * engine computes belongs to the part the bill of materials lists. The design records the
 * chosen row of each role (`StagePartRef`); the BOM reads those references instead of
 * choosing again (engine/library.ts `partsForStage`).
 *
 * Where a row leaves a parameter out (an integrated regulator does not state its internal
 * switches' gate charge), the generic default from memory stands in and the reference says
 * which parameters were generic.
 */
import type { LibraryRow } from '../library.ts';
import { GENERIC_DEFAULTS, VT, type ControllerParams, type DiodeModel, type SwitchParams } from './defaults.ts';
import { ceramicRetained, type CapacitorChoice } from './common.ts';
import { nearest } from '../eseries.ts';

/** Which library row fills one role of a stage, and what of it the model used. */
export interface StagePartRef {
  role: string;
  libraryId: string;
  /** The parameters the evaluation took from the row (key → value in base SI). */
  used: Record<string, number>;
  /** Parameters the row does not state, taken from the generic defaults instead. */
  generic: string[];
}

/** Margins of the rating checks [common practice unless the project says otherwise]. */
export interface RatingMargins {
  /** Controller or regulator input rating ≥ (1 + margin)·Vin max (default 10 %). */
  controllerInput: number;
  /** Switch Vds ≥ factor·Vin max (default 1.25) and Id ≥ factor·peak (default 1.5). */
  switchVoltage: number;
  switchCurrent: number;
}

export const DEFAULT_MARGINS: RatingMargins = { controllerInput: 0.1, switchVoltage: 1.25, switchCurrent: 1.5 };

const num = (r: LibraryRow, key: string): number => {
  const v = r.params[key];
  return typeof v === 'number' ? v : NaN;
};
const has = (r: LibraryRow, key: string) => typeof r.params[key] === 'number';

/**
 * The choices below are pure functions of (library, inputs), and a planner asks for the same
 * ones across thousands of candidate stages and turns trials: each is remembered per library
 * (the same rows array) under its exact inputs (JSON prints numbers in their shortest
 * round-trip form, so equal keys mean equal inputs). Designs that chose the same part share
 * the returned objects, which no caller changes (as the planner never changes a design).
 */
const remembered = new WeakMap<readonly LibraryRow[], Map<string, unknown>>();
function memo<T>(lib: readonly LibraryRow[], key: string, make: () => T): T {
  let m = remembered.get(lib);
  if (!m) { m = new Map(); remembered.set(lib, m); }
  if (m.has(key)) return m.get(key) as T;
  const v = make();
  m.set(key, v);
  return v;
}

function cheapestOf(rows: readonly LibraryRow[], cls: LibraryRow['partClass'], fits: (r: LibraryRow) => boolean): LibraryRow | null {
  let best: LibraryRow | null = null;
  for (const r of rows) {
    if (r.partClass !== cls || !fits(r)) continue;
    if (!best || r.cost < best.cost || (r.cost === best.cost && r.id < best.id)) best = r;
  }
  return best;
}

export interface SwitcherNeed {
  vinMin: number;
  vinMax: number;
  /** Largest output (or magnetizing) current the controller must be rated for. */
  iNeed: number;
  /** Peak switch current. */
  ipk: number;
  /** A coupled-winding stage needs forced PWM with a synchronous low side. */
  forcedPwm: boolean;
  margins?: Partial<RatingMargins>;
  /**
   * Reference grade: only controllers whose reference tolerance (the row's, or the generic
   * default where the row states none) is at most this (absent: any grade).
   */
  vrefToleranceMax?: number;
  /**
   * The converter topology the controller must be made for (its row's `topology` parameter;
   * a row without one is a buck controller). Default `buck`.
   */
  topology?: string;
}

/** A controller row's reference tolerance as the design would use it. */
export function vrefToleranceOf(r: LibraryRow): number {
  return has(r, 'vrefTolerance') ? num(r, 'vrefTolerance') : GENERIC_DEFAULTS.controller.vrefTolerance;
}

/**
 * The cheapest resistor row of at least the given grade (tolerance ≤ grade); the BOM lists
 * the divider with the same rule (engine/library.ts pickResistor). Null when the library has none.
 */
export function cheapestResistorOfGrade(lib: readonly LibraryRow[], tolerance: number): LibraryRow | null {
  return cheapestOf(lib, 'resistor', (r) => num(r, 'tolerance') <= tolerance + 1e-12);
}

/** The topology a controller row is made for (`topology` parameter; absent: buck). */
export function rowTopology(r: LibraryRow): string {
  const t = r.params.topology;
  return typeof t === 'string' && t !== '' ? t : 'buck';
}

export interface SwitcherChoice {
  integrated: boolean;
  controller: ControllerParams;
  highSide: SwitchParams;
  lowSide: SwitchParams;
  rdsHotFactor: number;
  thetaJA: { highSide: number; lowSide: number; controller: number };
  refs: StagePartRef[];
  cost: number;
  reason: string;
}

export interface ChoiceMiss { problem: string }

function controllerFrom(r: LibraryRow, generic: string[]): { params: ControllerParams; used: Record<string, number> } {
  const g = GENERIC_DEFAULTS.controller;
  const pick = (key: string, fallback: number): number => {
    if (has(r, key)) return num(r, key);
    generic.push(key);
    return fallback;
  };
  const params: ControllerParams = {
    iq: pick('iq', g.iq),
    minOnTime: pick('tonMin', g.minOnTime),
    maxDuty: pick('dMax', g.maxDuty),
    vref: pick('vref', g.vref),
    vrefTolerance: pick('vrefTolerance', g.vrefTolerance),
    negCurrentLimit: pick('negLimit', g.negCurrentLimit),
    vDrive: g.vDrive,
    deadTime: g.deadTime,
  };
  return {
    params,
    used: { iq: params.iq, tonMin: params.minOnTime, dMax: params.maxDuty, vref: params.vref, vrefTolerance: params.vrefTolerance, negLimit: params.negCurrentLimit, thetaJA: num(r, 'thetaJA'), vinMax: num(r, 'vinMax') },
  };
}

function switchFrom(r: LibraryRow, fallback: SwitchParams, generic: string[]): SwitchParams {
  const pick = (key: 'qg' | 'coss' | 'tr' | 'tf'): number => {
    if (has(r, key)) return num(r, key);
    generic.push(key);
    return fallback[key];
  };
  // A row may state its body diode's recovery charge; without it the per-ampere generic applies.
  return { rdsOn: num(r, 'rdsOn'), qg: pick('qg'), coss: pick('coss'), tr: pick('tr'), tf: pick('tf'), ...(has(r, 'qrr') ? { qrr: num(r, 'qrr') } : {}) };
}

/**
 * The cheapest regulator (integrated switches) or controller plus switch pair in the library
 * that meets the ratings: input rating with its margin, UVLO below the lowest input, current,
 * forced PWM where asked; switches Vds and Id with their margins.
 */
export function chooseSwitcher(lib: readonly LibraryRow[], need: SwitcherNeed): SwitcherChoice | ChoiceMiss {
  return memo(lib, `switcher ${JSON.stringify(need)}`, () => pickSwitcher(lib, need));
}

function pickSwitcher(lib: readonly LibraryRow[], need: SwitcherNeed): SwitcherChoice | ChoiceMiss {
  const m = { ...DEFAULT_MARGINS, ...need.margins };
  const vinRating = need.vinMax * (1 + m.controllerInput);
  const okCtl = (r: LibraryRow) => num(r, 'vinMax') >= vinRating - 1e-9
    && (!has(r, 'uvlo') || num(r, 'uvlo') <= need.vinMin)
    && (!has(r, 'vinMin') || num(r, 'vinMin') <= need.vinMin)
    && (!need.forcedPwm || num(r, 'forcedPwm') === 1)
    && (need.vrefToleranceMax === undefined || vrefToleranceOf(r) <= need.vrefToleranceMax + 1e-12)
    && rowTopology(r) === (need.topology ?? 'buck');
  const options: SwitcherChoice[] = [];
  const integ = cheapestOf(lib, 'controller', (r) => okCtl(r) && num(r, 'integrated') === 1 && num(r, 'iMax') >= need.iNeed && has(r, 'rdsHs') && has(r, 'rdsLs'));
  if (integ) {
    const generic: string[] = [];
    const c = controllerFrom(integ, generic);
    const hs: SwitchParams = { ...GENERIC_DEFAULTS.highSide, rdsOn: num(integ, 'rdsHs') };
    const ls: SwitchParams = { ...GENERIC_DEFAULTS.lowSide, rdsOn: num(integ, 'rdsLs') };
    generic.push('switch qg', 'switch coss', 'switch tr/tf');
    const th = num(integ, 'thetaJA');
    options.push({
      integrated: true, controller: c.params, highSide: hs, lowSide: ls, rdsHotFactor: GENERIC_DEFAULTS.rdsHotFactor,
      thetaJA: { highSide: th, lowSide: th, controller: th },
      refs: [{ role: 'regulator (integrated switches)', libraryId: integ.id, used: { ...c.used, rdsHs: hs.rdsOn, rdsLs: ls.rdsOn }, generic }],
      cost: integ.cost,
      reason: `${integ.name}: rated ${num(integ, 'vinMax')} V against ${vinRating.toFixed(1)} V (Vin max + ${Math.round(m.controllerInput * 100)} %), ${num(integ, 'iMax')} A for ${need.iNeed.toFixed(3)} A`,
    });
  }
  const ext = cheapestOf(lib, 'controller', (r) => okCtl(r) && num(r, 'integrated') === 0 && num(r, 'iMax') >= need.iNeed);
  const sw = cheapestOf(lib, 'switch', (r) => num(r, 'vds') >= m.switchVoltage * need.vinMax && num(r, 'id') >= m.switchCurrent * need.ipk);
  if (ext && sw) {
    const generic: string[] = [];
    const c = controllerFrom(ext, generic);
    const swGeneric: string[] = [];
    const hs = switchFrom(sw, GENERIC_DEFAULTS.highSide, swGeneric);
    const ls = switchFrom(sw, GENERIC_DEFAULTS.lowSide, []);
    const hot = has(sw, 'rdsTempFactor') ? num(sw, 'rdsTempFactor') : GENERIC_DEFAULTS.rdsHotFactor;
    if (!has(sw, 'rdsTempFactor')) swGeneric.push('rdsTempFactor');
    const swUsed = { rdsOn: hs.rdsOn, qg: hs.qg, coss: hs.coss, tr: hs.tr, tf: hs.tf, vds: num(sw, 'vds'), id: num(sw, 'id'), thetaJA: num(sw, 'thetaJA'), rdsTempFactor: hot };
    options.push({
      integrated: false, controller: c.params, highSide: hs, lowSide: ls, rdsHotFactor: hot,
      thetaJA: { highSide: num(sw, 'thetaJA'), lowSide: num(sw, 'thetaJA'), controller: num(ext, 'thetaJA') },
      refs: [
        { role: 'controller', libraryId: ext.id, used: c.used, generic },
        { role: 'high-side switch', libraryId: sw.id, used: swUsed, generic: swGeneric },
        { role: 'low-side switch', libraryId: sw.id, used: swUsed, generic: swGeneric },
      ],
      cost: ext.cost + 2 * sw.cost,
      reason: `${ext.name} with two ${sw.name}: controller rated ${num(ext, 'vinMax')} V against ${vinRating.toFixed(1)} V; switches ${num(sw, 'vds')} V ≥ ${m.switchVoltage}·Vin max, ${num(sw, 'id')} A ≥ ${m.switchCurrent}·${need.ipk.toFixed(2)} A peak`,
    });
  }
  if (options.length === 0) {
    return { problem: `no ${need.topology && need.topology !== 'buck' ? `${need.topology} ` : ''}regulator or controller in the library is rated for ${vinRating.toFixed(1)} V (Vin max ${need.vinMax} V + ${Math.round(m.controllerInput * 100)} %), ${need.iNeed.toFixed(3)} A${need.forcedPwm ? ', forced PWM' : ''}${need.vrefToleranceMax !== undefined ? `, reference within ±${+(need.vrefToleranceMax * 100).toPrecision(3)} %` : ''} with its UVLO below ${need.vinMin} V` };
  }
  options.sort((a, b) => a.cost - b.cost || Number(b.integrated) - Number(a.integrated));
  return options[0]!;
}

/** The cheapest inductor row offering L with at least isat; its DCR scaled as the row says. */
export function chooseInductor(lib: readonly LibraryRow[], L: number, isat: number): { ref: StagePartRef; dcr: number; cost: number } | ChoiceMiss {
  const fits = (r: LibraryRow) => num(r, 'lMin') <= L * (1 + 1e-9) && num(r, 'lMax') >= L * (1 - 1e-9) && num(r, 'iSat') * Math.sqrt(num(r, 'lMax') / L) >= isat;
  const row = cheapestOf(lib, 'inductor', fits);
  if (!row) return { problem: `no inductor in the library offers ${(L * 1e6).toPrecision(3)} µH with ${isat.toPrecision(3)} A saturation current` };
  // The row's DCR is stated at its largest value and falls as √(L/lMax) (fewer turns).
  const dcr = num(row, 'dcr') * Math.sqrt(L / num(row, 'lMax'));
  return { ref: { role: 'inductor', libraryId: row.id, used: { dcr, iSat: num(row, 'iSat') * Math.sqrt(num(row, 'lMax') / L) }, generic: [] }, dcr, cost: row.cost };
}

/**
 * With a library the inductance must be one a library inductor offers: the E12 values
 * nearest the target first, within a ripple of about 15–80 % of the load [common practice],
 * each checked for a saturation current of peakFor(L)·(1 + margin). Returns the inductance
 * kept (the target when none fits) and the pick, or the first miss.
 */
export function chooseLibraryInductance(lib: readonly LibraryRow[], target: number, peakFor: (L: number) => number):
  { inductance: number; pick: ReturnType<typeof chooseInductor> } {
  let miss: ChoiceMiss | null = null;
  const tried: number[] = [];
  for (const k of [1, 1.2, 0.82, 1.5, 0.68, 1.8, 0.56, 2.2, 0.47]) {
    const Lk = nearest('E12', target * k);
    if (tried.includes(Lk)) continue;
    tried.push(Lk);
    const pick = chooseInductor(lib, Lk, peakFor(Lk) * (1 + GENERIC_DEFAULTS.saturationMargin));
    if (!('problem' in pick)) return { inductance: Lk, pick };
    miss ??= pick;
  }
  return { inductance: target, pick: miss! };
}

/**
 * Generic RMS ripple rating of one class-II ceramic by case size, where the row states none:
 * the current that warms a part by about 10–20 K at a few hundred kHz [from memory; common
 * practice puts small MLCCs at 1–4 A]. Unknown case: no rating (not checked).
 */
const CERAMIC_CASE_RIPPLE: Record<string, number> = { '0402': 1, '0603': 1.5, '0805': 2, '1206': 3, '1210': 4, '1812': 5 };

function rowPackage(r: LibraryRow): string | undefined {
  const v = (r.params as Record<string, unknown>).package;
  return typeof v === 'string' ? v : undefined;
}
function rowDielectric(r: LibraryRow): string | undefined {
  const v = (r.params as Record<string, unknown>).dielectric;
  return typeof v === 'string' ? v : undefined;
}

/** A row's ripple rating per part and whether it came from the generic case-size table. */
function rippleRatingOf(row: LibraryRow): { rating: number; generic: boolean } | null {
  if (has(row, 'iRipple') && num(row, 'iRipple') > 0) return { rating: num(row, 'iRipple'), generic: false };
  if (row.partClass !== 'cap-ceramic') return null;
  const caseRating = CERAMIC_CASE_RIPPLE[rowPackage(row) ?? ''];
  return caseRating ? { rating: caseRating, generic: true } : null;
}

/** Parts needed so the bank's ripple rating covers its RMS current (1 when either is unknown). */
function rippleCount(row: LibraryRow, rms: number | undefined): number {
  const r = rippleRatingOf(row);
  if (!(rms !== undefined && rms > 0) || !r) return 1;
  return Math.ceil(rms / r.rating - 1e-9);
}

/**
 * The cheapest capacitor row for a bank: a ceramic offering the part value at the bank's
 * rating or above; failing that, a polymer or aluminium part within its voltage derating
 * [DESIGN §4: aluminium ≤ 70–80 % of the rating], with enough parts in parallel that the
 * bank's capacitance and its ripple-current rating (× count) both hold. The bank's ESR
 * becomes the row's ESR over the count (when the row states one).
 */
export function chooseCeramicRow(lib: readonly LibraryRow[], c: CapacitorChoice, electrolyticDerating = 0.8): { ref: StagePartRef; bank: CapacitorChoice; cost: number } | null {
  return memo(lib, `capacitor ${electrolyticDerating} ${JSON.stringify(c)}`, () => pickCapacitorRow(lib, c, electrolyticDerating));
}

function pickCapacitorRow(lib: readonly LibraryRow[], c: CapacitorChoice, electrolyticDerating: number): { ref: StagePartRef; bank: CapacitorChoice; cost: number } | null {
  // Ceramic rows offering the part value at the rating: the bank grows to as many parts as its
  // ripple current needs (rating per part × count ≥ RMS current), the cheapest bank wins.
  let row: LibraryRow | null = null;
  let rowCount = c.count;
  for (const r of lib) {
    if (r.partClass !== 'cap-ceramic' || !(num(r, 'vRated') >= c.ratedVoltage - 1e-9 && num(r, 'cMin') <= c.value * (1 + 1e-9) && num(r, 'cMax') >= c.value * (1 - 1e-9))) continue;
    // The row's own DC-bias curve (case size, dielectric) may keep less than the generic one:
    // then more parts, so the bank still holds what the designer needed.
    const keep = ceramicRetained(c.workingVoltage, num(r, 'vRated'), rowPackage(r), rowDielectric(r));
    const forC = c.needEffective !== undefined ? Math.ceil(c.needEffective / (c.value * keep) - 1e-9) : c.count;
    const count = Math.max(c.count, forC, rippleCount(r, c.rmsCurrent));
    const cost = r.cost * count;
    const bestCost = row ? row.cost * rowCount : Infinity;
    if (cost < bestCost || (cost === bestCost && row && r.id < row.id)) { row = r; rowCount = count; }
  }
  if (!row) {
    // Electrolytic banks: value per part within the row's range, count from capacitance and ripple.
    let best: { row: LibraryRow; count: number; value: number; cost: number } | null = null;
    for (const cls of ['cap-polymer', 'cap-aluminium'] as const) {
      for (const r of lib) {
        if (r.partClass !== cls || !(num(r, 'vRated') * electrolyticDerating >= c.workingVoltage)) continue;
        const total = c.value * c.count;
        const value = Math.min(num(r, 'cMax'), Math.max(num(r, 'cMin'), total));
        const count = Math.max(Math.ceil(total / value - 1e-9), rippleCount(r, c.rmsCurrent));
        const cost = r.cost * count;
        if (!best || cost < best.cost) best = { row: r, count, value, cost };
      }
    }
    if (!best) return null;
    const r = best.row;
    const esr = num(r, 'esr') / best.count;
    const kind = r.partClass === 'cap-polymer' ? 'polymer' : 'aluminium';
    return {
      ref: { role: c.role, libraryId: r.id, used: { value: best.value, count: best.count, vRated: num(r, 'vRated'), esr: num(r, 'esr'), iRipple: has(r, 'iRipple') ? num(r, 'iRipple') : NaN }, generic: has(r, 'iRipple') ? [] : ['iRipple'] },
      bank: { ...c, value: best.value, count: best.count, ratedVoltage: num(r, 'vRated'), esr, effective: best.value * best.count, stress: c.workingVoltage / num(r, 'vRated'), partKind: kind, ...(has(r, 'iRipple') ? { rippleRating: num(r, 'iRipple') } : {}) },
      cost: best.cost,
    };
  }
  const generic: string[] = [];
  const count = rowCount;
  let esr = c.esr * c.count / count;
  if (has(row, 'esr')) esr = num(row, 'esr') / count;
  else generic.push('esr');
  // The part's own rating sets its DC-bias loss and stress.
  const rated = num(row, 'vRated');
  const effective = c.value * count * ceramicRetained(c.workingVoltage, rated, rowPackage(row), rowDielectric(row));
  const rr = rippleRatingOf(row);
  if (rr?.generic) generic.push('iRipple');
  return {
    ref: { role: c.role, libraryId: row.id, used: { value: c.value, vRated: rated, esr: esr * count, ...(count !== c.count ? { count } : {}), ...(rr ? { iRipple: rr.rating } : {}) }, generic },
    bank: { ...c, count, esr, ratedVoltage: rated, effective, stress: c.workingVoltage / rated, ...(rr ? { rippleRating: rr.rating } : {}) },
    cost: row.cost * count,
  };
}

/** A diode model that reproduces a rectifier row's forward drop at its rated current. */
export function diodeFromRow(row: LibraryRow, base: { n: number; rs: number; vfSpread: number }): DiodeModel {
  const iF = num(row, 'if');
  const vf = num(row, 'vf');
  // Shockley with series resistance, Vf = n·Vt·ln(1 + I/Is) + Rs·I, solved for Is at the
  // row's (If, Vf); Rs kept below a third of the drop so the log term stays meaningful.
  const rs = Math.min(base.rs, (vf / 3) / Math.max(iF, 1e-6));
  const is = iF / Math.expm1((vf - rs * iF) / (base.n * VT));
  const d: DiodeModel = { is, n: base.n, rs, vfSpread: base.vfSpread };
  // The row's junction capacitance is kept on the part reference (and sizes a snubber), but
  // is not put into the stage model: the leakage-ring model it would switch on is validated
  // only while the secondary conducts through the whole off-time (docs/stage-json.md), and at
  // light load it reads 5–47 % off the independent grid, which would make the planner refuse
  // or accept windings on an unvalidated number. A stage file may still give rectifier.cjo.
  // The row's recovery time is not a transit time: the stored charge TT·I depends on how the
  // part is driven, and the coupled-winding model's recovery term with an undamped ring
  // multiplies it by √(Llk/Cj). It is kept on the row (and the BOM), not put into the model.
  return d;
}

/**
 * The cheapest rectifier row rated for a reverse voltage (with the usual 80 % use, common
 * practice) and 1.5 × the average current.
 */
export function chooseRectifier(lib: readonly LibraryRow[], reverse: number, average: number, role: string, thermal?: { ambient: number; tjMax: number }): { row: LibraryRow; ref: StagePartRef } | ChoiceMiss {
  return memo(lib, `rectifier ${JSON.stringify([reverse, average, role, thermal ?? null])}`, () => pickRectifier(lib, reverse, average, role, thermal));
}

function pickRectifier(lib: readonly LibraryRow[], reverse: number, average: number, role: string, thermal?: { ambient: number; tjMax: number }): { row: LibraryRow; ref: StagePartRef } | ChoiceMiss {
  const vr = reverse / 0.8;
  // Junction estimate Ta + Vf·Iavg·θJA with 10 K kept in hand (the model's conduction loss
  // adds the RMS part; the stage's thermal check has the last word).
  const cool = (r: LibraryRow) => !thermal || thermal.ambient + num(r, 'vf') * average * num(r, 'thetaJA') <= thermal.tjMax - 10;
  const row = cheapestOf(lib, 'rectifier', (r) => num(r, 'vr') >= vr && num(r, 'if') >= 1.5 * average && cool(r));
  if (!row) return { problem: `no rectifier in the library blocks ${vr.toFixed(0)} V (${reverse.toFixed(0)} V peak / 0.8) and carries ${(1.5 * average).toFixed(3)} A${thermal ? ` within ${thermal.tjMax} °C` : ''}` };
  const generic: string[] = [];
  if (!has(row, 'cj')) generic.push('cj');
  if (!has(row, 'trr')) generic.push('trr');
  return { row, ref: { role, libraryId: row.id, used: { vr: num(row, 'vr'), if: num(row, 'if'), vf: num(row, 'vf'), cj: has(row, 'cj') ? num(row, 'cj') : NaN, thetaJA: num(row, 'thetaJA') }, generic } };
}
