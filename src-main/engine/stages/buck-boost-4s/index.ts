/**
 * Four-switch (non-inverting) buck-boost in continuous conduction, forced PWM: the stage kind
 * `buck-boost-4s`. One inductor between two switching legs: the input leg (switch A from the
 * input to node 1, B from node 1 to ground) and the output leg (C from node 2 to ground, D from
 * node 2 to the output).
 *
 * Regions across the input range (Erickson & Maksimović, *Fundamentals of Power Electronics*,
 * ch. 2, volt-second and charge balance of the buck and the boost; the transition band and
 * its limits are common practice, from memory):
 * - buck: Vout/Vin ≤ the input leg's largest duty (0.9): D stays on, C off; Db = Vout/Vin,
 *   IL = Iout, ΔIL = (Vin − Vout)·Db/(L·fsw);
 * - boost: 1 − Vin/Vout ≥ the output leg's smallest duty (0.1): A stays on, B off;
 *   Dc = 1 − Vin/Vout, IL = Iout/(1 − Dc), ΔIL = Vin·Dc/(L·fsw);
 * - transition (between the two): both legs switch, the input leg at its largest duty and the
 *   output leg making up the rest, Vout = Vin·Db/(1 − Dc): both legs' switching, Coss, dead-time
 *   and gate-drive losses add up there (the extra loss of the band).
 */
import type { Amps, Celsius, Henries, Ohms, Ratio, Volts, Watts } from '../../units.ts';
import type { DesignFields, DissipatingPart, OperatingPoint, StageEvaluation, StageFlag, StageSpec } from '../types.ts';
import { bestDivider, nearest } from '../../eseries.ts';
import { GENERIC_DEFAULTS, diodeVf, type ControllerParams } from '../defaults.ts';
import { chooseCeramic, flag, part, r3, rippleFlags, thermalFlags } from '../common.ts';
import { chooseCeramicRow, chooseInductor, chooseLibraryInductance, chooseSwitcher, type StagePartRef } from '../part-choice.ts';
import { feasibility, specErrors, switchingDesignFields, thetaSourceOf, type SwitchingDesignBase, type ThermalParams } from '../buck/index.ts';
import { NETLIST_CAUTION, commentText, spiceNumber as f, transientLines } from '../netlist-text.ts';
import { inductorStageParts, type LibraryRow, type PartPick, type PickOptions } from '../../library.ts';
import { setpoint, type OutputSpan, type ToleranceDraw } from '../window-cases.ts';

/** Largest duty of the input leg before the output leg starts switching [common practice, from memory]. */
export const INPUT_LEG_MAX_DUTY = 0.9;
/** Smallest duty of the output leg in the boost region [common practice, from memory]. */
export const OUTPUT_LEG_MIN_DUTY = 0.1;
/** Largest output-leg duty [common practice 0.8–0.9]. */
export const OUTPUT_LEG_MAX_DUTY = 0.85;

export type BuckBoostRegion = 'buck' | 'transition' | 'boost';

/** The fields every FourSwitch design carries (registry.ts `designFields`). */
export function fourSwitchDesignFields(): DesignFields<FourSwitchDesign> {
  return { ...switchingDesignFields(), kind: true, dcr: true, transitionBand: true, rhpZero: true };
}

export interface FourSwitchDesign extends SwitchingDesignBase {
  kind: 'buck-boost-4s';
  dcr: Ohms;
  /** Input voltages bounding the transition band (boost below the first, buck above the second). */
  transitionBand: [number, number];
  /** Right-half-plane zero at Vin min and full load when that is in the boost region (Hz), else null. */
  rhpZero: number | null;
}

export interface FourSwitchPoint {
  region: BuckBoostRegion;
  vout: number;
  io: number;
  /** Input-leg duty (A on) and output-leg duty (C on). */
  db: number;
  dc: number;
  deadShare: number;
  ra: number; rb: number; rc: number; rd: number;
  il: number;
  ripple: number;
  ipk: number;
  ivalley: number;
  irms: number;
  vf: number;
}

