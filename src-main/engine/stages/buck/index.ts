/**
 * Synchronous buck in continuous conduction (forced PWM).
 * Equations: Erickson & Maksimović, *Fundamentals of Power Electronics* (duty from
 * volt-second balance, inductor ripple, capacitor ripple, input-capacitor RMS); loss terms
 * are common practice (DESIGN.md §4), each reported separately.
 */
import type { Amps, Celsius, Henries, Hertz, Ohms, Ratio, Volts, Watts } from '../../units.ts';
import type { DesignFields, OperatingPoint, OutputSpec, OutputWindow, StageEvaluation, StageFlag, StageSpec } from '../types.ts';
import { bestDivider, nearest, type DividerChoice } from '../../eseries.ts';
import { GENERIC_DEFAULTS, diodeVf, type ControllerParams, type DiodeModel, type SwitchParams } from '../defaults.ts';
import { chooseCeramic, flag, part, r3, rippleFlags, thermalFlags, type CapacitorChoice } from '../common.ts';
import { chooseCeramicRow, chooseInductor, chooseLibraryInductance, chooseSwitcher, cheapestResistorOfGrade, vrefToleranceOf, type StagePartRef } from '../part-choice.ts';
import type { LibraryRow } from '../../library.ts';
// windows.ts imports this module too; each side uses the other only inside functions.
import { stageWindows } from '../windows.ts';
import { boundingCases, setpoint, type OutputSpan, type ToleranceCase, type ToleranceDraw } from '../window-cases.ts';

export interface ThermalParams {
  highSide: number;
  lowSide: number;
  controller: number;
  inductor: number;
}

/**
 * What every synchronous switching stage's design holds, the plain buck and the
 * coupled-winding buck alike: input range, switching frequency, the magnetic's inductance
 * and saturation current, capacitors, the feedback divider, the switch pair and controller.
 */
export interface SwitchingDesignBase {
  vinMin: Volts;
  vinNom: Volts;
  vinMax: Volts;
  outputs: OutputSpec[];
  fsw: Hertz;
  /** Inductance (for a coupled-winding stage: the magnetizing inductance of the primary). */
  inductance: Henries;
  /** Required saturation current (peak at Vin max, full load, with margin). */
  isat: Amps;
  /** κ of the labelled core-loss model P = κ·½·L·ΔI²·fsw. */
  coreLossFraction: number;
  cout: CapacitorChoice;
  cin: CapacitorChoice;
  divider: DividerChoice;
  highSide: SwitchParams;
  lowSide: SwitchParams;
  /** Hot/cold Rds(on) ratio used for conduction losses. */
  rdsHotFactor: number;
  bodyDiode: DiodeModel;
  controller: ControllerParams;
  thetaJA: ThermalParams;
  tjMax: Celsius;
  /**
   * True when controller and switches are one package (an integrated regulator): they then
   * share one junction temperature, from the sum of their losses.
   */
  integrated?: boolean;
  /** The library rows the design was built from (absent: generic defaults from memory). */
  parts?: StagePartRef[];
}

/** Where a design's thermal resistances came from. */
export function thetaSourceOf(d: { parts?: StagePartRef[] }): 'library' | 'default-from-memory' {
  return d.parts && d.parts.length > 0 ? 'library' : 'default-from-memory';
}

/**
 * The dissipating parts of the switch pair and controller: one package with one Tj when the
 * switches are integrated, three otherwise.
 */
export function switchingParts(d: SwitchingDesignBase, hs: number, ls: number, ctl: number, ta: number) {
  const src = thetaSourceOf(d);
  if (d.integrated) return [part('regulator (integrated switches)', hs + ls + ctl, d.thetaJA.controller, ta, src)];
  return [
    part('high-side switch', hs, d.thetaJA.highSide, ta, src),
    part('low-side switch', ls, d.thetaJA.lowSide, ta, src),
    part('controller', ctl, d.thetaJA.controller, ta, src),
  ];
}

/** The fields every switching design carries (each switching kind's design fields add its own). */
export function switchingDesignFields() {
  return { vinMin: true, vinNom: true, vinMax: true, outputs: true, fsw: true, inductance: true, isat: true, coreLossFraction: true, cout: true, cin: true, divider: true, highSide: true, lowSide: true, rdsHotFactor: true, bodyDiode: true, controller: true, thetaJA: true, tjMax: true } as const;
}

/** The fields every buck design carries (registry.ts `designFields`). */
export function buckDesignFields(): DesignFields<BuckDesign> {
  return { ...switchingDesignFields(), kind: true, dcr: true };
}

