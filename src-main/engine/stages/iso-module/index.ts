/**
 * Isolated fixed-ratio module: the stage kind `iso-module`. An unregulated isolated converter
 * bought as one part (typically 1–2 W): its output is a fixed ratio of its input at full load,
 * with a load-regulation line that rises towards light load, a minimum load below which the
 * maker does not state the output, and an efficiency line versus load. The numbers come from
 * the module's part-library row (class `iso-module`); without a library the invented generic
 * rows below stand in. Model (common practice for such modules, from memory):
 *   Vout(x) = ratio·Vin·(1 + r·(1 − x)/0.9), x = load share of the rated current, r = the stated
 *     rise from full load to 10 % load (line extrapolated below that);
 *   loss(x) = P0 + (Prated·(1/η_full − 1) − P0)·x² (no-load power plus a resistive part),
 *     which gives η_full at full load and falls towards light load.
 * The barrier: the module's isolation class and working voltage must cover the domain's.
 * Caution: the barrier's adequacy is for the applicable safety standard and a qualified
 * engineer to decide; the module's own certification governs.
 */
import type { Amps, Celsius, Ratio, Volts, Watts } from '../../units.ts';
import type { DesignFields, OperatingPoint, StageEvaluation, StageFlag, StageSpec } from '../types.ts';
import { ISOLATION_CLASSES, isolationRank, type IsolationClass } from '../../model.ts';
import { nearest } from '../../eseries.ts';
import { flag, part, r3, rippleFlags, thermalFlags } from '../common.ts';
import { specErrors } from '../buck/index.ts';
import { costNote, numParam, pickResistorPart, strParam, type LibraryRow, type PartPick, type PickOptions } from '../../library.ts';
import type { StagePartRef } from '../part-choice.ts';
import { singleCase, type OutputSpan, type ToleranceCase } from '../window-cases.ts';

/** A library row's numeric isolation (0–2, isolationRank in engine/model.ts) back to its class. */
const RANK_NAME = ISOLATION_CLASSES.slice(1) as readonly Exclude<IsolationClass, 'none'>[];

/** Invented generic modules (from memory, round numbers), used when no library is given. */
export const GENERIC_ISO_MODULES: LibraryRow[] = [
  { id: 'generic-iso-5v-5v-1w', partClass: 'iso-module', name: 'Isolated module 5 V to 5 V, 1 W (generic, invented)', cost: 1.2, params: { package: 'SIP-4', vinNom: 5, ratio: 1, pRated: 1, loadReg: 0.1, minLoad: 0.1, etaFull: 0.78, pNoLoad: 0.06, isolation: 0, workingVoltage: 60, thetaJA: 60, ripple: 0.05 } },
  { id: 'generic-iso-5v-12v-1w', partClass: 'iso-module', name: 'Isolated module 5 V to 12 V, 1 W (generic, invented)', cost: 1.3, params: { package: 'SIP-4', vinNom: 5, ratio: 2.4, pRated: 1, loadReg: 0.1, minLoad: 0.1, etaFull: 0.8, pNoLoad: 0.07, isolation: 0, workingVoltage: 60, thetaJA: 60, ripple: 0.08 } },
  { id: 'generic-iso-12v-5v-2w', partClass: 'iso-module', name: 'Isolated module 12 V to 5 V, 2 W (generic, invented)', cost: 1.8, params: { package: 'SIP-7', vinNom: 12, ratio: 5 / 12, pRated: 2, loadReg: 0.08, minLoad: 0.1, etaFull: 0.82, pNoLoad: 0.1, isolation: 1, workingVoltage: 250, thetaJA: 45, ripple: 0.05 } },
  { id: 'generic-iso-24v-15v-2w', partClass: 'iso-module', name: 'Isolated module 24 V to 15 V, 2 W (generic, invented)', cost: 2.1, params: { package: 'SIP-7', vinNom: 24, ratio: 15 / 24, pRated: 2, loadReg: 0.08, minLoad: 0.1, etaFull: 0.83, pNoLoad: 0.12, isolation: 2, workingVoltage: 250, thetaJA: 45, ripple: 0.1 } },
];