/** The region of an input by the ideal duties (the evaluation decides with the drops). */
export function regionOf(vin: number, vout: number): BuckBoostRegion {
  if (vout / vin <= INPUT_LEG_MAX_DUTY) return 'buck';
  if (1 - vin / vout >= OUTPUT_LEG_MIN_DUTY) return 'boost';
  return 'transition';
}

/**
 * Averaged model with drops. Input-leg node average X and output-leg node average Y:
 *   X = Db·(Vin − IL·Ra) − (1 − Db − δ)·IL·Rb − δ·Vf     (A on always in the boost region: X = Vin − IL·Ra)
 *   Y = Dc·IL·Rc + (1 − Dc)·Vout + (1 − Dc − δ)·IL·Rd + δ·Vf   (D on always in the buck region: Y = Vout + IL·Rd)
 *   X − Y = IL·DCR (volt-second), Iout = IL·(1 − Dc) (charge; the dead-time diode also feeds the output)
 * with the body diodes carrying the dead times (current assumed positive there).
 */
export function fourSwitchPoint(d: FourSwitchDesign, vin: number, io: number, vout = d.divider.vout, forceDc?: number): FourSwitchPoint {
  if (forceDc !== undefined) return pointIn(d, 'boost', vin, io, vout, forceDc);
  // The region follows the duties with the drops: buck while the input leg's duty stays at or
  // below its largest; boost while the output leg's duty (input leg on) stays at or above its
  // smallest; the transition (both legs switching) in between.
  const buck = pointIn(d, 'buck', vin, io, vout);
  if (buck.db <= INPUT_LEG_MAX_DUTY) return buck;
  const boost = pointIn(d, 'boost', vin, io, vout);
  if (boost.dc >= OUTPUT_LEG_MIN_DUTY) return boost;
  return pointIn(d, 'transition', vin, io, vout);
}

function pointIn(d: FourSwitchDesign, region: BuckBoostRegion, vin: number, io: number, vout: number, forceDc?: number): FourSwitchPoint {
  const hot = d.rdsHotFactor;
  const ra = d.highSide.rdsOn * hot, rd = d.highSide.rdsOn * hot, rb = d.lowSide.rdsOn * hot, rc = d.lowSide.rdsOn * hot;
  const delta = 2 * d.controller.deadTime * d.fsw;
  const L = d.inductance as number, fsw = d.fsw as number;
  let db = region === 'buck' ? vout / vin : region === 'transition' ? INPUT_LEG_MAX_DUTY : 1;
  let dc = region === 'buck' ? 0 : forceDc ?? Math.max(0, 1 - (db * vin) / vout);
  let il = io / (1 - dc);
  let vf = 0;
  let ripple = 0;
  for (let k = 0; k < 40; k++) {
    vf = diodeVf(d.bodyDiode, Math.abs(il));
    const bDelta = region === 'boost' ? 0 : delta;
    const cDelta = region === 'buck' ? 0 : delta;
    if (region === 'buck') {
      il = io;
      const y = vout + il * rd;
      db = (y + il * d.dcr + (1 - bDelta) * il * rb + bDelta * vf) / (vin - il * ra + il * rb);
    } else {
      const x = region === 'boost' ? vin - il * ra : db * (vin - il * ra) - (1 - db - bDelta) * il * rb - bDelta * vf;
      if (forceDc === undefined) {
        dc = (vout + (1 - cDelta) * il * rd + cDelta * vf + il * d.dcr - x) / (vout + il * rd - il * rc);
      }
      il = io / Math.max(1e-3, 1 - dc);
    }
  }
  // Ripple from the inductor voltage in each sub-interval, edges aligned at the start of the period.
  if (region === 'buck') ripple = ((vin - vout) * db) / (L * fsw);
  else if (region === 'boost') ripple = (vin * dc) / (L * fsw);
  else {
    const rise1 = vin * dc;
    const rise2 = rise1 + (vin - vout) * (db - dc);
    ripple = Math.max(rise1, rise2) / (L * fsw);
  }
  const irms = Math.sqrt(il * il + (ripple * ripple) / 12);
  return { region, vout, io, db, dc, deadShare: delta, ra, rb, rc, rd, il, ripple, ipk: il + ripple / 2, ivalley: il - ripple / 2, irms, vf };
}