export interface BuckDesign extends SwitchingDesignBase {
  kind: 'buck';
  /** One output (index 0). */
  outputs: OutputSpec[];
  /** Inductor winding resistance. */
  dcr: Ohms;
}

/** Internal numbers of one buck operating point, shared with the netlist writer. */
export interface BuckPoint {
  vout: number;
  io: number;
  duty: number;
  /** Share of the period taken by the two dead times. */
  deadShare: number;
  rhs: number;
  rls: number;
  ripple: number;
  ipk: number;
  ivalley: number;
  irms: number;
}

export function buckPoint(d: BuckDesign, vin: number, io: number, vout = d.divider.vout): BuckPoint {
  const rhs = d.highSide.rdsOn * d.rdsHotFactor;
  const rls = d.lowSide.rdsOn * d.rdsHotFactor;
  const deadShare = 2 * d.controller.deadTime * d.fsw;
  const vfb = diodeVf(d.bodyDiode, Math.abs(io));
  // Volt-second balance on L with the switch, dead-time and winding drops (averaged model):
  // D·(Vin − Io·Rhs) − (1 − D − δ)·Io·Rls + (δ/2)·v2 − (δ/2)·Vf = Vout + Io·DCR,
  // where the dead time before the high side turns on holds the switch node at −Vf while the
  // valley current is positive and at Vin + Vf when it is negative (forced PWM, light load;
  // checked in ngspice).
  let duty = (vout + io * d.dcr + (1 - deadShare) * io * rls + deadShare * vfb) / (vin - io * rhs + io * rls);
  let ripple = 0;
  for (let k = 0; k < 3; k++) {
    // ΔIL = (Vin − Vout)·D/(L·fsw)  [Erickson & Maksimović, ch. 2]
    ripple = ((vin - vout) * duty) / (d.inductance * d.fsw);
    const valley = io - ripple / 2;
    const v2 = valley < 0 ? vin + diodeVf(d.bodyDiode, -valley) : -diodeVf(d.bodyDiode, valley);
    const v1 = -diodeVf(d.bodyDiode, io + ripple / 2);
    duty = (vout + io * d.dcr + (1 - deadShare) * io * rls - (deadShare / 2) * (v1 + v2)) / (vin - io * rhs + io * rls);
  }
  ripple = ((vin - vout) * duty) / (d.inductance * d.fsw);
  const irms = Math.sqrt(io * io + (ripple * ripple) / 12);
  return { vout, io, duty, deadShare, rhs, rls, ripple, ipk: io + ripple / 2, ivalley: io - ripple / 2, irms };
}

/** The operating point at a given duty (output below its setpoint). */
export function buckAtDuty(d: BuckDesign, vin: number, io: number, duty: number): BuckPoint {
  // Bisection on the output: buckPoint's duty rises with the output voltage.
  let lo = 0;
  let hi = vin;
  for (let k = 0; k < 60 && hi - lo > 1e-9 * vin; k++) {
    const mid = (lo + hi) / 2;
    if (buckPoint(d, vin, io, mid).duty > duty) hi = mid;
    else lo = mid;
  }
  return buckPoint(d, vin, io, lo);
}

/**
 * The output at one window corner (windows.ts): the setpoint from the reference and divider
 * under the draw; out of regulation (the duty limit) the output follows the maximum duty.
 */
export function buckWindowOutputs(d: BuckDesign, vin: number, iout: number[], x: ToleranceDraw): OutputSpan[] {
  const sp = setpoint(d.divider, d.controller.vrefTolerance, x);
  const io = iout[0] ?? 0;
  const ev = evaluateBuck(d, { vin: vin as Volts, iout: [io as Amps], ambient: 25 as Celsius });
  let v = sp;
  if (buckPoint(d, vin, io, sp).duty > d.controller.maxDuty) {
    // Out of regulation: the output follows the maximum duty.
    v = buckAtDuty(d, vin, io, d.controller.maxDuty).vout;
  }
  const rp = ev.outputs[0]!.ripplePP as number;
  return [{ lo: v - rp / 2, hi: v + rp / 2 }];
}

/** The tolerance cases of a stage regulated by a reference and a divider (buck, boost, …). */
export function dividerWindowCases(): ToleranceCase[] {
  return boundingCases('reference and divider');
}