/** A module may run from its nominal input ± this share [common practice for fixed-ratio modules]. */
export const INPUT_RANGE_SHARE = 0.1;

/** The fields every IsoModule design carries (registry.ts `designFields`). */
export function isoModuleDesignFields(): DesignFields<IsoModuleDesign> {
  return { kind: true, vinMin: true, vinNom: true, vinMax: true, outputs: true, module: true, iRated: true, isolation: true, preload: true, tjMax: true };
}

export interface IsoModuleDesign {
  kind: 'iso-module';
  vinMin: Volts;
  vinNom: Volts;
  vinMax: Volts;
  outputs: StageSpec['outputs'];
  module: {
    vinNom: number;
    ratio: number;
    pRated: number;
    loadReg: number;
    minLoad: number;
    etaFull: number;
    pNoLoad: number;
    thetaJA: number;
    ripple: number;
    isolation: Exclude<IsolationClass, 'none'>;
    workingVoltage: number;
  };
  /** Rated output current (pRated over the full-load output at nominal input). */
  iRated: number;
  /** The barrier the stage must provide (from the spec). */
  isolation: { class: IsolationClass; workingVoltage: number } | null;
  /** Preload resistor holding the minimum load, or null. */
  preload: { resistance: number; current: number } | null;
  tjMax: Celsius;
  parts?: StagePartRef[];
}

function moduleOf(r: LibraryRow): IsoModuleDesign['module'] {
  return {
    vinNom: numParam(r, 'vinNom'), ratio: numParam(r, 'ratio'), pRated: numParam(r, 'pRated'), loadReg: numParam(r, 'loadReg'),
    minLoad: numParam(r, 'minLoad'), etaFull: numParam(r, 'etaFull'), pNoLoad: numParam(r, 'pNoLoad'), thetaJA: numParam(r, 'thetaJA'),
    ripple: numParam(r, 'ripple', 0.01 * numParam(r, 'ratio') * numParam(r, 'vinNom')),
    isolation: RANK_NAME[Math.max(0, Math.min(2, Math.round(numParam(r, 'isolation'))))]!, workingVoltage: numParam(r, 'workingVoltage'),
  };
}

/** Output voltage at an input and a total load current (load plus preload). */
export function isoOutput(m: IsoModuleDesign['module'], iRated: number, vin: number, iTotal: number): number {
  const x = Math.max(0, iTotal / iRated);
  return m.ratio * vin * (1 + (m.loadReg * (1 - Math.min(1, x))) / 0.9);
}

/** Module loss at a load share x: P0 + (Prated·(1/η − 1) − P0)·x². */
export function isoLoss(m: IsoModuleDesign['module'], x: number): number {
  return m.pNoLoad + (m.pRated * (1 / m.etaFull - 1) - m.pNoLoad) * x * x;
}