/** Output at a setpoint; past the output leg's largest duty the output falls (bisection on Vout). */
export function fourSwitchOutputAt(d: FourSwitchDesign, vin: number, io: number, setpoint: number): FourSwitchPoint {
  const p = fourSwitchPoint(d, vin, io, setpoint);
  if (p.dc <= d.controller.maxDuty) return p;
  return fourSwitchPoint(d, vin, io, boostVoutAtDc(d, vin, io, d.controller.maxDuty), d.controller.maxDuty);
}

function boostVoutAtDc(d: FourSwitchDesign, vin: number, io: number, dc: number): number {
  // With the output leg held at dc, the output satisfies X − Y = IL·DCR; bisect on Vout.
  let lo = 1e-3, hi = (vin / (1 - dc)) * 1.5;
  for (let k = 0; k < 80 && hi - lo > 1e-9 * hi; k++) {
    const mid = (lo + hi) / 2;
    if (fourSwitchPoint(d, vin, io, mid).dc > dc) hi = mid;
    else lo = mid;
  }
  return lo;
}

export function evaluateFourSwitch(d: FourSwitchDesign, op: OperatingPoint): StageEvaluation {
  const vin = op.vin as number;
  const io = Math.max(0, (op.iout[0] ?? 0) as number);
  const wanted = fourSwitchPoint(d, vin, io);
  const p = fourSwitchOutputAt(d, vin, io, d.divider.vout);
  const { region, db, dc, deadShare, ra, rb, rc, rd, il, ripple, irms, vf } = p;
  const fsw = d.fsw as number;
  const td = d.controller.deadTime;
  const vo = p.vout;
  const inLeg = region !== 'boost';
  const outLeg = region !== 'buck';
  const i2 = irms * irms;
  const deadLeg = vf * (Math.abs(p.ipk) + Math.abs(p.ivalley)) * td * fsw;
  // Output capacitor: pulsed when the output leg switches, else the inductor ripple  [Erickson & Maksimović]
  const cossIn = inLeg ? 0.5 * (d.highSide.coss + d.lowSide.coss) * vin * vin * fsw : 0;
  const cossOut = outLeg ? 0.5 * (d.highSide.coss + d.lowSide.coss) * vo * vo * fsw : 0;
  const coutRms2 = outLeg ? Math.max(0, (1 - dc) * (il * il + (ripple * ripple) / 12) - io * io) : (ripple * ripple) / 12;
  // Input capacitor: pulsed when the input leg switches, else the inductor ripple
  const cinRms2 = inLeg ? Math.max(0, db * (il * il + (ripple * ripple) / 12) - (db * il) ** 2) : (ripple * ripple) / 12;
  const loss: Record<string, number> = {
    'a-conduction': i2 * ra * db,
    'b-conduction': inLeg ? i2 * rb * Math.max(0, 1 - db - deadShare) : 0,
    'c-conduction': outLeg ? i2 * rc * dc : 0,
    'd-conduction': outLeg ? i2 * rd * Math.max(0, 1 - dc - deadShare) : i2 * rd,
    // ½·V·IL·(tr+tf)·fsw for each switching leg  [common practice]
    'input-leg-switching': inLeg ? 0.5 * vin * Math.abs(il) * (d.highSide.tr + d.highSide.tf) * fsw : 0,
    'output-leg-switching': outLeg ? 0.5 * vo * Math.abs(il) * (d.lowSide.tr + d.lowSide.tf) * fsw : 0,
    'output-capacitance': cossIn + cossOut,
    'dead-time': (inLeg ? deadLeg : 0) + (outLeg ? deadLeg : 0),
    'gate-drive': ((inLeg ? 1 : 0) + (outLeg ? 1 : 0)) * (d.highSide.qg + d.lowSide.qg) * d.controller.vDrive * fsw,
    'inductor-copper': i2 * d.dcr,
    'inductor-core': d.coreLossFraction * 0.5 * d.inductance * ripple * ripple * fsw,
    'output-capacitor-esr': coutRms2 * d.cout.esr,
    'input-capacitor-esr': cinRms2 * d.cin.esr,
    quiescent: vin * d.controller.iq,
  };
  const lossTotal = Object.values(loss).reduce((a, b) => a + b, 0);
  const pout = vo * io;
  const pin = pout + lossTotal;
  const ripplePP = outLeg
    ? (io * dc) / (fsw * d.cout.effective) + d.cout.esr * Math.max(0, p.ipk) // boost: Iout·D/(fsw·C) + ESR·Ipk
    : ripple * d.cout.esr + ripple / (8 * fsw * d.cout.effective); // buck: ΔI·ESR + ΔI/(8·fsw·C)
  const ta = op.ambient as number;
  const src = thetaSourceOf(d);
  // Each leg's Coss loss is shared by its two switches; its dead time is spent in the lower-side body diode of the pair.
  const pa = loss['a-conduction']! + loss['input-leg-switching']! + cossIn / 2;
  const pb = loss['b-conduction']! + (inLeg ? deadLeg : 0) + cossIn / 2;
  const pc = loss['c-conduction']! + loss['output-leg-switching']! + cossOut / 2;
  const pd = loss['d-conduction']! + (outLeg ? deadLeg : 0) + cossOut / 2;
  const pctl = loss['gate-drive']! + loss.quiescent!;
  const parts: DissipatingPart[] = d.integrated
    ? [part('regulator (integrated switches)', pa + pb + pc + pd + pctl, d.thetaJA.controller, ta, src)]
    : [
        part('switch A (input high side)', pa, d.thetaJA.highSide, ta, src),
        part('switch B (input low side)', pb, d.thetaJA.lowSide, ta, src),
        part('switch C (output low side)', pc, d.thetaJA.lowSide, ta, src),
        part('switch D (output high side)', pd, d.thetaJA.highSide, ta, src),
        part('controller', pctl, d.thetaJA.controller, ta, src),
      ];
  parts.push(part('inductor', loss['inductor-copper']! + loss['inductor-core']!, d.thetaJA.inductor, ta));
  const outputs = [{ nodeId: d.outputs[0]!.nodeId, voltage: vo as Volts, current: io as Amps, ripplePP: ripplePP as Volts }];
  const flags: StageFlag[] = [];
  if (wanted.dc > d.controller.maxDuty) {
    flags.push(flag('max-duty', 'error', `output-leg duty ${r3(wanted.dc)} at Vin ${r3(vin)} V is above the ${d.controller.maxDuty} maximum: the input is too low for this output`, { duty: r3(wanted.dc), maxDuty: d.controller.maxDuty, vin }));
  }
  // In the transition band the output leg runs at duties down to zero by design; the minimum
  // on-time applies to the leg that regulates in the buck and boost regions.
  const ton = (region === 'buck' ? db : dc) / fsw;
  if (region !== 'transition' && ton < d.controller.minOnTime) {
    flags.push(flag('min-on-time', 'error', `on-time ${r3(ton * 1e9)} ns at Vin ${r3(vin)} V is below the controller's minimum ${r3(d.controller.minOnTime * 1e9)} ns: lower fsw`, { onTime: ton, minOnTime: d.controller.minOnTime, vin }));
  }
  if (p.ipk > d.isat) flags.push(flag('saturation', 'error', `peak current ${r3(p.ipk)} A exceeds the magnetic's saturation rating ${r3(d.isat)} A`, { ipk: r3(p.ipk), isat: r3(d.isat) }));
  if (p.ivalley < -d.controller.negCurrentLimit) flags.push(flag('negative-peak', 'error', `negative inductor peak ${r3(p.ivalley)} A is beyond the controller's limit −${r3(d.controller.negCurrentLimit)} A`, { negativePeak: r3(p.ivalley) }));
  if (region === 'transition') {
    flags.push(flag('transition-band', 'warning', `Vin ${r3(vin)} V: both legs switch, between the buck and boost regions (about ${r3(d.transitionBand[0])}…${r3(d.transitionBand[1])} V by the ideal duties, widened by the drops): ${r3((loss['input-leg-switching']! + loss['output-leg-switching']! + loss['gate-drive']! + loss['output-capacitance']!) * 1e3)} mW of switching, Coss and gate losses`, { vin, bandLow: r3(d.transitionBand[0]), bandHigh: r3(d.transitionBand[1]) }));
  }
  flags.push(...thermalFlags(parts, d.tjMax), ...rippleFlags(outputs, d.outputs));
  return {
    kind: 'buck-boost-4s',
    vin: vin as Volts, iin: (pin / vin) as Amps, pin: pin as Watts, pout: pout as Watts, loss: lossTotal as Watts,
    efficiency: (pin > 0 ? pout / pin : 0) as Ratio,
    duty: (region === 'buck' ? db : dc) as Ratio,
    lossBreakdown: loss as Record<string, Watts>,
    parts, outputs, flags,
  };
}

