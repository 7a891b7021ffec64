/**
 * Synchronous boost in continuous conduction (forced PWM): the stage kind `boost`.
 *
 * Equations: Erickson & Maksimović, *Fundamentals of Power Electronics*, ch. 2 (boost
 * converter: volt-second balance on the inductor gives Vout/Vin = 1/(1 − D) ideally, with
 * losses D ≈ 1 − η·Vin/Vout; charge balance on the output capacitor gives the inductor
 * current IL = Iout/(1 − D); inductor ripple ΔIL = Vin·D/(L·fsw); output ripple
 * ΔVout ≈ Iout·D/(fsw·Cout) + ESR·Ipk; output-capacitor RMS current Iout·√(D/(1 − D))) and
 * ch. 8 (the right-half-plane zero of the control-to-output transfer function,
 * f_RHP = Vout·(1 − D)²/(2π·L·Iout), which limits the loop crossover). Loss terms are common
 * practice, each reported separately, as for the buck (stages/buck/index.ts).
 *
 * Switches: `lowSide` is the main (ground-referenced) switch, on for D·T; `highSide` is the
 * synchronous rectifier to the output, on for the rest of the period less two dead times,
 * during which its body diode carries the inductor current (or, when the current has
 * reversed at light load, the main switch's body diode does).
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

/** Boost controllers stop at a maximum duty of 0.8–0.9 [common practice]: 0.85 by default. */
export const BOOST_MAX_DUTY = 0.85;
/** Above this duty at Vin min the design warns (losses and the RHP zero grow fast). */
export const BOOST_DUTY_WARN = 0.8;
/** Crossover kept below f_RHP/5 [common practice, from memory]. */
export const RHP_CROSSOVER_SHARE = 0.2;

/** The fields every Boost design carries (registry.ts `designFields`). */
export function boostDesignFields(): DesignFields<BoostDesign> {
  return { ...switchingDesignFields(), kind: true, dcr: true, rhpZero: true, crossoverLimit: true };
}

export interface BoostDesign extends SwitchingDesignBase {
  kind: 'boost';
  /** Inductor winding resistance. */
  dcr: Ohms;
  /** Right-half-plane zero at Vin min and full load (Hz), and the crossover limit it sets. */
  rhpZero: number;
  crossoverLimit: number;
}

/** Internal numbers of one boost operating point, shared with the netlist writer. */
export interface BoostPoint {
  vout: number;
  io: number;
  duty: number;
  deadShare: number;
  rhs: number;
  rls: number;
  /** Average inductor (= input) current. */
  il: number;
  ripple: number;
  ipk: number;
  ivalley: number;
  irms: number;
  /** Switch-node voltage and body-diode drop in the dead time before the rectifier turns on (at ipk) and before the main switch turns on (at the valley). */
  vDead1: number;
  vDead2: number;
  vf1: number;
  vf2: number;
}

/**
 * Averaged model with the switch, winding and dead-time drops (Erickson & Maksimović ch. 3
 * style, extended by the dead times):
 *   volt-second on L:  Vin − IL·DCR = D·IL·Rls + (1 − D − δ)·(Vout + IL·Rhs) + (δ/2)·(v1 + v2)
 *   charge to output:  Iout = IL·(1 − D − δ) + (δ/2)·(i1·[v1 via the rectifier's diode] + i2·[…])
 * where v1, v2 are the switch node in the two dead times (Vout + Vf when the current is
 * positive and flows into the rectifier's body diode, −Vf when it has reversed and the main
 * switch's body diode takes it). Lossless parts give D = 1 − Vin/Vout exactly.
 */