export function evaluateBuck(d: BuckDesign, op: OperatingPoint): StageEvaluation {
  const vin = op.vin as number;
  const io = Math.max(0, (op.iout[0] ?? 0) as number);
  const wanted = buckPoint(d, vin, io);
  // Out of duty: the output settles where the maximum duty puts it (same volt-second balance).
  const p = wanted.duty > d.controller.maxDuty ? buckAtDuty(d, vin, io, d.controller.maxDuty) : wanted;
  const { duty, deadShare, rhs, rls, ripple, irms } = p;
  const vfb = diodeVf(d.bodyDiode, Math.max(Math.abs(p.ipk), Math.abs(p.ivalley)));
  const fsw = d.fsw as number;
  const td = d.controller.deadTime;
  const icinRms = io * Math.sqrt(Math.max(0, duty * (1 - duty)));
  const loss: Record<string, number> = {
    'hs-conduction': irms * irms * rhs * duty,
    'ls-conduction': irms * irms * rls * Math.max(0, 1 - duty - deadShare),
    // ½·Vin·Io·(tr+tf)·fsw  [common practice]
    'hs-switching': 0.5 * vin * io * (d.highSide.tr + d.highSide.tf) * fsw,
    'output-capacitance': 0.5 * (d.highSide.coss + d.lowSide.coss) * vin * vin * fsw,
    'dead-time': vfb * (Math.abs(p.ipk) + Math.abs(p.ivalley)) * td * fsw,
    // The low side's body diode still conducts the valley current when the high side turns
    // on; its stored charge is swept out from Vin: Qrr·Vin·fsw [common practice; e.g.
    // Erickson & Maksimović ch. 4, diode recovery in switching loss]. A negative valley
    // (forced PWM at light load) leaves the diode off at that edge: no recovery.
    'reverse-recovery': p.ivalley > 0 ? (d.lowSide.qrr ?? GENERIC_DEFAULTS.qrrPerAmp * p.ivalley) * vin * fsw : 0,
    'gate-drive': (d.highSide.qg + d.lowSide.qg) * d.controller.vDrive * fsw,
    'inductor-copper': irms * irms * d.dcr,
    'inductor-core': d.coreLossFraction * 0.5 * d.inductance * ripple * ripple * fsw,
    'output-capacitor-esr': ((ripple * ripple) / 12) * d.cout.esr,
    'input-capacitor-esr': icinRms * icinRms * d.cin.esr,
    quiescent: vin * d.controller.iq,
  };
  const lossTotal = Object.values(loss).reduce((a, b) => a + b, 0);
  const pout = p.vout * io;
  const pin = pout + lossTotal;
  // ΔVout ≈ ΔIL·ESR + ΔIL/(8·fsw·C)  [Erickson & Maksimović]
  const ripplePP = ripple * d.cout.esr + ripple / (8 * fsw * d.cout.effective);
  const ta = op.ambient as number;
  const parts = [
    ...switchingParts(d,
      loss['hs-conduction']! + loss['hs-switching']! + loss['reverse-recovery']! + loss['output-capacitance']! / 2,
      loss['ls-conduction']! + loss['dead-time']! + loss['output-capacitance']! / 2,
      loss['gate-drive']! + loss.quiescent!, ta),
    part('inductor', loss['inductor-copper']! + loss['inductor-core']!, d.thetaJA.inductor, ta),
  ];
  const outputs = [{ nodeId: d.outputs[0]!.nodeId, voltage: p.vout as Volts, current: io as Amps, ripplePP: ripplePP as Volts }];
  const flags: StageFlag[] = [...switchingFlags(d, vin, wanted.duty, p.ipk, p.ivalley), ...thermalFlags(parts, d.tjMax), ...rippleFlags(outputs, d.outputs)];
  return {
    kind: 'buck',
    vin: vin as Volts,
    iin: (pin / vin) as Amps,
    pin: pin as Watts,
    pout: pout as Watts,
    loss: lossTotal as Watts,
    efficiency: (pin > 0 ? pout / pin : 0) as Ratio,
    duty: duty as Ratio,
    lossBreakdown: loss as Record<string, Watts>,
    parts,
    outputs,
    flags,
  };
}

