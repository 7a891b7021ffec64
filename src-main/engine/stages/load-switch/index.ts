/**
 * Load switch: the stage kind `load-switch`. A switch that passes its input rail to a gated
 * rail: Vout = Vin − I·Ron(Tj), loss P = I²·Ron(Tj) + Vin·Iq, with
 * Ron(Tj) = Ron(25 °C)·(1 + α·(Tj − 25 °C)) and Tj = Ta + P·θJA solved together (α ≈ 0.4 %/K
 * for a MOSFET channel, from memory). Turn-on is slew-controlled: the load capacitance draws
 * the inrush I = Cload·dV/dt (the capacitor equation), so the designer chooses the slew rate
 * that keeps the inrush below its limit. Per-mode on/off: in the modes where its rail is
 * gated off the switch passes nothing and draws only its off-state current.
 */
import type { Amps, Celsius, Ratio, Volts, Watts } from '../../units.ts';
import type { DesignFields, OperatingPoint, StageEvaluation, StageFlag, StageSpec } from '../types.ts';
import { flag, part, r3, thermalFlags } from '../common.ts';
import { specErrors } from '../buck/index.ts';
import { cheapest, costNote, numParam, strParam, type LibraryRow, type PartPick } from '../../library.ts';
import type { StagePartRef } from '../part-choice.ts';
import { singleCase, type OutputSpan, type ToleranceCase } from '../window-cases.ts';

/** Generic load switches, from memory: Ron at 25 °C (Ω) with their current ratings (A). */
export const GENERIC_LOAD_SWITCHES = [
  { ron: 0.2, iMax: 0.5 },
  { ron: 0.08, iMax: 1 },
  { ron: 0.04, iMax: 2 },
  { ron: 0.02, iMax: 4 },
  { ron: 0.01, iMax: 6 },
] as const;
export const LOAD_SWITCH_DEFAULTS = {
  /** Ron temperature coefficient (1/K), from memory. */
  ronTempCoeff: 0.004,
  thetaJA: 150,
  iq: 1e-6,
  /** Off-state current drawn from the input (A), from memory. */
  iOff: 1e-7,
  vinMax: 5.5,
  /** Share of the output's tolerance the switch's drop may take. */
  dropShare: 0.3,
  /** Slew rates offered (V/s): rise times from ~0.1 ms to ~10 ms at a few volts. */
  slewRates: [1e5, 3e4, 1e4, 3e3, 1e3, 300],
} as const;

/** The fields every LoadSwitch design carries (registry.ts `designFields`). */
export function loadSwitchDesignFields(): DesignFields<LoadSwitchDesign> {
  return { kind: true, vinMin: true, vinNom: true, vinMax: true, outputs: true, ron: true, ronTempCoeff: true, iMax: true, ratedVoltage: true, iq: true, iOff: true, thetaJA: true, tjMax: true, slewRate: true, riseTime: true, cload: true, inrush: true, inrushLimit: true, offModes: true };
}

export interface LoadSwitchDesign {
  kind: 'load-switch';
  vinMin: Volts;
  vinNom: Volts;
  vinMax: Volts;
  /** One output: the gated rail (its voltage is the input's, less the drop). */
  outputs: StageSpec['outputs'];
  ron: number;
  ronTempCoeff: number;
  iMax: number;
  /** The switch's input rating (V). */
  ratedVoltage: number;
  iq: number;
  iOff: number;
  thetaJA: number;
  tjMax: Celsius;
  /** Output slew rate at turn-on (V/s) and the rise time from 0 to Vin max. */
  slewRate: number;
  riseTime: number;
  /** Load capacitance on the gated rail, the inrush it draws at the slew rate and its limit. */
  cload: number;
  inrush: number;
  inrushLimit: number;
  /** Operating-mode ids in which the gated rail is off. */
  offModes: string[];
  parts?: StagePartRef[];
}

/** Ron(Tj) and Tj together: Tj = Ta + (I²·Ron(Tj) + Vin·Iq)·θJA (closed form, linear in Tj). */
export function loadSwitchThermal(d: LoadSwitchDesign, vin: number, io: number, ta: number): { tj: number; ronHot: number; runaway: boolean } {
  const a = io * io * d.ron * d.thetaJA;
  // Tj = Ta + θ·(I²·Ron25·(1 + α(Tj − 25)) + Vin·Iq)  →  Tj·(1 − a·α) = Ta + a·(1 − 25α) + θ·Vin·Iq
  const den = 1 - a * d.ronTempCoeff;
  if (!(den > 0.05)) return { tj: Infinity, ronHot: Infinity, runaway: true };
  const tj = (ta + a * (1 - 25 * d.ronTempCoeff) + d.thetaJA * vin * d.iq) / den;
  return { tj, ronHot: d.ron * (1 + d.ronTempCoeff * (tj - 25)), runaway: false };
}