export function boostPoint(d: BoostDesign, vin: number, io: number, vout = d.divider.vout): BoostPoint {
  const rhs = d.highSide.rdsOn * d.rdsHotFactor;
  const rls = d.lowSide.rdsOn * d.rdsHotFactor;
  const deadShare = 2 * d.controller.deadTime * d.fsw;
  const L = d.inductance as number;
  const fsw = d.fsw as number;
  let duty = Math.min(0.99, Math.max(0, 1 - vin / vout));
  let il = io / Math.max(1e-3, 1 - duty);
  let ripple = 0, v1 = vout, v2 = vout, vf1 = 0, vf2 = 0, via1 = 1, via2 = 1;
  for (let k = 0; k < 40; k++) {
    // ΔIL = Vin·D/(L·fsw)  [Erickson & Maksimović, ch. 2]
    ripple = (Math.max(0, vin) * Math.max(0, duty)) / (L * fsw);
    const i1 = il + ripple / 2; // at the end of the main switch's on-time
    const i2 = il - ripple / 2; // at the end of the rectifier's conduction
    via1 = i1 >= 0 ? 1 : 0;
    via2 = i2 >= 0 ? 1 : 0;
    vf1 = diodeVf(d.bodyDiode, Math.abs(i1));
    vf2 = diodeVf(d.bodyDiode, Math.abs(i2));
    v1 = via1 ? vout + vf1 : -vf1;
    v2 = via2 ? vout + vf2 : -vf2;
    // Charge balance, linear in IL: IL·(1 − D − δ + (δ/2)(via1 + via2)) + (δ/4)·ΔI·(via1 − via2) = Iout
    const share = 1 - duty - deadShare + (deadShare / 2) * (via1 + via2);
    const ilNext = (io - (deadShare / 4) * ripple * (via1 - via2)) / Math.max(1e-3, share);
    const dutyNext = ((1 - deadShare) * (vout + ilNext * rhs) + (deadShare / 2) * (v1 + v2) - vin + ilNext * d.dcr) / (vout + ilNext * rhs - ilNext * rls);
    const done = Math.abs(dutyNext - duty) < 1e-12 && Math.abs(ilNext - il) < 1e-12;
    duty = dutyNext;
    il = ilNext;
    if (done) break;
  }
  ripple = (Math.max(0, vin) * Math.max(0, duty)) / (L * fsw);
  const irms = Math.sqrt(il * il + (ripple * ripple) / 12);
  return {
    vout, io, duty, deadShare, rhs, rls, il, ripple, ipk: il + ripple / 2, ivalley: il - ripple / 2, irms,
    vDead1: v1, vDead2: v2, vf1, vf2,
  };
}

/** The operating point at a given duty (output below its setpoint): bisection on Vout. */
export function boostAtDuty(d: BoostDesign, vin: number, io: number, duty: number): BoostPoint {
  let lo = Math.max(1e-3, vin * 0.5);
  let hi = Math.max(lo * 2, (vin / Math.max(1e-3, 1 - duty)) * 1.5);
  for (let k = 0; k < 80 && hi - lo > 1e-9 * hi; k++) {
    const mid = (lo + hi) / 2;
    if (boostPoint(d, vin, io, mid).duty > duty) hi = mid;
    else lo = mid;
  }
  return boostPoint(d, vin, io, lo);
}

/** Output voltage of the stage at an input, a load and a setpoint (the windows use it). */
export function boostOutputAt(d: BoostDesign, vin: number, io: number, setpoint: number): { point: BoostPoint; regulated: boolean } {
  const wanted = boostPoint(d, vin, io, setpoint);
  if (wanted.duty > d.controller.maxDuty) return { point: boostAtDuty(d, vin, io, d.controller.maxDuty), regulated: false };
  if (!(wanted.duty > 0)) {
    // Input at or above the setpoint: the rectifier passes the input through (main switch off).
    const rhs = d.highSide.rdsOn * d.rdsHotFactor;
    const v = vin - io * (d.dcr + rhs);
    return { point: { ...boostPoint(d, vin, io, Math.max(v, 1e-3)), vout: v, duty: 0 }, regulated: false };
  }
  return { point: wanted, regulated: true };
}