type Result = { ok: true; design: FourSwitchDesign; reasons: string[]; flags: StageFlag[] } | { ok: false; flags: StageFlag[] };

export function designFourSwitch(spec: StageSpec): Result {
  const bad = specErrors(spec);
  if (bad.length) return { ok: false, flags: bad };
  if (spec.outputs.length !== 1) return { ok: false, flags: [flag('bad-input', 'error', `a four-switch buck-boost has exactly one output (got ${spec.outputs.length})`, { field: 'outputs' })] };
  if (!(spec.vinMin > 0)) return { ok: false, flags: [flag('bad-input', 'error', `vinMin: a four-switch buck-boost needs a positive input (got ${spec.vinMin})`, { field: 'vinMin' })] };
  const o = spec.outputs[0]!;
  const vout = o.voltage as number;
  if (!(vout > 0)) return { ok: false, flags: [flag('negative-output', 'error', `a four-switch buck-boost makes a positive output; ${vout} V needs an inverting stage`, { vout })] };
  const reasons: string[] = [];
  const fsw = spec.fsw as number;
  const imax = Math.max(o.currentMax as number, 0.01);
  const etaGuess = 0.9;
  const dcAt = (vin: number) => (regionOf(vin, vout) === 'boost' ? 1 - (etaGuess * vin) / vout : regionOf(vin, vout) === 'transition' ? Math.max(0, 1 - (INPUT_LEG_MAX_DUTY * etaGuess * vin) / vout) : 0);
  const dcMax = dcAt(spec.vinMin);
  let ctl: ControllerParams = { ...GENERIC_DEFAULTS.controller, maxDuty: OUTPUT_LEG_MAX_DUTY };
  if (dcMax > OUTPUT_LEG_MAX_DUTY) {
    return { ok: false, flags: [flag('max-duty', 'error', `output-leg duty ${r3(dcMax)} at Vin min ${r3(spec.vinMin)} V for ${r3(vout)} V is above the ${OUTPUT_LEG_MAX_DUTY} maximum: the step-up ratio ${r3(vout / spec.vinMin)} is too large`, { duty: r3(dcMax), maxDuty: OUTPUT_LEG_MAX_DUTY })] };
  }
  const band: [number, number] = [vout * (1 - OUTPUT_LEG_MIN_DUTY), vout / INPUT_LEG_MAX_DUTY];
  const ilMax = imax / (1 - dcMax);
  // Ripple: the buck region at Vin max and the boost region at Vin min bound it.
  const rippleAt = (L: number, vin: number) => {
    const r = regionOf(vin, vout);
    if (r === 'buck') return ((vin - vout) * (vout / vin)) / (L * fsw);
    return (vin * dcAt(vin)) / (L * fsw) + (r === 'transition' ? (Math.max(0, vin - vout) * (INPUT_LEG_MAX_DUTY - dcAt(vin))) / (L * fsw) : 0);
  };
  const probe = [spec.vinMin, spec.vinNom, spec.vinMax, ...band.filter((v) => v > spec.vinMin && v < spec.vinMax)];
  const target = GENERIC_DEFAULTS.rippleTarget;
  const lCalc = Math.max(...probe.map((v) => rippleAt(1, v) / (target * (imax / (1 - dcAt(v))))));
  let L = nearest('E12', lCalc);
  const peakFor = (Lk: number) => Math.max(...probe.map((v) => imax / (1 - dcAt(v)) + rippleAt(Lk, v) / 2));
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
  const vStress = Math.max(spec.vinMax, vout * (1 + o.tolerance));
  if (lib) {
    const sw = chooseSwitcher(lib, { vinMin: spec.vinMin, vinMax: vStress, iNeed: ilMax, ipk, forcedPwm: false, topology: 'buck-boost-4s', ...(spec.margins ? { margins: spec.margins } : {}) });
    if ('problem' in sw) return { ok: false, flags: [flag('no-library-part', 'error', `${sw.problem} (the legs see the larger of Vin max and Vout, ${r3(vStress)} V)`, { vStress: r3(vStress), current: r3(ilMax) })] };
    ({ controller: ctl, highSide, lowSide, rdsHotFactor, integrated } = sw);
    thetaJA = { ...sw.thetaJA, inductor: GENERIC_DEFAULTS.inductorThetaJA };
    refs.push(...sw.refs);
    reasons.push(`parts: ${sw.reason}${sw.integrated ? '' : ' (four switches: the pair is used twice)'}`);
    const ind = inductorPick!;
    if ('problem' in ind) return { ok: false, flags: [flag('no-library-part', 'error', `${ind.problem} (nor a neighbouring E12 value)`, { inductance: L, isat })] };
    dcr = ind.dcr;
    refs.push(ind.ref);
    if (dcMax > ctl.maxDuty) return { ok: false, flags: [flag('max-duty', 'error', `output-leg duty ${r3(dcMax)} at Vin min ${r3(spec.vinMin)} V is above the chosen controller's ${ctl.maxDuty} maximum`, { duty: r3(dcMax), maxDuty: ctl.maxDuty })] };
  }
  const divider = bestDivider(vout, ctl.vref);
  if (!divider) return { ok: false, flags: [flag('below-reference', 'error', `output ${r3(vout)} V is not above the ${ctl.vref} V reference`, { vout, vref: ctl.vref })] };
  reasons.push(`feedback divider ${divider.rTop} Ω / ${divider.rBottom} Ω (E96) gives ${r3(divider.vout)} V, error ${r3(divider.error * 100)} %`);
  const regions = [spec.vinMin, spec.vinMax].map((v) => `${regionOf(v, vout)} at ${r3(v)} V`).join(', ');
  reasons.push(`regions: ${regions}; boost below about ${r3(band[0])} V, buck above about ${r3(band[1])} V (ideal duties; the drops move the edges a little), both legs switching in between (input-leg duty ≤ ${INPUT_LEG_MAX_DUTY}, output-leg duty ≥ ${OUTPUT_LEG_MIN_DUTY})`);
  reasons.push(`L = ${r3(L * 1e6)} µH (E12${lib ? ', offered by the library' : ''}) for at most ${target * 100} % ripple over the range (calculated ${r3(lCalc * 1e6)} µH); inductor current up to ${r3(ilMax)} A (Iout in buck, Iout/(1 − D) in boost)`);
  const rippleLimit = o.rippleLimit as number;
  let cout = chooseCeramic('output', 10e-6, vout * (1 + o.tolerance), spec.ceramicDerating);
  for (let k = 0; k < 6; k++) {
    const budget = Math.max(rippleLimit * 0.5 - ipk * cout.esr, rippleLimit * 0.1);
    const need = Math.max((imax * Math.max(dcMax, OUTPUT_LEG_MIN_DUTY)) / (fsw * budget), 10e-6);
    const next = chooseCeramic('output', need, vout * (1 + o.tolerance), spec.ceramicDerating);
    const same = next.count === cout.count && next.value === cout.value;
    cout = next;
    if (same) break;
  }
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
  reasons.push(`output capacitor ${cout.count} × ${r3(cout.value * 1e6)} µF ${cout.ratedVoltage} V ceramic; input capacitor ${cin.count} × ${r3(cin.value * 1e6)} µF ${cin.ratedVoltage} V ceramic`);
  const boostAtMin = regionOf(spec.vinMin, vout) === 'boost';
  const fz = boostAtMin ? (vout * (1 - dcMax) ** 2) / (2 * Math.PI * L * imax) : null;
  if (fz !== null) reasons.push(`right-half-plane zero at ${r3(fz / 1e3)} kHz in the boost region (Vin min, full load); keep the loop crossover below ${r3(fz / 5e3)} kHz`);
  const design: FourSwitchDesign = {
    kind: 'buck-boost-4s',
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
    transitionBand: band,
    rhpZero: fz,
  };
  const flags = feasibility(design, spec.ambient as number, [o.currentMax as number], (vin) => evaluateFourSwitch(design, { vin: vin as Volts, iout: [o.currentMax], ambient: spec.ambient as Celsius }));
  if (flags.some((x) => x.severity === 'error')) return { ok: false, flags };
  return { ok: true, design, reasons, flags };
}

