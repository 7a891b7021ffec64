/**
 * Synchronous inverting buck-boost in continuous conduction (forced PWM): the stage kind
 * `inverting`, a negative rail without isolation.
 *
 * Equations: Erickson & Maksimović, *Fundamentals of Power Electronics*, ch. 2 (buck-boost:
 * volt-second balance on the inductor gives Vout = −Vin·D/(1 − D); charge balance on the
 * output capacitor gives IL = Iout/(1 − D); ΔIL = Vin·D/(L·fsw); the input and the output
 * currents are both pulsed) and ch. 8 (the right-half-plane zero
 * f_RHP = |Vout|·(1 − D)²/(2π·D·L·Iout)). Loss terms are common practice, each separately.
 *
 * Switches: `highSide` is the main switch from the input to the switch node, on for D·T;
 * `lowSide` is the synchronous rectifier from the switch node to the negative output. Both
 * see Vin + |Vout| when off. The inductor runs from the switch node to ground.
 */
import type { Amps, Celsius, Henries, Ohms, Ratio, Volts, Watts } from '../../units.ts';
import type { DesignFields, OperatingPoint, StageEvaluation, StageFlag, StageSpec } from '../types.ts';
import { bestDivider, nearest } from '../../eseries.ts';
import { GENERIC_DEFAULTS, diodeVf, type ControllerParams } from '../defaults.ts';
import { chooseCeramic, flag, part, r3, rippleFlags, thermalFlags } from '../common.ts';
import { chooseCeramicRow, chooseInductor, chooseLibraryInductance, chooseSwitcher, type StagePartRef } from '../part-choice.ts';
import { feasibility, specErrors, switchingDesignFields, switchingFlags, switchingParts, type SwitchingDesignBase, type ThermalParams } from '../buck/index.ts';
import { NETLIST_CAUTION, commentText, spiceNumber as f, transientLines } from '../netlist-text.ts';
import { inductorStageParts, type LibraryRow, type PartPick, type PickOptions } from '../../library.ts';
import { setpoint, type OutputSpan, type ToleranceDraw } from '../window-cases.ts';

/** Maximum duty of an inverting controller [common practice 0.8–0.9, from memory]. */
export const INVERTING_MAX_DUTY = 0.85;
export const INVERTING_DUTY_WARN = 0.8;
/** Crossover kept below f_RHP/5 [common practice, from memory]. */
export const RHP_CROSSOVER_SHARE = 0.2;

/** The fields every Inverting design carries (registry.ts `designFields`). */
export function invertingDesignFields(): DesignFields<InvertingDesign> {
  return { ...switchingDesignFields(), kind: true, dcr: true, rhpZero: true, crossoverLimit: true };
}

export interface InvertingDesign extends SwitchingDesignBase {
  kind: 'inverting';
  dcr: Ohms;
  /** Right-half-plane zero at Vin min and full load (Hz), and the crossover limit it sets. */
  rhpZero: number;
  crossoverLimit: number;
}

export interface InvertingPoint {
  /** Magnitude of the output. */
  vout: number;
  io: number;
  duty: number;
  deadShare: number;
  rhs: number;
  rls: number;
  il: number;
  ripple: number;
  ipk: number;
  ivalley: number;
  irms: number;
  vf1: number;
  vf2: number;
}

/**
 * Averaged model with drops (ideal parts: D = |Vout|/(Vin + |Vout|), i.e. |Vout| = Vin·D/(1−D)):
 *   volt-second on L: D·(Vin − IL·Rhs) − (1 − D − δ)·(|Vout| + IL·Rls) + (δ/2)·(v1 + v2) = IL·DCR
 *   charge to output: Iout = IL·(1 − D − δ) + (δ/2)·(i1·[v1 via the rectifier's diode] + i2·[…])
 * with the switch node in a dead time at −(|Vout| + Vf) while the current flows into the
 * rectifier's body diode, or at Vin + Vf once it has reversed (main switch's body diode).
 */