export function evaluateIsoModule(d: IsoModuleDesign, op: OperatingPoint): StageEvaluation {
  const vin = op.vin as number;
  const io = Math.max(0, Math.abs((op.iout[0] ?? 0) as number));
  const m = d.module;
  const ipre = d.preload ? d.preload.current : 0;
  // The preload is a resistor: its current follows the output voltage (fixed point).
  let vout = isoOutput(m, d.iRated, vin, io + ipre);
  let ip = ipre;
  for (let k = 0; k < 20 && d.preload; k++) {
    ip = vout / d.preload.resistance;
    vout = isoOutput(m, d.iRated, vin, io + ip);
  }
  const x = (io + ip) / d.iRated;
  const loss: Record<string, number> = { module: isoLoss(m, x), preload: vout * ip };
  const lossTotal = loss.module! + loss.preload!;
  const pout = vout * io;
  const pin = pout + lossTotal;
  const ta = op.ambient as number;
  const parts = [part('isolated module', loss.module!, m.thetaJA, ta, d.parts ? 'library' : 'default-from-memory')];
  const sign = (d.outputs[0]!.voltage as number) < 0 ? -1 : 1;
  const outputs = [{ nodeId: d.outputs[0]!.nodeId, voltage: (sign * vout) as Volts, current: io as Amps, ripplePP: m.ripple as Volts }];
  const flags: StageFlag[] = [];
  if (x > 1 + 1e-9) flags.push(flag('over-power', 'error', `load ${r3(vout * (io + ip))} W exceeds the module's ${r3(m.pRated)} W rating`, { power: r3(vout * (io + ip)), pRated: m.pRated }));
  if (x < m.minLoad - 1e-9) flags.push(flag('below-minimum-load', 'warning', `load ${r3(x * 100)} % of rated is below the module's ${r3(m.minLoad * 100)} % minimum: the output is not stated there (the line is extrapolated to ${r3(vout)} V)`, { loadShare: r3(x), minLoad: m.minLoad }));
  const lo = m.vinNom * (1 - INPUT_RANGE_SHARE), hi = m.vinNom * (1 + INPUT_RANGE_SHARE);
  if (vin < lo - 1e-9 || vin > hi + 1e-9) flags.push(flag('input-out-of-range', 'error', `Vin ${r3(vin)} V is outside the module's ${r3(lo)}…${r3(hi)} V input range`, { vin, min: r3(lo), max: r3(hi) }));
  flags.push(...thermalFlags(parts, d.tjMax), ...rippleFlags(outputs, d.outputs));
  return {
    kind: 'iso-module', vin: vin as Volts, iin: (pin / vin) as Amps, pin: pin as Watts, pout: pout as Watts, loss: lossTotal as Watts,
    efficiency: (pin > 0 ? pout / pin : 0) as Ratio, lossBreakdown: loss as Record<string, Watts>, parts, outputs, flags,
  };
}

type Result = { ok: true; design: IsoModuleDesign; reasons: string[]; flags: StageFlag[] } | { ok: false; flags: StageFlag[] };