export function fourSwitchWindowAt(d: FourSwitchDesign, vin: number, io: number, setpoint: number): { lo: number; hi: number } {
  const p = fourSwitchOutputAt(d, vin, io, setpoint);
  const ev = evaluateFourSwitch(d, { vin: vin as Volts, iout: [io as Amps], ambient: 25 as Celsius });
  const rp = ev.outputs[0]!.ripplePP as number;
  return { lo: p.vout - rp / 2, hi: p.vout + rp / 2 };
}

/** The output at one window corner (windows.ts): the setpoint from reference and divider. */
export function fourSwitchWindowOutputs(d: FourSwitchDesign, vin: number, iout: number[], x: ToleranceDraw): OutputSpan[] {
  return [fourSwitchWindowAt(d, vin, iout[0] ?? 0, setpoint(d.divider, d.controller.vrefTolerance, x))];
}

/** BOM parts (library.ts `partsForStage` shape); with external switches each of the pair counts twice. */
export function fourSwitchParts(stageId: string, d: FourSwitchDesign, library: LibraryRow[], opts: Partial<PickOptions> = {}): PartPick[] {
  const o = d.outputs[0]!;
  const vStress = Math.max(d.vinMax, (o.voltage as number) * (1 + o.tolerance));
  const il = (o.currentMax as number) * Math.max(1, (o.voltage as number) / d.vinMin);
  return inductorStageParts(stageId, d, library, opts, { vRating: vStress, iNeed: il, topology: 'buck-boost-4s' })
    .map((p) => (p.prefix === 'Q' ? { ...p, role: p.role === 'high-side switch' ? 'high-side switches (A, D)' : 'low-side switches (B, C)', quantity: p.quantity * 2 } : p));
}