/** On-time, duty, saturation and reverse-current checks at one point. */
export function switchingFlags(
  d: { fsw: Hertz; controller: ControllerParams; isat: Amps },
  vin: number, duty: number, ipk: number, ineg: number,
): StageFlag[] {
  const out: StageFlag[] = [];
  const ton = duty / d.fsw;
  if (ton < d.controller.minOnTime) {
    out.push(flag('min-on-time', 'error',
      `on-time ${r3(ton * 1e9)} ns at Vin ${r3(vin)} V is below the controller's minimum ${r3(d.controller.minOnTime * 1e9)} ns: lower fsw or the input range`,
      { onTime: ton, minOnTime: d.controller.minOnTime, vin }));
  }
  if (duty > d.controller.maxDuty || !(duty > 0)) {
    out.push(flag('max-duty', 'error',
      `duty ${r3(duty)} at Vin ${r3(vin)} V is outside 0…${d.controller.maxDuty} (maximum duty): the input is too low for this output`,
      { duty, maxDuty: d.controller.maxDuty, vin }));
  }
  if (ipk > d.isat) {
    out.push(flag('saturation', 'error', `peak current ${r3(ipk)} A exceeds the magnetic's saturation rating ${r3(d.isat)} A`, { ipk, isat: d.isat }));
  }
  if (ineg < -d.controller.negCurrentLimit) {
    out.push(flag('negative-peak', 'error',
      `low-side negative peak ${r3(ineg)} A is beyond the controller's limit −${r3(d.controller.negCurrentLimit)} A`,
      { negativePeak: ineg, limit: -d.controller.negCurrentLimit }));
  }
  return out;
}

/** Validation shared by the designers: every number finite, the ranges ordered. */
export function specErrors(spec: StageSpec): StageFlag[] {
  const out: StageFlag[] = [];
  const num = (name: string, v: unknown, positive: boolean) => {
    if (typeof v !== 'number' || !Number.isFinite(v) || (positive && !(v > 0))) {
      out.push(flag('bad-input', 'error', `${name}: must be a ${positive ? 'positive ' : ''}finite number (got ${String(v)})`, { field: name }));
    }
  };
  num('vinMin', spec.vinMin, false);
  num('vinNom', spec.vinNom, false);
  num('vinMax', spec.vinMax, false);
  num('fsw', spec.fsw, spec.kind !== 'ldo');
  num('ambient', spec.ambient, false);
  num('tjMax', spec.tjMax, false);
  num('ceramicDerating', spec.ceramicDerating, true);
  if (out.length === 0 && !(spec.vinMin <= spec.vinNom && spec.vinNom <= spec.vinMax)) {
    out.push(flag('bad-input', 'error', `vinMin ≤ vinNom ≤ vinMax is required (got ${spec.vinMin}, ${spec.vinNom}, ${spec.vinMax})`, { field: 'vinNom' }));
  }
  if (out.length === 0 && spec.ceramicDerating > 1) {
    out.push(flag('bad-input', 'error', `ceramicDerating: a share of the rating, 0…1 (got ${spec.ceramicDerating})`, { field: 'ceramicDerating' }));
  }
  if (!Array.isArray(spec.outputs) || spec.outputs.length === 0) {
    out.push(flag('bad-input', 'error', 'outputs: at least one output is required', { field: 'outputs' }));
    return out;
  }
  spec.outputs.forEach((o, i) => {
    num(`outputs[${i}].voltage`, o.voltage, false);
    num(`outputs[${i}].tolerance`, o.tolerance, true);
    num(`outputs[${i}].currentMin`, o.currentMin, false);
    num(`outputs[${i}].currentMax`, o.currentMax, false);
    num(`outputs[${i}].rippleLimit`, o.rippleLimit, true);
    if (typeof o.currentMin === 'number' && typeof o.currentMax === 'number' && (o.currentMin < 0 || o.currentMin > o.currentMax)) {
      out.push(flag('bad-input', 'error', `outputs[${i}]: need 0 ≤ currentMin ≤ currentMax (got ${o.currentMin}, ${o.currentMax})`, { field: `outputs[${i}].currentMin` }));
    }
    if (o.voltage === 0) out.push(flag('bad-input', 'error', `outputs[${i}].voltage: must not be 0`, { field: `outputs[${i}].voltage` }));
  });
  return out;
}

type BuckResult = { ok: true; design: BuckDesign; reasons: string[]; flags: StageFlag[] } | { ok: false; flags: StageFlag[] };

/** One grade of the feedback network: divider resistor tolerance and the reference's at most. */
interface FeedbackGrade { resistorTolerance: number; vrefToleranceMax?: number }