export function invertingPoint(d: InvertingDesign, vin: number, io: number, vout = d.divider.vout): InvertingPoint {
  const rhs = d.highSide.rdsOn * d.rdsHotFactor;
  const rls = d.lowSide.rdsOn * d.rdsHotFactor;
  const deadShare = 2 * d.controller.deadTime * d.fsw;
  const L = d.inductance as number;
  const fsw = d.fsw as number;
  let duty = vout / (vin + vout);
  let il = io / (1 - duty);
  let ripple = 0, vf1 = 0, vf2 = 0;
  for (let k = 0; k < 40; k++) {
    // ΔIL = Vin·D/(L·fsw)  [Erickson & Maksimović, ch. 2]
    ripple = (vin * Math.max(0, duty)) / (L * fsw);
    const i1 = il + ripple / 2;
    const i2 = il - ripple / 2;
    const via1 = i1 >= 0 ? 1 : 0;
    const via2 = i2 >= 0 ? 1 : 0;
    vf1 = diodeVf(d.bodyDiode, Math.abs(i1));
    vf2 = diodeVf(d.bodyDiode, Math.abs(i2));
    const v1 = via1 ? -(vout + vf1) : vin + vf1;
    const v2 = via2 ? -(vout + vf2) : vin + vf2;
    const share = 1 - duty - deadShare + (deadShare / 2) * (via1 + via2);
    const ilNext = (io - (deadShare / 4) * ripple * (via1 - via2)) / Math.max(1e-3, share);
    const dutyNext = (ilNext * d.dcr + (1 - deadShare) * (vout + ilNext * rls) - (deadShare / 2) * (v1 + v2)) / (vin - ilNext * rhs + vout + ilNext * rls);
    const done = Math.abs(dutyNext - duty) < 1e-12 && Math.abs(ilNext - il) < 1e-12;
    duty = dutyNext;
    il = ilNext;
    if (done) break;
  }
  ripple = (vin * Math.max(0, duty)) / (L * fsw);
  const irms = Math.sqrt(il * il + (ripple * ripple) / 12);
  return { vout, io, duty, deadShare, rhs, rls, il, ripple, ipk: il + ripple / 2, ivalley: il - ripple / 2, irms, vf1, vf2 };
}

/** The operating point at a given duty (output magnitude below its setpoint). */
export function invertingAtDuty(d: InvertingDesign, vin: number, io: number, duty: number): InvertingPoint {
  let lo = 1e-3;
  let hi = Math.max(1, ((vin * duty) / (1 - duty)) * 1.5);
  for (let k = 0; k < 80 && hi - lo > 1e-9 * hi; k++) {
    const mid = (lo + hi) / 2;
    if (invertingPoint(d, vin, io, mid).duty > duty) hi = mid;
    else lo = mid;
  }
  return invertingPoint(d, vin, io, lo);
}

export function invertingOutputAt(d: InvertingDesign, vin: number, io: number, setpoint: number): InvertingPoint {
  const wanted = invertingPoint(d, vin, io, setpoint);
  return wanted.duty > d.controller.maxDuty ? invertingAtDuty(d, vin, io, d.controller.maxDuty) : wanted;
}