export function designIsoModule(spec: StageSpec): Result {
  const bad = specErrors({ ...spec, fsw: 1 } as StageSpec);
  if (bad.length) return { ok: false, flags: bad };
  if (spec.outputs.length !== 1) return { ok: false, flags: [flag('bad-input', 'error', `an isolated module here has exactly one output (got ${spec.outputs.length})`, { field: 'outputs' })] };
  if (!(spec.vinMin > 0)) return { ok: false, flags: [flag('bad-input', 'error', `vinMin: a module needs a positive input (got ${spec.vinMin})`, { field: 'vinMin' })] };
  const o = spec.outputs[0]!;
  const v = Math.abs(o.voltage as number);
  const band = { lo: v * (1 - o.tolerance), hi: v * (1 + o.tolerance) };
  const iso = spec.isolation ?? null;
  const needRank = isolationRank(iso?.class);
  const needWv = iso && iso.class !== 'none' ? (iso.workingVoltage as number) : 0;
  const rows = (spec.library ? spec.library.filter((r) => r.partClass === 'iso-module') : GENERIC_ISO_MODULES)
    .slice().sort((a, b) => a.cost - b.cost || (a.id < b.id ? -1 : 1));
  const misses: string[] = [];
  for (const r of rows) {
    const m = moduleOf(r);
    const iRated = m.pRated / (m.ratio * m.vinNom);
    const lo = m.vinNom * (1 - INPUT_RANGE_SHARE), hi = m.vinNom * (1 + INPUT_RANGE_SHARE);
    if (spec.vinMin < lo - 1e-9 || spec.vinMax > hi + 1e-9) { misses.push(`${r.id}: input ${r3(lo)}…${r3(hi)} V`); continue; }
    if ((o.currentMax as number) > iRated + 1e-12) { misses.push(`${r.id}: ${r3(iRated * 1e3)} mA rated`); continue; }
    if (isolationRank(m.isolation) < needRank || m.workingVoltage < needWv) { misses.push(`${r.id}: ${m.isolation} ${m.workingVoltage} V barrier`); continue; }
    // Minimum load: a preload resistor (E24, the next value down) makes up the difference.
    const need = m.minLoad * iRated - (o.currentMin as number);
    let preload: IsoModuleDesign['preload'] = null;
    if (need > 1e-12) {
      const vFull = isoOutput(m, iRated, spec.vinNom, m.minLoad * iRated);
      let res = nearest('E24', vFull / need);
      if (vFull / res < need) res = nearest('E24', res * 0.9);
      preload = { resistance: res, current: vFull / res };
    }
    const design: IsoModuleDesign = {
      kind: 'iso-module', vinMin: spec.vinMin, vinNom: spec.vinNom, vinMax: spec.vinMax, outputs: [{ ...o }], module: m, iRated,
      isolation: iso ? { class: iso.class, workingVoltage: iso.workingVoltage as number } : null, preload, tjMax: spec.tjMax,
      ...(spec.library ? { parts: [{ role: 'isolated module', libraryId: r.id, used: { ...m, isolation: isolationRank(m.isolation) } as unknown as Record<string, number>, generic: [] }] } : {}),
    };
    // Window over Vin min/max × load min/max (unregulated: the input's spread passes through).
    const w = isoWindow(design, [spec.vinMin, spec.vinMax], o.currentMin as number, o.currentMax as number);
    if (w.lo < band.lo - 1e-12 || w.hi > band.hi + 1e-12) { misses.push(`${r.id}: output ${r3(w.lo)}…${r3(w.hi)} V`); continue; }
    const reasons = [
      `${r.name}: ratio ${r3(m.ratio)} at full load, ${r3(m.pRated)} W (${r3(iRated * 1e3)} mA), ${m.isolation} isolation for ${r3(m.workingVoltage)} V working${iso && iso.class !== 'none' ? ` (the domain needs ${iso.class}, ${r3(needWv)} V)` : ''}`,
      `unregulated: output ${r3(w.lo)}…${r3(w.hi)} V over Vin ${r3(spec.vinMin)}…${r3(spec.vinMax)} V and ${r3((o.currentMin as number) * 1e3)}…${r3((o.currentMax as number) * 1e3)} mA (load regulation +${r3(m.loadReg * 100)} % from full to 10 % load), inside ${r3(band.lo)}…${r3(band.hi)} V`,
      preload ? `minimum load ${r3(m.minLoad * 100)} % (${r3(m.minLoad * iRated * 1e3)} mA): preload ${preload.resistance} Ω (E24) draws ${r3(preload.current * 1e3)} mA` : `minimum load ${r3(m.minLoad * 100)} % met by the load itself`,
      `efficiency ${r3(m.etaFull * 100)} % at full load, falling towards light load (no-load loss ${r3(m.pNoLoad * 1e3)} mW)`,
      'caution: the barrier rating is the module maker\'s; the applicable safety standard and a qualified engineer decide whether it suffices',
    ];
    const ev = evaluateIsoModule(design, { vin: spec.vinMin, iout: [o.currentMax], ambient: spec.ambient });
    const errs = ev.flags.filter((f) => f.severity === 'error');
    if (errs.length) { misses.push(`${r.id}: ${errs[0]!.text}`); continue; }
    return { ok: true, design, reasons, flags: [] };
  }
  return { ok: false, flags: [flag('no-module', 'error', `no isolated module${spec.library ? ' in the library' : ''} fits ${r3(v)} V ±${r3(o.tolerance * 100)} % at ${r3((o.currentMax as number) * 1e3)} mA from ${r3(spec.vinMin)}…${r3(spec.vinMax)} V${needRank >= 0 ? ` with ${iso!.class} isolation for ${r3(needWv)} V` : ''}${misses.length ? ` (${misses.slice(0, 4).join('; ')})` : ''}`, { vinMin: spec.vinMin, vinMax: spec.vinMax, current: o.currentMax as number })] };
}