/** One buck design at a given switching frequency and feedback grade. */
function designBuckAt(spec: StageSpec, fswIn: number, grade: FeedbackGrade): BuckResult {
  const bad = specErrors(spec);
  if (bad.length) return { ok: false, flags: bad };
  if (spec.outputs.length !== 1) return { ok: false, flags: [flag('bad-input', 'error', `a buck has exactly one output (got ${spec.outputs.length})`, { field: 'outputs' })] };
  const o = spec.outputs[0]!;
  const vout = o.voltage as number;
  const reasons: string[] = [];
  if (!(vout > 0)) return { ok: false, flags: [flag('negative-output', 'error', `a buck makes a positive output; ${vout} V needs an inverting stage or a reversed winding`, { vout })] };
  if (vout >= spec.vinMin) {
    return { ok: false, flags: [flag('no-headroom', 'error', `output ${r3(vout)} V is not below the lowest input ${r3(spec.vinMin)} V`, { vout, vinMin: spec.vinMin })] };
  }
  const fsw = fswIn;
  const imax = Math.max(o.currentMax as number, 0.05);
  const target = GENERIC_DEFAULTS.rippleTarget;
  const dMax = vout / spec.vinMax;
  const lCalc = ((spec.vinMax - vout) * dMax) / (target * imax * fsw);
  let L = nearest('E12', lCalc);
  const lib = spec.library;
  // With a library the inductance must be one a library inductor offers: the E12 values
  // nearest the target first, within a ripple of about 15–80 % of the load [common practice].
  let inductorPick: ReturnType<typeof chooseInductor> | null = null;
  if (lib) {
    const chosen = chooseLibraryInductance(lib, L, (Lk) => {
      const rip = ((spec.vinMax - vout) * dMax) / (Lk * fsw);
      return (imax + rip / 2);
    });
    L = chosen.inductance;
    inductorPick = chosen.pick;
  }
  const ripple = ((spec.vinMax - vout) * dMax) / (L * fsw);
  const ipk = imax + ripple / 2;
  const isat = ipk * (1 + GENERIC_DEFAULTS.saturationMargin);
  // Parts: from the project's library when it is given (their parameters drive the analysis),
  // else the generic defaults from memory.
  const refs: StagePartRef[] = [];
  let ctl: ControllerParams = { ...GENERIC_DEFAULTS.controller };
  let highSide = { ...GENERIC_DEFAULTS.highSide };
  let lowSide = { ...GENERIC_DEFAULTS.lowSide };
  let rdsHotFactor: number = GENERIC_DEFAULTS.rdsHotFactor;
  let thetaJA: ThermalParams = { highSide: GENERIC_DEFAULTS.switchThetaJA, lowSide: GENERIC_DEFAULTS.switchThetaJA, controller: GENERIC_DEFAULTS.controllerThetaJA, inductor: GENERIC_DEFAULTS.inductorThetaJA };
  let integrated = false;
  let dcr = (GENERIC_DEFAULTS.inductorDcrCoeff * Math.sqrt(L / 1e-6)) / Math.sqrt(isat);
  if (lib) {
    const sw = chooseSwitcher(lib, {
      vinMin: spec.vinMin, vinMax: spec.vinMax, iNeed: o.currentMax as number, ipk, forcedPwm: false,
      ...(spec.margins ? { margins: spec.margins } : {}),
      ...(grade.vrefToleranceMax !== undefined ? { vrefToleranceMax: grade.vrefToleranceMax } : {}),
    });
    if ('problem' in sw) return { ok: false, flags: [flag('no-library-part', 'error', sw.problem, { vinMax: spec.vinMax, current: o.currentMax })] };
    ({ controller: ctl, highSide, lowSide, rdsHotFactor, integrated } = sw);
    thetaJA = { ...sw.thetaJA, inductor: GENERIC_DEFAULTS.inductorThetaJA };
    refs.push(...sw.refs);
    reasons.push(`parts: ${sw.reason}`);
    const ind = inductorPick!;
    if ('problem' in ind) return { ok: false, flags: [flag('no-library-part', 'error', `${ind.problem} (nor a neighbouring E12 value)`, { inductance: L, isat })] };
    dcr = ind.dcr;
    refs.push(ind.ref);
  }
  const e96 = bestDivider(vout, ctl.vref);
  if (!e96) return { ok: false, flags: [flag('below-reference', 'error', `output ${r3(vout)} V is not above the ${ctl.vref} V reference`, { vout, vref: ctl.vref })] };
  // The values are E96; the resistors are bought in the grade chosen (E96 values exist in 1 %, 0.5 % and 0.1 %).
  const divider: DividerChoice = { ...e96, tolerance: grade.resistorTolerance };
  reasons.push(`feedback divider ${divider.rTop} Ω / ${divider.rBottom} Ω (E96) gives ${r3(divider.vout)} V, error ${r3(divider.error * 100)} %`);
  reasons.push(`L = ${r3(L * 1e6)} µH (E12${lib ? ', offered by the library' : ''}) for ${r3((ripple / imax) * 100)} % ripple of ${r3(imax)} A at Vin ${r3(spec.vinMax)} V (calculated ${r3(lCalc * 1e6)} µH for ${target * 100} %)`);
  const rippleLimit = o.rippleLimit as number;
  // ΔV = ΔI·ESR + ΔI/(8·fsw·C)  [Erickson & Maksimović] solved for C with the ESR of the whole
  // bank (parts in parallel), at least 10 µF [common practice]; the count and the bank's ESR
  // depend on each other, so iterate to a fixed point.
  let cout = chooseCeramic('output', 10e-6, vout * (1 + o.tolerance), spec.ceramicDerating);
  for (let k = 0; k < 6; k++) {
    const budget = Math.max(rippleLimit * 0.5 - ripple * cout.esr, rippleLimit * 0.1);
    const next = chooseCeramic('output', Math.max(ripple / (8 * fsw * budget), 10e-6), vout * (1 + o.tolerance), spec.ceramicDerating);
    const same = next.count === cout.count && next.value === cout.value;
    cout = next;
    if (same) break;
  }
  // Cin ≥ Io·D(1−D)/(fsw·ΔVin) with D(1−D) ≤ ¼, ΔVin = 1 % of Vin min [common practice]
  const cinNeed = Math.max((imax * 0.25) / (fsw * 0.01 * spec.vinMin), 1e-6);
  let cin = chooseCeramic('input', cinNeed, spec.vinMax, spec.ceramicDerating);
  // RMS ripple each bank carries [Erickson & Maksimović]: input Io·√(D(1−D)), largest at the
  // duty nearest ½ over the input range; output ΔIL/√12 at Vin max (the largest ripple).
  const dLo = vout / spec.vinMax;
  const dHi = Math.min(1, vout / spec.vinMin);
  const dWorst = dLo <= 0.5 && dHi >= 0.5 ? 0.5 : (Math.abs(dLo - 0.5) < Math.abs(dHi - 0.5) ? dLo : dHi);
  cin = { ...cin, rmsCurrent: imax * Math.sqrt(dWorst * (1 - dWorst)) };
  cout = { ...cout, rmsCurrent: ripple / Math.sqrt(12) };
  if (lib) {
    for (const which of ['cout', 'cin'] as const) {
      const pick = chooseCeramicRow(lib, which === 'cout' ? cout : cin, spec.electrolyticDerating);
      if (!pick) continue; // the BOM then looks for a polymer or aluminium part and says so
      if (which === 'cout') cout = pick.bank; else cin = pick.bank;
      refs.push(pick.ref);
    }
  }
  reasons.push(`output capacitor ${cout.count} × ${r3(cout.value * 1e6)} µF ${cout.ratedVoltage} V ${cout.partKind ?? 'ceramic'} (${r3(cout.effective * 1e6)} µF left at ${r3(vout)} V) for half the ${r3(rippleLimit * 1e3)} mV ripple limit`);
  reasons.push(`input capacitor ${cin.count} × ${r3(cin.value * 1e6)} µF ${cin.ratedVoltage} V ${cin.partKind ?? 'ceramic'}; RMS current up to ${r3(cin.rmsCurrent ?? 0)} A (Io·√(D(1−D)))`);
  const design: BuckDesign = {
    kind: 'buck',
    vinMin: spec.vinMin, vinNom: spec.vinNom, vinMax: spec.vinMax,
    outputs: [{ ...o }],
    fsw: fsw as Hertz,
    inductance: L as Henries,
    dcr: dcr as Ohms,
    isat: isat as Amps,
    coreLossFraction: GENERIC_DEFAULTS.coreLossFraction,
    cout, cin, divider,
    highSide, lowSide, rdsHotFactor,
    bodyDiode: { ...GENERIC_DEFAULTS.bodyDiode },
    controller: ctl,
    thetaJA,
    tjMax: spec.tjMax,
    ...(integrated ? { integrated } : {}),
    ...(refs.length ? { parts: refs } : {}),
  };
  const flags = feasibility(design, spec.ambient as number, [o.currentMax as number]);
  if (flags.some((f) => f.severity === 'error')) return { ok: false, flags };
  return { ok: true, design, reasons, flags };
}