export function evaluateLoadSwitch(d: LoadSwitchDesign, op: OperatingPoint): StageEvaluation {
  const vin = op.vin as number;
  const ta = op.ambient as number;
  const o = d.outputs[0]!;
  const off = op.mode !== undefined && d.offModes.includes(op.mode);
  const io = off ? 0 : Math.max(0, Math.abs((op.iout[0] ?? 0) as number));
  const flags: StageFlag[] = [];
  if (off) {
    const pin = vin * d.iOff;
    return {
      kind: 'load-switch', vin: vin as Volts, iin: d.iOff as Amps, pin: pin as Watts, pout: 0 as Watts, loss: pin as Watts,
      efficiency: 0 as Ratio, lossBreakdown: { conduction: 0 as Watts, quiescent: 0 as Watts, 'off-state': pin as Watts },
      parts: [part('load switch', pin, d.thetaJA, ta)],
      outputs: [{ nodeId: o.nodeId, voltage: 0 as Volts, current: 0 as Amps, ripplePP: 0 as Volts }],
      flags: [flag('gated-off', 'warning', `mode ${op.mode}: the rail is switched off; the switch draws ${r3(d.iOff * 1e6)} µA from the input`, { mode: op.mode!, iOff: d.iOff })].filter(() => (op.iout[0] as number) > 0),
    };
  }
  const th = loadSwitchThermal(d, vin, io, ta);
  const ron = th.runaway ? d.ron * 10 : th.ronHot;
  const vout = vin - io * ron;
  const loss: Record<string, number> = { conduction: io * io * ron, quiescent: vin * d.iq, 'off-state': 0 };
  const lossTotal = loss.conduction! + loss.quiescent!;
  const pout = vout * io;
  const pin = pout + lossTotal;
  const parts = [part('load switch', lossTotal, d.thetaJA, ta)];
  if (th.runaway) {
    flags.push(flag('thermal-runaway', 'error', `${r3(io)} A through ${r3(d.ron * 1e3)} mΩ with θJA ${d.thetaJA} K/W has no thermal equilibrium (Ron rises faster than the heat leaves)`, { current: io, ron: d.ron, thetaJA: d.thetaJA }));
  } else {
    parts[0]!.tj = th.tj as Celsius;
    flags.push(...thermalFlags(parts, d.tjMax));
  }
  if (io > d.iMax) flags.push(flag('over-current', 'error', `${r3(io)} A exceeds the switch's ${r3(d.iMax)} A rating`, { current: io, iMax: d.iMax }));
  if (Math.abs(vin) > d.ratedVoltage) {
    flags.push(flag('over-voltage', 'error', `Vin ${r3(vin)} V exceeds the switch's ${r3(d.ratedVoltage)} V rating`, { vin, rating: d.ratedVoltage }));
  }
  return {
    kind: 'load-switch', vin: vin as Volts, iin: (pin / vin) as Amps, pin: pin as Watts, pout: pout as Watts, loss: lossTotal as Watts,
    efficiency: (pin > 0 ? pout / pin : 0) as Ratio,
    lossBreakdown: loss as Record<string, Watts>,
    parts,
    outputs: [{ nodeId: o.nodeId, voltage: vout as Volts, current: io as Amps, ripplePP: 0 as Volts }],
    flags,
  };
}

type Result = { ok: true; design: LoadSwitchDesign; reasons: string[]; flags: StageFlag[] } | { ok: false; flags: StageFlag[] };