function isoWindow(d: IsoModuleDesign, vins: number[], imin: number, imax: number): { lo: number; hi: number } {
  let lo = Infinity, hi = -Infinity;
  for (const vin of vins) for (const i of [imin, imax]) {
    const w = isoModuleWindowAt(d, vin, i);
    lo = Math.min(lo, w.lo); hi = Math.max(hi, w.hi);
  }
  return { lo, hi };
}

/** One window corner, as magnitudes: DC ∓ half the module's ripple. */
export function isoModuleWindowAt(d: IsoModuleDesign, vin: number, io: number): { lo: number; hi: number } {
  const ev = evaluateIsoModule(d, { vin: vin as Volts, iout: [io as Amps], ambient: 25 as Celsius });
  const v = Math.abs(ev.outputs[0]!.voltage as number);
  return { lo: v - d.module.ripple / 2, hi: v + d.module.ripple / 2 };
}

/** The output at one window corner (windows.ts), a magnitude: unregulated, the input's spread and the load-regulation line set it. */
export function isoModuleWindowOutputs(d: IsoModuleDesign, vin: number, iout: number[]): OutputSpan[] {
  return [isoModuleWindowAt(d, vin, iout[0] ?? 0)];
}

/** One tolerance case: the fixed ratio and the load-regulation line (no setpoint). */
export function isoModuleWindowCases(): ToleranceCase[] {
  return singleCase('ratio and load-regulation line');
}

/** BOM parts (library.ts `partsForStage` shape): the module row and the preload resistor. */
export function isoModuleParts(stageId: string, d: IsoModuleDesign, library: LibraryRow[], opts: Partial<PickOptions> = {}): PartPick[] {
  const ref = d.parts?.find((p) => p.role === 'isolated module');
  const row = ref ? library.find((r) => r.id === ref.libraryId) : library.filter((r) => r.partClass === 'iso-module')
    .find((r) => Math.abs(numParam(r, 'ratio') - d.module.ratio) < 1e-9 && numParam(r, 'vinNom') === d.module.vinNom && numParam(r, 'pRated') >= d.module.pRated && numParam(r, 'isolation') >= isolationRank(d.module.isolation) && numParam(r, 'workingVoltage') >= d.module.workingVoltage);
  const rating = `${r3(d.module.pRated)} W, ${d.module.isolation} ${r3(d.module.workingVoltage)} V`;
  const picks: PartPick[] = [row
    ? { stageId, role: 'isolated module', prefix: 'U', partClass: 'iso-module', libraryId: row.id, description: row.name, value: `${r3(d.module.vinNom)} V → ${r3(d.module.vinNom * d.module.ratio)} V`, rating, package: strParam(row, 'package'), quantity: 1, unitCost: row.cost, costNote: costNote(row), manufacturer: strParam(row, 'manufacturer'), partNumber: strParam(row, 'partNumber') }
    : { stageId, role: 'isolated module', prefix: 'U', partClass: 'iso-module', libraryId: null, description: 'isolated module (no library part)', value: '', rating, package: '', quantity: 1, unitCost: 0, costNote: '', problem: `no isolated module in the library matches ratio ${r3(d.module.ratio)} from ${r3(d.module.vinNom)} V with ${rating}` }];
  if (d.preload) {
    const v = Math.abs(d.outputs[0]!.voltage as number) * 1.1;
    picks.push(pickResistorPart(library, stageId, 'preload (minimum load)', d.preload.resistance, (v * v) / d.preload.resistance, opts));
  }
  return picks;
}