/** Resistor grades the divider may be bought in, loosest (cheapest) first [common practice: 1 %, 0.5 %, 0.1 %]. */
export const RESISTOR_GRADES: readonly number[] = [0.01, 0.005, 0.001];

/**
 * Switching frequencies a buck falls back to, highest first, when the project's frequency
 * puts the on-time at Vin max below the controller's minimum (on-time = D/fsw, Erickson &
 * Maksimović ch. 2). The values are the usual settings of buck regulators' frequency pins
 * [common practice]; only those below the project's frequency are tried.
 */
export const FSW_SET: readonly number[] = [2e6, 1e6, 600e3, 400e3, 300e3, 200e3, 150e3, 100e3];

const pct = (x: number) => `${+(x * 100).toPrecision(3)} %`;
const hz = (f: number) => (f >= 1e6 ? `${+(f / 1e6).toPrecision(3)} MHz` : `${+(f / 1e3).toPrecision(3)} kHz`);

/** The window of the buck's output over the corners the planner checks (vin min/nom/max × load min/max). */
function buckWindow(d: BuckDesign, spec: StageSpec): OutputWindow {
  const o = spec.outputs[0]!;
  return stageWindows(d, { vin: [spec.vinMin, spec.vinNom, spec.vinMax], iout: [{ min: o.currentMin, max: o.currentMax }] })[0]!;
}
const excess = (w: OutputWindow) => Math.max(w.allowedMin - w.min, w.max - w.allowedMax);
const band = (w: OutputWindow) => `${r3(w.min)}…${r3(w.max)} V`;