export function evaluateBoost(d: BoostDesign, op: OperatingPoint): StageEvaluation {
  const vin = op.vin as number;
  const io = Math.max(0, (op.iout[0] ?? 0) as number);
  const wanted = boostPoint(d, vin, io);
  const { point: p } = boostOutputAt(d, vin, io, d.divider.vout);
  const { duty, deadShare, rhs, rls, ripple, irms, il } = p;
  const fsw = d.fsw as number;
  const td = d.controller.deadTime;
  const vo = p.vout;
  // Output-capacitor RMS: the capacitor carries IL − Iout while the rectifier conducts and
  // −Iout otherwise: I² = (1 − D)·(IL² + ΔI²/12) − Iout², which is Iout²·D/(1 − D) for a
  // small ripple  [Erickson & Maksimović, ch. 2; the textbook form is the ripple-free limit].
  const coutRms2 = Math.max(0, (1 - duty) * (il * il + (ripple * ripple) / 12) - io * io);
  const conductHs = Math.max(0, 1 - duty - deadShare);
  const loss: Record<string, number> = {
    'ls-conduction': irms * irms * rls * duty,
    'hs-conduction': irms * irms * rhs * conductHs,
    // The main switch switches the inductor current against Vout: ½·Vout·IL·(tr+tf)·fsw  [common practice]
    'ls-switching': 0.5 * vo * Math.abs(il) * (d.lowSide.tr + d.lowSide.tf) * fsw,
    'output-capacitance': 0.5 * (d.highSide.coss + d.lowSide.coss) * vo * vo * fsw,
    'dead-time': (p.vf1 * Math.abs(p.ipk) + p.vf2 * Math.abs(p.ivalley)) * td * fsw,
    'gate-drive': (d.highSide.qg + d.lowSide.qg) * d.controller.vDrive * fsw,
    'inductor-copper': irms * irms * d.dcr,
    'inductor-core': d.coreLossFraction * 0.5 * d.inductance * ripple * ripple * fsw,
    'output-capacitor-esr': coutRms2 * d.cout.esr,
    // The input current is the inductor current: the input capacitor carries its ripple.
    'input-capacitor-esr': ((ripple * ripple) / 12) * d.cin.esr,
    quiescent: vin * d.controller.iq,
  };
  const lossTotal = Object.values(loss).reduce((a, b) => a + b, 0);
  const pout = vo * io;
  const pin = pout + lossTotal;
  // ΔVout ≈ Iout·D/(fsw·Cout) + ESR·Ipk  [Erickson & Maksimović, ch. 2]
  const ripplePP = (io * duty) / (fsw * d.cout.effective) + d.cout.esr * Math.max(0, p.ipk);
  const ta = op.ambient as number;
  const parts = [
    ...switchingParts(d,
      loss['hs-conduction']! + loss['dead-time']! + loss['output-capacitance']! / 2,
      loss['ls-conduction']! + loss['ls-switching']! + loss['output-capacitance']! / 2,
      loss['gate-drive']! + loss.quiescent!, ta),
    part('inductor', loss['inductor-copper']! + loss['inductor-core']!, d.thetaJA.inductor, ta),
  ];
  const outputs = [{ nodeId: d.outputs[0]!.nodeId, voltage: vo as Volts, current: io as Amps, ripplePP: ripplePP as Volts }];
  const flags: StageFlag[] = [];
  if (!(wanted.duty > 0)) {
    flags.push(flag('input-above-output', 'error',
      `Vin ${r3(vin)} V is not below the ${r3(d.divider.vout)} V setpoint: a boost cannot step down, the output follows the input at ${r3(vo)} V`,
      { vin, setpoint: d.divider.vout, vout: r3(vo) }));
  } else {
    flags.push(...switchingFlags(d, vin, wanted.duty, p.ipk, p.ivalley));
    if (wanted.duty > BOOST_DUTY_WARN && wanted.duty <= d.controller.maxDuty) {
      flags.push(flag('high-duty', 'warning',
        `duty ${r3(wanted.duty)} at Vin ${r3(vin)} V is above ${BOOST_DUTY_WARN}: conduction losses and the right-half-plane zero limit the stage here`,
        { duty: r3(wanted.duty), warnAt: BOOST_DUTY_WARN, vin }));
    }
  }
  flags.push(...thermalFlags(parts, d.tjMax), ...rippleFlags(outputs, d.outputs));
  return {
    kind: 'boost',
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

/** f_RHP = Vout·(1 − D)²/(2π·L·Iout)  [Erickson & Maksimović, ch. 8]. */
export function rhpZero(vout: number, duty: number, L: number, iout: number): number {
  return (vout * (1 - duty) ** 2) / (2 * Math.PI * L * Math.max(iout, 1e-9));
}

type Result = { ok: true; design: BoostDesign; reasons: string[]; flags: StageFlag[] } | { ok: false; flags: StageFlag[] };

export function designBoost(spec: StageSpec): Result {
  const bad = specErrors(spec);
  if (bad.length) return { ok: false, flags: bad };
  if (spec.outputs.length !== 1) return { ok: false, flags: [flag('bad-input', 'error', `a boost has exactly one output (got ${spec.outputs.length})`, { field: 'outputs' })] };
  if (!(spec.vinMin > 0)) return { ok: false, flags: [flag('bad-input', 'error', `vinMin: a boost needs a positive input (got ${spec.vinMin})`, { field: 'vinMin' })] };
  const o = spec.outputs[0]!;
  const vout = o.voltage as number;
  const reasons: string[] = [];
  if (!(vout > 0)) return { ok: false, flags: [flag('negative-output', 'error', `a boost makes a positive output; ${vout} V needs an inverting stage`, { vout })] };
  if (vout * (1 - o.tolerance) <= spec.vinMax) {
    return { ok: false, flags: [flag('no-step-up', 'error', `output ${r3(vout)} V (−${r3(o.tolerance * 100)} %) is not above the highest input ${r3(spec.vinMax)} V: a boost cannot step down (a four-switch buck-boost can)`, { vout, vinMax: spec.vinMax })] };
  }
  const fsw = spec.fsw as number;
  const imax = Math.max(o.currentMax as number, 0.01);
  // Duty with an estimated 90 % efficiency: D = 1 − η·Vin/Vout  [Erickson & Maksimović, ch. 2]
  const etaGuess = 0.9;
  const dAt = (vin: number) => Math.max(0, 1 - (etaGuess * vin) / vout);
  const dMax = dAt(spec.vinMin);
  let ctl: ControllerParams = { ...GENERIC_DEFAULTS.controller, maxDuty: BOOST_MAX_DUTY };
  if (dMax > BOOST_MAX_DUTY) {
    return { ok: false, flags: [flag('max-duty', 'error', `duty ${r3(dMax)} at Vin min ${r3(spec.vinMin)} V for ${r3(vout)} V is above a boost's ${BOOST_MAX_DUTY} maximum: the step-up ratio ${r3(vout / spec.vinMin)} is too large for one stage`, { duty: r3(dMax), maxDuty: BOOST_MAX_DUTY, vinMin: spec.vinMin })] };
  }
  const ilMax = imax / (1 - dMax);
  // ΔIL = Vin·D/(L·fsw) is largest at Vin = Vout/2; take the worst input in the range.
  const vWorst = Math.min(spec.vinMax, Math.max(spec.vinMin, vout / 2));
  const target = GENERIC_DEFAULTS.rippleTarget;
  const rippleAt = (L: number, vin: number) => (vin * dAt(vin)) / (L * fsw);
  const lCalc = (vWorst * dAt(vWorst)) / (target * ilMax * fsw);
  let L = nearest('E12', lCalc);
  const lib = spec.library;
  let inductorPick: ReturnType<typeof chooseInductor> | null = null;
  const peakFor = (Lk: number) => Math.max(ilMax + rippleAt(Lk, spec.vinMin) / 2, imax / (1 - dAt(vWorst)) + rippleAt(Lk, vWorst) / 2);
  if (lib) {
    const chosen = chooseLibraryInductance(lib, L, peakFor);
    L = chosen.inductance;
    inductorPick = chosen.pick;
  }
  const ripple = rippleAt(L, vWorst);
  const ipk = peakFor(L);
  const isat = ipk * (1 + GENERIC_DEFAULTS.saturationMargin);
  const refs: StagePartRef[] = [];
  // The main switch is ground-referenced (the low side of the generic pair), the rectifier the high side.
  let highSide = { ...GENERIC_DEFAULTS.highSide };
  let lowSide = { ...GENERIC_DEFAULTS.lowSide };
  let rdsHotFactor: number = GENERIC_DEFAULTS.rdsHotFactor;
  let thetaJA: ThermalParams = { highSide: GENERIC_DEFAULTS.switchThetaJA, lowSide: GENERIC_DEFAULTS.switchThetaJA, controller: GENERIC_DEFAULTS.controllerThetaJA, inductor: GENERIC_DEFAULTS.inductorThetaJA };
  let integrated = false;
  let dcr = (GENERIC_DEFAULTS.inductorDcrCoeff * Math.sqrt(L / 1e-6)) / Math.sqrt(isat);
  // Both switches and the controller's switch pin see the output: rate them for Vout (+ tolerance).
  const vStress = vout * (1 + o.tolerance);
  if (lib) {
    const sw = chooseSwitcher(lib, { vinMin: spec.vinMin, vinMax: vStress, iNeed: ilMax, ipk, forcedPwm: false, topology: 'boost', ...(spec.margins ? { margins: spec.margins } : {}) });
    if ('problem' in sw) return { ok: false, flags: [flag('no-library-part', 'error', `${sw.problem} (a boost's switches see the output, ${r3(vStress)} V)`, { vStress: r3(vStress), current: r3(ilMax) })] };
    ({ controller: ctl, highSide, lowSide, rdsHotFactor, integrated } = sw);
    thetaJA = { ...sw.thetaJA, inductor: GENERIC_DEFAULTS.inductorThetaJA };
    refs.push(...sw.refs);
    reasons.push(`parts: ${sw.reason}`);
    const ind = inductorPick!;
    if ('problem' in ind) return { ok: false, flags: [flag('no-library-part', 'error', `${ind.problem} (nor a neighbouring E12 value)`, { inductance: L, isat })] };
    dcr = ind.dcr;
    refs.push(ind.ref);
    if (dMax > ctl.maxDuty) {
      return { ok: false, flags: [flag('max-duty', 'error', `duty ${r3(dMax)} at Vin min ${r3(spec.vinMin)} V is above the chosen controller's ${ctl.maxDuty} maximum`, { duty: r3(dMax), maxDuty: ctl.maxDuty })] };
    }
  }
  const divider = bestDivider(vout, ctl.vref);
  if (!divider) return { ok: false, flags: [flag('below-reference', 'error', `output ${r3(vout)} V is not above the ${ctl.vref} V reference`, { vout, vref: ctl.vref })] };
  reasons.push(`feedback divider ${divider.rTop} Ω / ${divider.rBottom} Ω (E96) gives ${r3(divider.vout)} V, error ${r3(divider.error * 100)} %`);
  reasons.push(`D = 1 − η·Vin/Vout: ${r3(dAt(spec.vinMax))} at Vin max … ${r3(dMax)} at Vin min (η ≈ ${etaGuess}); inductor current up to ${r3(ilMax)} A = Iout/(1 − D)`);
  reasons.push(`L = ${r3(L * 1e6)} µH (E12${lib ? ', offered by the library' : ''}) for ${r3((ripple / ilMax) * 100)} % ripple of ${r3(ilMax)} A at Vin ${r3(vWorst)} V, the input of largest ripple (calculated ${r3(lCalc * 1e6)} µH for ${target * 100} %)`);
  const rippleLimit = o.rippleLimit as number;
  // ΔV = Iout·D/(fsw·C) + ESR·Ipk  [Erickson & Maksimović] solved for C, at least 10 µF
  // [common practice]; the count and the bank's ESR depend on each other: iterate.
  let cout = chooseCeramic('output', 10e-6, vout * (1 + o.tolerance), spec.ceramicDerating);
  for (let k = 0; k < 6; k++) {
    const budget = Math.max(rippleLimit * 0.5 - ipk * cout.esr, rippleLimit * 0.1);
    const next = chooseCeramic('output', Math.max((imax * dMax) / (fsw * budget), 10e-6), vout * (1 + o.tolerance), spec.ceramicDerating);
    const same = next.count === cout.count && next.value === cout.value;
    cout = next;
    if (same) break;
  }
  // The input current is continuous: ΔVin = ΔIL/(8·fsw·Cin) ≤ 1 % of Vin min [common practice]
  const cinNeed = Math.max(ripple / (8 * fsw * 0.01 * spec.vinMin), 1e-6);
  let cin = chooseCeramic('input', cinNeed, spec.vinMax, spec.ceramicDerating);
  if (lib) {
    for (const which of ['cout', 'cin'] as const) {
      const pick = chooseCeramicRow(lib, which === 'cout' ? cout : cin);
      if (!pick) continue;
      if (which === 'cout') cout = pick.bank; else cin = pick.bank;
      refs.push(pick.ref);
    }
  }
  const coutRms = imax * Math.sqrt(dMax / (1 - dMax));
  reasons.push(`output capacitor ${cout.count} × ${r3(cout.value * 1e6)} µF ${cout.ratedVoltage} V ceramic (${r3(cout.effective * 1e6)} µF left at ${r3(vout)} V) for half the ${r3(rippleLimit * 1e3)} mV ripple limit; it carries the pulsed rectifier current, RMS up to ${r3(coutRms)} A (Iout·√(D/(1−D)))`);
  reasons.push(`input capacitor ${cin.count} × ${r3(cin.value * 1e6)} µF ${cin.ratedVoltage} V ceramic for 1 % input ripple (continuous input current, ΔIL ${r3(ripple)} A)`);
  const fz = rhpZero(vout, dMax, L, imax);
  const base: BoostDesign = {
    kind: 'boost',
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
  reasons.push(`right-half-plane zero at ${r3(fz / 1e3)} kHz (Vin min, full load: Vout·(1−D)²/(2π·L·Iout)); keep the loop crossover below ${r3(base.crossoverLimit / 1e3)} kHz`);
  // Light load: forced PWM keeps conduction continuous; below the boundary load the inductor
  // current reverses each cycle and circulates (no minimum load is needed).
  const nomPoint = boostPoint(base, spec.vinNom, 0);
  const boundary = ((1 - nomPoint.duty) * nomPoint.ripple) / 2;
  const noLoad = evaluateBoost(base, { vin: spec.vinNom, iout: [0 as Amps], ambient: spec.ambient });
  reasons.push(`light load: forced PWM stays in continuous conduction with no minimum load; below ${r3(boundary * 1e3)} mA (Vin ${r3(spec.vinNom)} V) the inductor current reverses each cycle, and at no load the stage still dissipates ${r3(noLoad.loss as number)} W`);
  const flags = feasibility(base, spec.ambient as number, [o.currentMax as number], (vin) => evaluateBoost(base, { vin: vin as Volts, iout: [o.currentMax], ambient: spec.ambient as Celsius }));
  if (flags.some((x) => x.severity === 'error')) return { ok: false, flags };
  return { ok: true, design: base, reasons, flags };
}

/** Output windows at one corner: DC (setpoint-dependent) ∓ half the ripple. */
export function boostWindowAt(d: BoostDesign, vin: number, io: number, setpoint: number): { lo: number; hi: number } {
  const { point } = boostOutputAt(d, vin, io, setpoint);
  const ev = evaluateBoost(d, { vin: vin as Volts, iout: [io as Amps], ambient: 25 as Celsius });
  const rp = ev.outputs[0]!.ripplePP as number;
  return { lo: point.vout - rp / 2, hi: point.vout + rp / 2 };
}

/**
 * The output at one window corner (windows.ts): setpoint from reference and divider; out of
 * regulation (duty limit, or an input above the setpoint) the output follows the input.
 */
export function boostWindowOutputs(d: BoostDesign, vin: number, iout: number[], x: ToleranceDraw): OutputSpan[] {
  return [boostWindowAt(d, vin, iout[0] ?? 0, setpoint(d.divider, d.controller.vrefTolerance, x))];
}

/** The parts of a boost for the BOM, in the shape of library.ts `partsForStage`. */
export function boostParts(stageId: string, d: BoostDesign, library: LibraryRow[], opts: Partial<PickOptions> = {}): PartPick[] {
  const vStress = (d.outputs[0]!.voltage as number) * (1 + d.outputs[0]!.tolerance);
  // Inductor (switch) current at Vin min: Iout/(1 − D) with D = 1 − Vin/Vout.
  const il = ((d.outputs[0]!.currentMax as number) * d.divider.vout) / d.vinMin;
  return inductorStageParts(stageId, d, library, opts, { vRating: vStress, iNeed: il, topology: 'boost' });
}

/**
 * Open-loop ngspice netlist of the boost at the duty the engine computes: the main switch and
 * the synchronous rectifier as voltage-controlled switches with their hot on-resistance and
 * body diodes, PULSE drives with the dead time, the inductor with its DCR, the output
 * capacitor with its ESR, the load as a resistor. Not modelled: switching overlap, Coss,
 * gate drive, core and quiescent losses, the input capacitor (an ideal input source).
 */
export function boostNetlist(d: BoostDesign, op: OperatingPoint, opts: { stopTime?: number; measureCycles?: number; maxStep?: number } = {}): string {
  const vin = op.vin as number;
  const io = Math.max(0, (op.iout[0] ?? 0) as number);
  const { point: p } = boostOutputAt(d, vin, io, d.divider.vout);
  const fsw = d.fsw as number;
  const T = 1 / fsw;
  const edge = 1e-9;
  const dead = d.controller.deadTime;
  const ton = p.duty * T;
  const trec = (1 - p.duty) * T - 2 * dead;
  if (!(ton > 2 * edge) || !(trec > 2 * edge)) throw new RangeError(`duty ${p.duty} leaves no room for both switches at ${fsw} Hz`);
  const o = d.outputs[0]!;
  const lines = [
    '* Railwright open-loop netlist: synchronous boost stage',
    `* output: v_out0 = ${commentText(o.nodeId)} (${f(o.voltage)} V)`,
    `* Vin ${f(vin)} V, duty ${p.duty.toFixed(5)} (computed by the stage engine)`,
    ...NETLIST_CAUTION,
    `VIN vin 0 DC ${f(vin)}`,
    '* inductor with its winding resistance, from the input to the switch node',
    `L1 vin lx ${f(d.inductance)} IC=${f(p.ivalley)}`,
    `RL1 lx sw ${f(d.dcr)}`,
    '* gate drives: main switch on for D·T, rectifier after the dead time',
    `VGM gm 0 PULSE(0 1 0 ${f(edge)} ${f(edge)} ${f(ton - edge)} ${f(T)})`,
    `VGR gr 0 PULSE(0 1 ${f(ton + dead)} ${f(edge)} ${f(edge)} ${f(trec - edge)} ${f(T)})`,
    'SMAIN sw 0 gm 0 SWMAIN',
    'SREC sw out gr 0 SWREC',
    `.model SWMAIN SW(VT=0.5 VH=0.1 RON=${f(p.rls)} ROFF=1e7)`,
    `.model SWREC SW(VT=0.5 VH=0.1 RON=${f(p.rhs)} ROFF=1e7)`,
    '* body diodes',
    'DBM 0 sw DBODY',
    'DBR sw out DBODY',
    `.model DBODY D(IS=${f(d.bodyDiode.is)} N=${f(d.bodyDiode.n)} RS=${f(d.bodyDiode.rs)})`,
    '* output capacitor with ESR, load as a resistor',
    `COUT out cesr ${f(d.cout.effective)} IC=${f(p.vout)}`,
    `RESR cesr 0 ${f(d.cout.esr)}`,
    ...(io > 0 ? [`RLOAD out 0 ${f(p.vout / io)}`] : []),
    ...transientLines(fsw, ['v(out)'], opts),
  ];
  return lines.join('\n') + '\n';
}