export function evaluateInverting(d: InvertingDesign, op: OperatingPoint): StageEvaluation {
  const vin = op.vin as number;
  const io = Math.max(0, Math.abs((op.iout[0] ?? 0) as number));
  const wanted = invertingPoint(d, vin, io);
  const p = invertingOutputAt(d, vin, io, d.divider.vout);
  const { duty, deadShare, rhs, rls, ripple, irms, il } = p;
  const fsw = d.fsw as number;
  const td = d.controller.deadTime;
  const vo = p.vout;
  const vsw = vin + vo; // both switches block Vin + |Vout|
  // Output capacitor: IL − Iout while the rectifier conducts, −Iout otherwise (pulsed):
  // I² = (1 − D)(IL² + ΔI²/12) − Iout² ≈ Iout²·D/(1 − D)  [Erickson & Maksimović, ch. 2]
  const coutRms2 = Math.max(0, (1 - duty) * (il * il + (ripple * ripple) / 12) - io * io);
  // Input capacitor: the input current is IL during D·T and zero otherwise.
  const cinRms2 = Math.max(0, duty * (il * il + (ripple * ripple) / 12) - (duty * il) ** 2);
  const loss: Record<string, number> = {
    'hs-conduction': irms * irms * rhs * duty,
    'ls-conduction': irms * irms * rls * Math.max(0, 1 - duty - deadShare),
    // ½·(Vin + |Vout|)·IL·(tr+tf)·fsw  [common practice]
    'hs-switching': 0.5 * vsw * Math.abs(il) * (d.highSide.tr + d.highSide.tf) * fsw,
    'output-capacitance': 0.5 * (d.highSide.coss + d.lowSide.coss) * vsw * vsw * fsw,
    'dead-time': (p.vf1 * Math.abs(p.ipk) + p.vf2 * Math.abs(p.ivalley)) * td * fsw,
    'gate-drive': (d.highSide.qg + d.lowSide.qg) * d.controller.vDrive * fsw,
    'inductor-copper': irms * irms * d.dcr,
    'inductor-core': d.coreLossFraction * 0.5 * d.inductance * ripple * ripple * fsw,
    'output-capacitor-esr': coutRms2 * d.cout.esr,
    'input-capacitor-esr': cinRms2 * d.cin.esr,
    quiescent: vin * d.controller.iq,
  };
  const lossTotal = Object.values(loss).reduce((a, b) => a + b, 0);
  const pout = vo * io;
  const pin = pout + lossTotal;
  // The output capacitor alone carries the load during D·T: ΔVout ≈ Iout·D/(fsw·Cout) + ESR·Ipk  [Erickson & Maksimović]
  const ripplePP = (io * duty) / (fsw * d.cout.effective) + d.cout.esr * Math.max(0, p.ipk);
  const ta = op.ambient as number;
  const parts = [
    ...switchingParts(d,
      loss['hs-conduction']! + loss['hs-switching']! + loss['output-capacitance']! / 2,
      loss['ls-conduction']! + loss['dead-time']! + loss['output-capacitance']! / 2,
      loss['gate-drive']! + loss.quiescent!, ta),
    part('inductor', loss['inductor-copper']! + loss['inductor-core']!, d.thetaJA.inductor, ta),
  ];
  const outputs = [{ nodeId: d.outputs[0]!.nodeId, voltage: -vo as Volts, current: io as Amps, ripplePP: ripplePP as Volts }];
  const flags: StageFlag[] = [...switchingFlags(d, vin, wanted.duty, p.ipk, p.ivalley)];
  if (wanted.duty > INVERTING_DUTY_WARN && wanted.duty <= d.controller.maxDuty) {
    flags.push(flag('high-duty', 'warning', `duty ${r3(wanted.duty)} at Vin ${r3(vin)} V is above ${INVERTING_DUTY_WARN}: conduction losses and the right-half-plane zero limit the stage here`, { duty: r3(wanted.duty), warnAt: INVERTING_DUTY_WARN, vin }));
  }
  flags.push(...thermalFlags(parts, d.tjMax), ...rippleFlags(outputs, d.outputs));
  return {
    kind: 'inverting',
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

/** f_RHP = |Vout|·(1 − D)²/(2π·D·L·Iout)  [Erickson & Maksimović, ch. 8, buck-boost]. */
export function invertingRhpZero(vout: number, duty: number, L: number, iout: number): number {
  return (Math.abs(vout) * (1 - duty) ** 2) / (2 * Math.PI * duty * L * Math.max(iout, 1e-9));
}

type Result = { ok: true; design: InvertingDesign; reasons: string[]; flags: StageFlag[] } | { ok: false; flags: StageFlag[] };

export function designInverting(spec: StageSpec): Result {
  const bad = specErrors(spec);
  if (bad.length) return { ok: false, flags: bad };
  if (spec.outputs.length !== 1) return { ok: false, flags: [flag('bad-input', 'error', `an inverting stage has exactly one output (got ${spec.outputs.length})`, { field: 'outputs' })] };
  if (!(spec.vinMin > 0)) return { ok: false, flags: [flag('bad-input', 'error', `vinMin: an inverting stage needs a positive input (got ${spec.vinMin})`, { field: 'vinMin' })] };
  const o = spec.outputs[0]!;
  if (!((o.voltage as number) < 0)) return { ok: false, flags: [flag('positive-output', 'error', `an inverting stage makes a negative output; ${o.voltage} V needs a buck or a boost`, { vout: o.voltage })] };
  const vo = -(o.voltage as number);
  const reasons: string[] = [];
  const fsw = spec.fsw as number;
  const imax = Math.max(o.currentMax as number, 0.01);
  // D = |Vout|/(|Vout| + η·Vin) with an estimated η of 0.9  [Erickson & Maksimović, ch. 2]
  const etaGuess = 0.9;
  const dAt = (vin: number) => vo / (vo + etaGuess * vin);
  const dMax = dAt(spec.vinMin);
  let ctl: ControllerParams = { ...GENERIC_DEFAULTS.controller, maxDuty: INVERTING_MAX_DUTY };
  if (dMax > INVERTING_MAX_DUTY) {
    return { ok: false, flags: [flag('max-duty', 'error', `duty ${r3(dMax)} at Vin min ${r3(spec.vinMin)} V for −${r3(vo)} V is above the ${INVERTING_MAX_DUTY} maximum: |Vout|/Vin = ${r3(vo / spec.vinMin)} is too large for one stage`, { duty: r3(dMax), maxDuty: INVERTING_MAX_DUTY, vinMin: spec.vinMin })] };
  }
  const ilAt = (vin: number) => imax / (1 - dAt(vin));
  const ilMax = ilAt(spec.vinMin);
  const rippleAt = (L: number, vin: number) => (vin * dAt(vin)) / (L * fsw);
  // The ripple grows with Vin: size L for 35 % of the inductor current at Vin max.
  const target = GENERIC_DEFAULTS.rippleTarget;
  const lCalc = (spec.vinMax * dAt(spec.vinMax)) / (target * ilAt(spec.vinMax) * fsw);
  let L = nearest('E12', lCalc);
  const peakFor = (Lk: number) => Math.max(ilMax + rippleAt(Lk, spec.vinMin) / 2, ilAt(spec.vinMax) + rippleAt(Lk, spec.vinMax) / 2);
  const lib = spec.library;
  let inductorPick: ReturnType<typeof chooseInductor> | null = null;
  if (lib) {
    const chosen = chooseLibraryInductance(lib, L, peakFor);
    L = chosen.inductance;
    inductorPick = chosen.pick;
  }
  const ipk = peakFor(L);
  const isat = ipk * (1 + GENERIC_DEFAULTS.saturationMargin);
  const refs: StagePartRef[] = [];
  let highSide = { ...GENERIC_DEFAULTS.highSide };
  let lowSide = { ...GENERIC_DEFAULTS.lowSide };
  let rdsHotFactor: number = GENERIC_DEFAULTS.rdsHotFactor;
  let thetaJA: ThermalParams = { highSide: GENERIC_DEFAULTS.switchThetaJA, lowSide: GENERIC_DEFAULTS.switchThetaJA, controller: GENERIC_DEFAULTS.controllerThetaJA, inductor: GENERIC_DEFAULTS.inductorThetaJA };
  let integrated = false;
  let dcr = (GENERIC_DEFAULTS.inductorDcrCoeff * Math.sqrt(L / 1e-6)) / Math.sqrt(isat);
  const vStress = spec.vinMax + vo * (1 + o.tolerance);
  if (lib) {
    const sw = chooseSwitcher(lib, { vinMin: spec.vinMin, vinMax: vStress, iNeed: ilMax, ipk, forcedPwm: false, topology: 'inverting', ...(spec.margins ? { margins: spec.margins } : {}) });
    if ('problem' in sw) return { ok: false, flags: [flag('no-library-part', 'error', `${sw.problem} (an inverting stage's switches see Vin + |Vout|, ${r3(vStress)} V)`, { vStress: r3(vStress), current: r3(ilMax) })] };
    ({ controller: ctl, highSide, lowSide, rdsHotFactor, integrated } = sw);
    thetaJA = { ...sw.thetaJA, inductor: GENERIC_DEFAULTS.inductorThetaJA };
    refs.push(...sw.refs);
    reasons.push(`parts: ${sw.reason}`);
    const ind = inductorPick!;
    if ('problem' in ind) return { ok: false, flags: [flag('no-library-part', 'error', `${ind.problem} (nor a neighbouring E12 value)`, { inductance: L, isat })] };
    dcr = ind.dcr;
    refs.push(ind.ref);
    if (dMax > ctl.maxDuty) return { ok: false, flags: [flag('max-duty', 'error', `duty ${r3(dMax)} at Vin min ${r3(spec.vinMin)} V is above the chosen controller's ${ctl.maxDuty} maximum`, { duty: r3(dMax), maxDuty: ctl.maxDuty })] };
  }
  // The controller regulates |Vout| against its reference through an inverting feedback network.
  const divider = bestDivider(vo, ctl.vref);
  if (!divider) return { ok: false, flags: [flag('below-reference', 'error', `output magnitude ${r3(vo)} V is not above the ${ctl.vref} V reference`, { vout: -vo, vref: ctl.vref })] };
  reasons.push(`feedback divider ${divider.rTop} Ω / ${divider.rBottom} Ω (E96) on |Vout| gives −${r3(divider.vout)} V, error ${r3(divider.error * 100)} %`);
  reasons.push(`D = |Vout|/(|Vout| + η·Vin): ${r3(dAt(spec.vinMax))} at Vin max … ${r3(dMax)} at Vin min (η ≈ ${etaGuess}); inductor current up to ${r3(ilMax)} A = Iout/(1 − D); switches and rectifier block Vin + |Vout| = ${r3(spec.vinMax + vo)} V`);
  reasons.push(`L = ${r3(L * 1e6)} µH (E12${lib ? ', offered by the library' : ''}) for ${r3((rippleAt(L, spec.vinMax) / ilAt(spec.vinMax)) * 100)} % ripple at Vin max (calculated ${r3(lCalc * 1e6)} µH for ${target * 100} %)`);
  const rippleLimit = o.rippleLimit as number;
  let cout = chooseCeramic('output', 10e-6, vo * (1 + o.tolerance), spec.ceramicDerating);
  for (let k = 0; k < 6; k++) {
    const budget = Math.max(rippleLimit * 0.5 - ipk * cout.esr, rippleLimit * 0.1);
    const next = chooseCeramic('output', Math.max((imax * dMax) / (fsw * budget), 10e-6), vo * (1 + o.tolerance), spec.ceramicDerating);
    const same = next.count === cout.count && next.value === cout.value;
    cout = next;
    if (same) break;
  }
  // Pulsed input current: Cin ≥ IL·D(1−D)/(fsw·ΔVin), D(1−D) ≤ ¼, ΔVin = 1 % of Vin min [common practice]
  const cinNeed = Math.max((ilMax * 0.25) / (fsw * 0.01 * spec.vinMin), 1e-6);
  let cin = chooseCeramic('input', cinNeed, spec.vinMax, spec.ceramicDerating);
  if (lib) {
    for (const which of ['cout', 'cin'] as const) {
      const pick = chooseCeramicRow(lib, which === 'cout' ? cout : cin);
      if (!pick) continue;
      if (which === 'cout') cout = pick.bank; else cin = pick.bank;
      refs.push(pick.ref);
    }
  }
  reasons.push(`output capacitor ${cout.count} × ${r3(cout.value * 1e6)} µF ${cout.ratedVoltage} V ceramic (${r3(cout.effective * 1e6)} µF left at ${r3(vo)} V) carries the pulsed rectifier current, RMS up to ${r3(imax * Math.sqrt(dMax / (1 - dMax)))} A (Iout·√(D/(1−D)))`);
  reasons.push(`input capacitor ${cin.count} × ${r3(cin.value * 1e6)} µF ${cin.ratedVoltage} V ceramic: the input current is pulsed, RMS up to ${r3(ilMax * Math.sqrt(dMax * (1 - dMax)))} A (IL·√(D(1−D)))`);
  const fz = invertingRhpZero(vo, dMax, L, imax);
  const design: InvertingDesign = {
    kind: 'inverting',
    vinMin: spec.vinMin, vinNom: spec.vinNom, vinMax: spec.vinMax,
    outputs: [{ ...o }],
    fsw: spec.fsw,
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
    rhpZero: fz,
    crossoverLimit: fz * RHP_CROSSOVER_SHARE,
  };
  reasons.push(`right-half-plane zero at ${r3(fz / 1e3)} kHz (Vin min, full load); keep the loop crossover below ${r3(design.crossoverLimit / 1e3)} kHz`);
  const nom = invertingPoint(design, spec.vinNom, 0);
  const noLoad = evaluateInverting(design, { vin: spec.vinNom, iout: [0 as Amps], ambient: spec.ambient });
  reasons.push(`light load: forced PWM stays in continuous conduction with no minimum load; below ${r3(((1 - nom.duty) * nom.ripple) / 2 * 1e3)} mA (Vin ${r3(spec.vinNom)} V) the inductor current reverses each cycle, and at no load the stage still dissipates ${r3(noLoad.loss as number)} W`);
  const flags = feasibility(design, spec.ambient as number, [o.currentMax as number], (vin) => evaluateInverting(design, { vin: vin as Volts, iout: [o.currentMax], ambient: spec.ambient as Celsius }));
  if (flags.some((x) => x.severity === 'error')) return { ok: false, flags };
  return { ok: true, design, reasons, flags };
}

/** Output window at one corner, as magnitudes (windows.ts signs them): DC ∓ half the ripple. */
export function invertingWindowAt(d: InvertingDesign, vin: number, io: number, setpoint: number): { lo: number; hi: number } {
  const p = invertingOutputAt(d, vin, io, setpoint);
  const ev = evaluateInverting(d, { vin: vin as Volts, iout: [io as Amps], ambient: 25 as Celsius });
  const rp = ev.outputs[0]!.ripplePP as number;
  return { lo: p.vout - rp / 2, hi: p.vout + rp / 2 };
}

/** The output at one window corner (windows.ts), as a magnitude: the setpoint is on |Vout|. */
export function invertingWindowOutputs(d: InvertingDesign, vin: number, iout: number[], x: ToleranceDraw): OutputSpan[] {
  return [invertingWindowAt(d, vin, iout[0] ?? 0, setpoint(d.divider, d.controller.vrefTolerance, x))];
}

/** The parts of an inverting stage for the BOM, in the shape of library.ts `partsForStage`. */
export function invertingParts(stageId: string, d: InvertingDesign, library: LibraryRow[], opts: Partial<PickOptions> = {}): PartPick[] {
  const vo = Math.abs(d.outputs[0]!.voltage as number);
  // Inductor (switch) current at Vin min: Iout/(1 − D) with D = |Vout|/(Vin + |Vout|).
  const il = ((d.outputs[0]!.currentMax as number) * (d.vinMin + vo)) / d.vinMin;
  return inductorStageParts(stageId, d, library, opts, { vRating: d.vinMax + vo * (1 + d.outputs[0]!.tolerance), iNeed: il, topology: 'inverting' });
}

/**
 * Open-loop ngspice netlist at the duty the engine computes: main switch from the input to
 * the switch node, inductor (with DCR) to ground, synchronous rectifier from the switch node
 * to the negative output, body diodes, dead times, output capacitor with ESR, resistive load.
 * Not modelled: switching overlap, Coss, gate drive, core and quiescent losses, input capacitor.
 */
export function invertingNetlist(d: InvertingDesign, op: OperatingPoint, opts: { stopTime?: number; measureCycles?: number; maxStep?: number } = {}): string {
  const vin = op.vin as number;
  const io = Math.max(0, Math.abs((op.iout[0] ?? 0) as number));
  const p = invertingOutputAt(d, vin, io, d.divider.vout);
  const fsw = d.fsw as number;
  const T = 1 / fsw;
  const edge = 1e-9;
  const dead = d.controller.deadTime;
  const ton = p.duty * T;
  const trec = (1 - p.duty) * T - 2 * dead;
  if (!(ton > 2 * edge) || !(trec > 2 * edge)) throw new RangeError(`duty ${p.duty} leaves no room for both switches at ${fsw} Hz`);
  const o = d.outputs[0]!;
  const lines = [
    '* Railwright open-loop netlist: synchronous inverting buck-boost stage',
    `* output: v_out0 = ${commentText(o.nodeId)} (${f(o.voltage)} V)`,
    `* Vin ${f(vin)} V, duty ${p.duty.toFixed(5)} (computed by the stage engine)`,
    ...NETLIST_CAUTION,
    `VIN vin 0 DC ${f(vin)}`,
    '* gate drives: main switch on for D·T, rectifier after the dead time',
    `VGM gm 0 PULSE(0 1 0 ${f(edge)} ${f(edge)} ${f(ton - edge)} ${f(T)})`,
    `VGR gr 0 PULSE(0 1 ${f(ton + dead)} ${f(edge)} ${f(edge)} ${f(trec - edge)} ${f(T)})`,
    'SMAIN vin sw gm 0 SWMAIN',
    'SREC out sw gr 0 SWREC',
    `.model SWMAIN SW(VT=0.5 VH=0.1 RON=${f(p.rhs)} ROFF=1e7)`,
    `.model SWREC SW(VT=0.5 VH=0.1 RON=${f(p.rls)} ROFF=1e7)`,
    '* body diodes',
    'DBM sw vin DBODY',
    'DBR out sw DBODY',
    `.model DBODY D(IS=${f(d.bodyDiode.is)} N=${f(d.bodyDiode.n)} RS=${f(d.bodyDiode.rs)})`,
    '* inductor with its winding resistance, from the switch node to ground',
    `L1 sw lx ${f(d.inductance)} IC=${f(p.ivalley)}`,
    `RL1 lx 0 ${f(d.dcr)}`,
    '* output capacitor with ESR, load as a resistor (the output is negative)',
    `COUT out cesr ${f(d.cout.effective)} IC=${f(-p.vout)}`,
    `RESR cesr 0 ${f(d.cout.esr)}`,
    ...(io > 0 ? [`RLOAD out 0 ${f(p.vout / io)}`] : []),
    ...transientLines(fsw, ['v(out)'], opts),
  ];
  return lines.join('\n') + '\n';
}