/** Library cost of the switcher rows a design uses (regulator, or controller and switches). */
function switcherCost(d: BuckDesign, lib: readonly LibraryRow[]): number {
  let c = 0;
  for (const ref of d.parts ?? []) {
    if (ref.role === 'inductor' || ref.role === 'output' || ref.role === 'input') continue;
    const row = lib.find((r) => r.id === ref.libraryId);
    if (row && (row.partClass === 'controller' || row.partClass === 'switch')) c += row.cost;
  }
  return c;
}

/**
 * The feedback grade: the cheapest pair of divider resistor grade (RESISTOR_GRADES) and
 * reference grade (the controllers the library offers, by their reference tolerance) whose
 * worst-case window (windows.ts: reference and both resistors at their extremes, stacked,
 * common practice) fits the rail's band. When none fits, the tightest is kept and the
 * window check reports the miss.
 */
function designBuckGraded(spec: StageSpec, fsw: number): BuckResult {
  const lib = spec.library;
  let grades = RESISTOR_GRADES.filter((t) => !lib || cheapestResistorOfGrade(lib, t));
  if (grades.length === 0) grades = [RESISTOR_GRADES[0]!]; // no resistor at all: the BOM says so
  const resCost = (t: number) => (lib ? cheapestResistorOfGrade(lib, t)?.cost ?? 0 : 0);
  const base = designBuckAt(spec, fsw, { resistorTolerance: grades[0]! });
  if (!base.ok) return base;
  const w0 = buckWindow(base.design, spec);
  const refNote = (d: BuckDesign) => `±${pct(d.controller.vrefTolerance)} reference${d.parts?.[0] ? ` (${d.parts[0].libraryId})` : ''}`;
  if (w0.inside) {
    base.reasons.push(`feedback grade: ${pct(grades[0]!)} resistors with the ${refNote(base.design)} give ${band(w0)}, inside ${r3(w0.allowedMin)}…${r3(w0.allowedMax)} V: the cheapest grade`);
    return base;
  }
  // Reference grades: each tighter reference tolerance a controller row offers.
  const designs: BuckDesign[] = [base.design];
  const reasonsOf = new Map<BuckDesign, string[]>([[base.design, base.reasons]]);
  const flagsOf = new Map<BuckDesign, StageFlag[]>([[base.design, base.flags]]);
  if (lib) {
    const tols = [...new Set(lib.filter((r) => r.partClass === 'controller').map(vrefToleranceOf))]
      .filter((g) => g < base.design.controller.vrefTolerance - 1e-12).sort((a, b) => b - a);
    for (const g of tols) {
      const r = designBuckAt(spec, fsw, { resistorTolerance: grades[0]!, vrefToleranceMax: g });
      if (!r.ok || designs.some((d) => d.parts?.[0]?.libraryId === r.design.parts?.[0]?.libraryId)) continue;
      designs.push(r.design);
      reasonsOf.set(r.design, r.reasons);
      flagsOf.set(r.design, r.flags);
    }
  }
  const cands = designs.flatMap((d) => grades.map((t) => ({ d, t, cost: (lib ? switcherCost(d, lib) : 0) + 2 * resCost(t) })))
    .sort((a, b) => a.cost - b.cost || b.t - a.t || b.d.controller.vrefTolerance - a.d.controller.vrefTolerance);
  let best: { design: BuckDesign; w: OutputWindow; src: BuckDesign; t: number; cost: number } | null = null;
  for (const c of cands) {
    const design: BuckDesign = { ...c.d, divider: { ...c.d.divider, tolerance: c.t } };
    const w = buckWindow(design, spec);
    if (!best || (w.inside && !best.w.inside) || (!best.w.inside && excess(w) < excess(best.w) - 1e-12)) best = { design, w, src: c.d, t: c.t, cost: c.cost };
    if (w.inside) break;
  }
  const b = best!;
  const baseCost = cands.find((c) => c.d === base.design && c.t === grades[0])!.cost;
  const reasons = [...reasonsOf.get(b.src)!];
  const first = `${pct(grades[0]!)} resistors with the ${refNote(base.design)} give ${band(w0)}, outside ${r3(w0.allowedMin)}…${r3(w0.allowedMax)} V`;
  reasons.push(b.w.inside
    ? `feedback grade: ${pct(b.t)} resistors with the ${refNote(b.design)} give ${band(b.w)}, the cheapest grade inside the band (${lib ? `+${r3(b.cost - baseCost)} in parts; ` : ''}${first})`
    : `feedback grade: no grade fits; the tightest, ${pct(b.t)} resistors with the ${refNote(b.design)}, gives ${band(b.w)} (${first})`);
  return { ok: true, design: b.design, reasons, flags: flagsOf.get(b.src)! };
}