/**
 * Open-loop ngspice netlist at the region and duties the engine computes: four
 * voltage-controlled switches with hot Rds(on) and body diodes, a leg that does not switch
 * held in its state (A on in boost, D on in buck), dead times, the inductor with its DCR,
 * output capacitor with ESR, resistive load. Not modelled: switching overlap, Coss, gate
 * drive, core and quiescent losses, the input capacitor.
 */
export function fourSwitchNetlist(d: FourSwitchDesign, op: OperatingPoint, opts: { stopTime?: number; measureCycles?: number; maxStep?: number } = {}): string {
  const vin = op.vin as number;
  const io = Math.max(0, (op.iout[0] ?? 0) as number);
  const p = fourSwitchOutputAt(d, vin, io, d.divider.vout);
  const fsw = d.fsw as number;
  const T = 1 / fsw;
  const e = 1e-9;
  const dead = d.controller.deadTime;
  const o = d.outputs[0]!;
  const legDrive = (hi: string, lo: string, duty: number): string[] => {
    const ton = duty * T, toff = (1 - duty) * T - 2 * dead;
    if (!(ton > 2 * e) || !(toff > 2 * e)) throw new RangeError(`duty ${duty} leaves no room for both switches at ${fsw} Hz`);
    return [
      `V${hi} ${hi} 0 PULSE(0 1 0 ${f(e)} ${f(e)} ${f(ton - e)} ${f(T)})`,
      `V${lo} ${lo} 0 PULSE(0 1 ${f(ton + dead)} ${f(e)} ${f(e)} ${f(toff - e)} ${f(T)})`,
    ];
  };
  const lines = [
    '* Railwright open-loop netlist: four-switch buck-boost stage',
    `* output: v_out0 = ${commentText(o.nodeId)} (${f(o.voltage)} V)`,
    `* Vin ${f(vin)} V, ${p.region} region, input-leg duty ${p.db.toFixed(5)}, output-leg duty ${p.dc.toFixed(5)} (computed by the stage engine)`,
    ...NETLIST_CAUTION,
    `VIN vin 0 DC ${f(vin)}`,
    '* input leg: A from the input to n1, B from n1 to ground',
    ...(p.region === 'boost' ? ['VGA ga 0 DC 1', 'VGB gb 0 DC 0'] : legDrive('ga', 'gb', p.db)),
    '* output leg: C from n2 to ground (the main boost switch), D from n2 to the output',
    ...(p.region === 'buck' ? ['VGC gc 0 DC 0', 'VGD gd 0 DC 1'] : legDrive('gc', 'gd', p.dc)),
    'SA vin n1 ga 0 SWHI',
    'SB n1 0 gb 0 SWLO',
    'SC n2 0 gc 0 SWLO',
    'SD n2 out gd 0 SWHI',
    `.model SWHI SW(VT=0.5 VH=0.1 RON=${f(p.ra)} ROFF=1e7)`,
    `.model SWLO SW(VT=0.5 VH=0.1 RON=${f(p.rb)} ROFF=1e7)`,
    '* body diodes',
    'DA n1 vin DBODY',
    'DB 0 n1 DBODY',
    'DC 0 n2 DBODY',
    'DD n2 out DBODY',
    `.model DBODY D(IS=${f(d.bodyDiode.is)} N=${f(d.bodyDiode.n)} RS=${f(d.bodyDiode.rs)})`,
    '* inductor with its winding resistance between the legs',
    `L1 n1 lx ${f(d.inductance)} IC=${f(p.ivalley)}`,
    `RL1 lx n2 ${f(d.dcr)}`,
    '* output capacitor with ESR, load as a resistor',
    `COUT out cesr ${f(d.cout.effective)} IC=${f(p.vout)}`,
    `RESR cesr 0 ${f(d.cout.esr)}`,
    ...(io > 0 ? [`RLOAD out 0 ${f(p.vout / io)}`] : []),
    ...transientLines(fsw, ['v(out)'], opts),
  ];
  return lines.join('\n') + '\n';
}