export function designLoadSwitch(spec: StageSpec): Result {
  const bad = specErrors({ ...spec, fsw: 1 } as StageSpec);
  if (bad.length) return { ok: false, flags: bad };
  if (spec.outputs.length !== 1) return { ok: false, flags: [flag('bad-input', 'error', `a load switch has exactly one output (got ${spec.outputs.length})`, { field: 'outputs' })] };
  if (!(spec.vinMin > 0)) return { ok: false, flags: [flag('bad-input', 'error', `vinMin: a load switch here passes a positive rail (got ${spec.vinMin})`, { field: 'vinMin' })] };
  const o = spec.outputs[0]!;
  const v = o.voltage as number;
  const ls = spec.loadSwitch ?? {};
  const cload = ls.cload ?? 10e-6;
  const offModes = [...(ls.offModes ?? [])];
  for (const [k, m] of offModes.entries()) {
    if (typeof m !== 'string' || m === '') return { ok: false, flags: [flag('bad-input', 'error', `loadSwitch.offModes[${k}]: a mode id is required`, { field: `loadSwitch.offModes[${k}]` })] };
  }
  if (!(Number.isFinite(cload) && cload >= 0)) return { ok: false, flags: [flag('bad-input', 'error', `loadSwitch.cload: a capacitance ≥ 0 is required (got ${cload})`, { field: 'loadSwitch.cload' })] };
  // The gated rail is the input rail: the input range must sit inside the rail's band.
  const lo = v * (1 - o.tolerance), hi = v * (1 + o.tolerance);
  if (spec.vinMax > hi + 1e-12 || spec.vinMin < lo - 1e-12) {
    return { ok: false, flags: [flag('input-outside-band', 'error', `a load switch passes its input: ${r3(spec.vinMin)}…${r3(spec.vinMax)} V is not inside the rail's ${r3(lo)}…${r3(hi)} V band`, { vinMin: spec.vinMin, vinMax: spec.vinMax, bandLow: r3(lo), bandHigh: r3(hi) })] };
  }
  const imax = o.currentMax as number;
  const reasons: string[] = [];
  // Drop budget: the room below the band at Vin min, at most dropShare of the tolerance.
  const dropBudget = Math.min(spec.vinMin - lo, LOAD_SWITCH_DEFAULTS.dropShare * o.tolerance * v);
  const inrushLimit = ls.inrushLimit ?? Math.max(imax, 0.1);
  const base = {
    kind: 'load-switch' as const, vinMin: spec.vinMin, vinNom: spec.vinNom, vinMax: spec.vinMax, outputs: [{ ...o }],
    ronTempCoeff: LOAD_SWITCH_DEFAULTS.ronTempCoeff, iq: LOAD_SWITCH_DEFAULTS.iq, iOff: LOAD_SWITCH_DEFAULTS.iOff, tjMax: spec.tjMax, cload, inrushLimit, offModes,
  };
  type Cand = { ron: number; iMax: number; thetaJA: number; vinMax: number; iq: number; row?: LibraryRow };
  const cands: Cand[] = spec.library
    ? spec.library.filter((r) => r.partClass === 'load-switch').sort((a, b) => a.cost - b.cost || (a.id < b.id ? -1 : 1))
      .map((r) => ({ ron: numParam(r, 'ron'), iMax: numParam(r, 'iMax'), thetaJA: numParam(r, 'thetaJA'), vinMax: numParam(r, 'vinMax'), iq: numParam(r, 'iq', LOAD_SWITCH_DEFAULTS.iq), row: r }))
    : GENERIC_LOAD_SWITCHES.map((g) => ({ ...g, thetaJA: LOAD_SWITCH_DEFAULTS.thetaJA, vinMax: LOAD_SWITCH_DEFAULTS.vinMax, iq: LOAD_SWITCH_DEFAULTS.iq }));
  let chosen: LoadSwitchDesign | null = null;
  let why = '';
  for (const c of cands) {
    if (c.iMax < imax || c.vinMax < spec.vinMax) continue;
    const trial: LoadSwitchDesign = { ...base, ron: c.ron, iMax: c.iMax, ratedVoltage: c.vinMax, iq: c.iq, thetaJA: c.thetaJA, slewRate: 0, riseTime: 0, inrush: 0 };
    const th = loadSwitchThermal(trial, spec.vinMin, imax, spec.ambient as number);
    if (th.runaway || th.tj > spec.tjMax) { why = `Ron ${r3(c.ron * 1e3)} mΩ runs to ${th.runaway ? 'thermal runaway' : `${r3(th.tj)} °C`}`; continue; }
    const drop = imax * th.ronHot;
    if (drop > dropBudget) { why = `Ron ${r3(c.ron * 1e3)} mΩ drops ${r3(drop * 1e3)} mV at ${r3(imax)} A, over the ${r3(dropBudget * 1e3)} mV budget`; continue; }
    chosen = trial;
    if (c.row) chosen.parts = [{ role: 'load switch', libraryId: c.row.id, used: { ron: c.ron, iMax: c.iMax, thetaJA: c.thetaJA, vinMax: c.vinMax, iq: c.iq }, generic: ['ronTempCoeff'] }];
    reasons.push(`Ron ${r3(c.ron * 1e3)} mΩ at 25 °C (${r3(th.ronHot * 1e3)} mΩ hot, Tj ${r3(th.tj)} °C at ${r3(imax)} A, Vin ${r3(spec.vinMin)} V): drop ${r3(drop * 1e3)} mV within the ${r3(dropBudget * 1e3)} mV budget${c.row ? ` (${c.row.name})` : ' (generic, from memory)'}`);
    break;
  }
  if (!chosen) {
    return { ok: false, flags: [flag('no-switch', 'error', `no ${spec.library ? 'library ' : ''}load switch carries ${r3(imax)} A from ${r3(spec.vinMax)} V within the ${r3(dropBudget * 1e3)} mV drop budget${why ? `: last tried ${why}` : ''}`, { current: imax, vinMax: spec.vinMax, dropBudget: r3(dropBudget) })] };
  }
  // Slew: the fastest offered rate whose inrush Cload·dV/dt stays within the limit.
  const slew = LOAD_SWITCH_DEFAULTS.slewRates.find((s) => cload * s <= inrushLimit) ?? LOAD_SWITCH_DEFAULTS.slewRates[LOAD_SWITCH_DEFAULTS.slewRates.length - 1]!;
  chosen.slewRate = ls.slewRate ?? slew;
  chosen.inrush = cload * chosen.slewRate;
  chosen.riseTime = spec.vinMax / chosen.slewRate;
  reasons.push(`slew ${r3(chosen.slewRate / 1e3)} V/ms: inrush Cload·dV/dt = ${r3(cload * 1e6)} µF × ${r3(chosen.slewRate / 1e3)} V/ms = ${r3(chosen.inrush * 1e3)} mA (limit ${r3(inrushLimit * 1e3)} mA), rise time ${r3(chosen.riseTime * 1e3)} ms`);
  reasons.push(offModes.length ? `off in mode${offModes.length > 1 ? 's' : ''} ${offModes.join(', ')}: the gated rail draws nothing there (the switch ${r3(LOAD_SWITCH_DEFAULTS.iOff * 1e6)} µA off-state)` : 'on in every mode');
  const flags: StageFlag[] = [];
  if (chosen.inrush > inrushLimit) {
    flags.push(flag('inrush-over-limit', 'error', `inrush ${r3(chosen.inrush * 1e3)} mA (Cload ${r3(cload * 1e6)} µF × ${r3(chosen.slewRate / 1e3)} V/ms) exceeds the ${r3(inrushLimit * 1e3)} mA limit`, { inrush: r3(chosen.inrush), limit: inrushLimit }));
    return { ok: false, flags };
  }
  return { ok: true, design: chosen, reasons, flags };
}