/**
 * Design a buck: at the project's switching frequency when the on-time allows, else at the
 * highest frequency of FSW_SET below it that passes the on-time and duty checks; with the
 * cheapest feedback grade whose window fits (designBuckGraded).
 */
export function designBuck(spec: StageSpec): BuckResult {
  const bad = specErrors(spec);
  if (bad.length) return { ok: false, flags: bad };
  const f0 = spec.fsw as number;
  const first = designBuckGraded(spec, f0);
  // The shortest on-time (at Vin max) is the one a lower frequency must lift.
  const ton0 = first.ok ? undefined : first.flags.filter((f) => f.code === 'min-on-time')
    .sort((a, b) => Number(a.data?.onTime) - Number(b.data?.onTime))[0];
  if (first.ok || !ton0) return first;
  const lower = FSW_SET.filter((f) => f < f0 * (1 - 1e-9));
  let last: BuckResult = first;
  for (const f of lower) {
    const r = designBuckGraded(spec, f);
    if (r.ok) {
      const o = spec.outputs[0]!;
      const ev = evaluateBuck(r.design, { vin: spec.vinMax, iout: [o.currentMax], ambient: spec.ambient });
      const d0 = ton0.data ?? {};
      r.reasons.unshift(`fsw ${hz(f)}: on-time ${r3(Number(d0.onTime) * 1e9)} ns at Vin ${r3(Number(d0.vin))} V is below the ${r3(Number(d0.minOnTime) * 1e9)} ns minimum at the project's ${hz(f0)}; ${hz(f)} gives ${r3(((ev.duty ?? 0) / f) * 1e9)} ns (the highest of ${lower.map(hz).join(', ')} that passes)`);
      return r;
    }
    last = r;
  }
  if (lower.length === 0) return first;
  const why = last.ok ? '' : last.flags.find((x) => x.severity === 'error')?.text ?? '';
  return {
    ok: false,
    flags: first.flags.map((x) => (x === ton0 ? { ...x, text: `${x.text}; the lower frequencies ${lower.map(hz).join(', ')} fail too (at ${hz(lower.at(-1)!)}: ${why})` } : x)),
  };
}

/** Evaluate at Vin min and max with the largest currents; collect unique flags. */
export function feasibility(d: { vinMin: Volts; vinMax: Volts; kind: string }, ambient: number, imax: number[], evaluate?: (vin: number) => StageEvaluation): StageFlag[] {
  const ev = evaluate ?? ((vin: number) => evaluateBuck(d as BuckDesign, { vin: vin as Volts, iout: imax as Amps[], ambient: ambient as Celsius }));
  const seen = new Set<string>();
  const out: StageFlag[] = [];
  for (const vin of [d.vinMin as number, d.vinMax as number]) {
    for (const f of ev(vin).flags) {
      if (seen.has(f.code + f.text)) continue;
      seen.add(f.code + f.text);
      out.push(f);
    }
  }
  return out;
}