/** Output at one window corner: the input less the hot drop (no ripple of its own). */
export function loadSwitchWindowAt(d: LoadSwitchDesign, vin: number, io: number, ambient = 25): { lo: number; hi: number } {
  const v = (evaluateLoadSwitch(d, { vin: vin as Volts, iout: [io as Amps], ambient: ambient as Celsius }).outputs[0]!.voltage as number);
  return { lo: v, hi: v };
}

/**
 * The output at one window corner (windows.ts): the input less the hot drop. It has no
 * reference or divider of its own, so the draw does not move it.
 */
export function loadSwitchWindowOutputs(d: LoadSwitchDesign, vin: number, iout: number[]): OutputSpan[] {
  return [loadSwitchWindowAt(d, vin, iout[0] ?? 0)];
}

/** One tolerance case: no setpoint of its own, its output is the input less the drop. */
export function loadSwitchWindowCases(): ToleranceCase[] {
  return singleCase('input less the hot switch drop');
}

/** BOM parts (library.ts `partsForStage` shape): the switch row, or the cheapest that fits. */
export function loadSwitchParts(stageId: string, d: LoadSwitchDesign, library: LibraryRow[]): PartPick[] {
  const o = d.outputs[0]!;
  const ref = d.parts?.find((p) => p.role === 'load switch');
  const row = (ref ? library.find((r) => r.id === ref.libraryId) : undefined)
    ?? cheapest(library, 'load-switch', (r) => numParam(r, 'iMax') >= (o.currentMax as number) && numParam(r, 'vinMax') >= d.vinMax && numParam(r, 'ron') <= d.ron * (1 + 1e-9));
  const rating = `${r3(o.currentMax as number)} A, ${r3(d.vinMax)} V, Ron ≤ ${r3(d.ron * 1e3)} mΩ`;
  if (!row) {
    return [{ stageId, role: 'load switch', prefix: 'U', partClass: 'load-switch', libraryId: null, description: 'load switch (no library part)', value: '', rating, package: '', quantity: 1, unitCost: 0, costNote: '', problem: `no load switch in the library carries ${r3(o.currentMax as number)} A at ${r3(d.vinMax)} V with Ron ≤ ${r3(d.ron * 1e3)} mΩ` }];
  }
  return [{
    stageId, role: 'load switch', prefix: 'U', partClass: 'load-switch', libraryId: row.id, description: row.name, value: '', rating,
    package: strParam(row, 'package'), quantity: 1, unitCost: row.cost, costNote: costNote(row),
    manufacturer: strParam(row, 'manufacturer'), partNumber: strParam(row, 'partNumber'),
  }];
}
