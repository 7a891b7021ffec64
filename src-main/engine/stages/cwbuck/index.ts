/**
 * Coupled-winding buck (isolated buck): a synchronous buck whose magnetic carries extra
 * secondary windings, each rectified into its own output. Only the primary output is in
 * the feedback loop; the secondaries follow the turns ratio while the low-side switch
 * conducts (DESIGN.md §4; derived from the coupled-inductor model, checked against ngspice).
 *
 * Magnetic model. The primary winding is the magnetizing inductance Lp (no primary
 * leakage); each secondary has turns ratio n = Ns/Np and coupling k to the primary, so its
 * self inductance is Ls = n²·Lp/k² and its leakage, seen from the secondary with the
 * primary clamped, is Llk = n²·Lp·(1 − k²)/k². Secondary-to-secondary coupling is k_i·k_j,
 * which leaves the secondaries independent of each other once the primary is clamped (the
 * netlist writer uses exactly these values).
 *
 * Loaded secondary. During the off-time the winding drives n·Voff into leakage, winding
 * resistance, rectifier and output: a first-order RL loop starting from zero current, so
 *   i(t) = (E/Rt)(1 − e^(−t/τ)),  τ = Llk/Rt,  E = n·Voff − Vsec − V0,
 * with the rectifier linearised as V0 + rd·i around its conduction current. Its average
 * must equal the load current. For τ ≫ Toff this gives E = 2·Llk·fsw·Isec/(1−D)² (the
 * leakage term), for τ ≪ Toff E = Rt·Isec/(1−D) (the resistive term): the two limits of
 * Vsec ≈ n·Vpri − Vf − 2·Llk·fsw·Isec/(1−D)² − R·Isec/(1−D).
 */
import type { Amps, Henries, Ohms, Ratio, Volts, Watts } from '../../units.ts';
import type { DesignFields, OperatingPoint, OutputResult, OutputSpec, StageEvaluation, StageFlag, StageSpec } from '../types.ts';
import type { IsolationClass } from '../../model.ts';
import type { LibraryRow } from '../../library.ts';
import { bestDivider, nearest } from '../../eseries.ts';
import { GENERIC_DEFAULTS, VT, diodeVf, type ControllerParams, type DiodeModel } from '../defaults.ts';
import { bankRippleFlags, chooseCeramic, flag, part, r3, rippleFlags, thermalFlags, type CapacitorChoice } from '../common.ts';
import { feasibility, specErrors, switchingDesignFields, switchingFlags, switchingParts, thetaSourceOf, type SwitchingDesignBase } from '../buck/index.ts';
import { chooseCeramicRow, chooseRectifier, chooseSwitcher, diodeFromRow, type StagePartRef } from '../part-choice.ts';
import { boundingCases, setpoint, type OutputSpan, type ToleranceCase, type ToleranceDraw } from '../window-cases.ts';
import { solvePss, type PssCircuit, type PssResult } from './pss.ts';
import { coreLossAt, designMagneticCore, temperatureRise, windingCopperLoss, type CoreDesign, type MagneticDemand } from '../../core-design.ts';

// Module-local bindings for the innermost loops (saves a lookup through the module namespace
// on every call when the sources run through a CommonJS transform).
const vfOfDiode = diodeVf;
const THERMAL_VOLTAGE = VT;

export interface SecondaryWinding {
  nodeId: string;
  /** Signed turns: a negative count is a reversed winding with its rectifier reversed. */
  turns: number;
  /** Coupling factor to the primary (0 < k < 1). */
  coupling: number;
  /** Winding resistance. */
  resistance: Ohms;
  rectifier: DiodeModel;
  /** Reverse voltage the rectifier sees at Vin max. */
  rectifierReverseVoltage: Volts;
  cout: CapacitorChoice;
  /** Preload resistor across the output, or null. */
  preload: { resistance: Ohms; current: Amps } | null;
  /** RC snubber across the rectifier, or absent. */
  snubber?: { r: Ohms; c: number };
  thetaJA: number;
}

/** The fields every CoupledBuck design carries (registry.ts `designFields`). */
export function coupledDesignFields(): DesignFields<CoupledBuckDesign> {
  return { ...switchingDesignFields(), kind: true, primaryTurns: true, primaryResistance: true, secondaries: true, maxSecondaries: true, powerLimit: true, dutyWarn: true, isolation: true };
}

export interface CoupledBuckDesign extends SwitchingDesignBase {
  kind: 'cwbuck';
  /** outputs[0] is the regulated primary, outputs[1..] the secondaries in winding order. */
  outputs: OutputSpec[];
  primaryTurns: number;
  primaryResistance: Ohms;
  secondaries: SecondaryWinding[];
  /** Preferences the flags compare against. */
  maxSecondaries: number;
  powerLimit: Watts;
  dutyWarn: Ratio;
  /** Barrier the windings cross, from the domain (null: not isolated). */
  isolation: { class: IsolationClass; workingVoltage: Volts } | null;
  /**
   * Coupling between secondaries, [i][j] for windings i ≠ j (symmetric; the diagonal is not
   * read). Absent: the star value k_i·k_j, i.e. no leakage shared between secondaries.
   * Secondaries wound together (bifilar) couple tighter than k_i·k_j and share leakage.
   */
  secondaryCoupling?: number[][];
  /**
   * Tolerances of the magnetic the windows sweep and the specification sheet states: Lp ±
   * inductance, leakage between leakageLow × and 1 × the design value (absent: the generic
   * defaults, GENERIC_DEFAULTS.magneticTolerance).
   */
  magneticTolerance?: { inductance: number; leakageLow: number };
  /**
   * The custom magnetic designed on a core of the table (core-design.ts). When present the
   * evaluation takes its core loss (Steinmetz at the point's flux swing) and its windings'
   * resistance and Dowell AC factor from it, and the winding resistances above are its DC
   * resistances; the magnetic specification sheet prints this same design.
   */
  magneticCore?: CoreDesign;
}

/** The magnetic's tolerances (the windows sweep them; the specification sheet states them). */
export function magneticTolerance(d: CoupledBuckDesign): { inductance: number; leakageLow: number } {
  return d.magneticTolerance ?? { ...GENERIC_DEFAULTS.magneticTolerance };
}

/**
 * The design with its magnetic at one corner of its tolerances: Lp × lpFactor and every
 * leakage (each secondary's own, Llk = n²·Lp·(1 − k²)/k², and the shared Lm_ij of wound-
 * together secondaries) × leakFactor. Leakage is set by the winding geometry, not the gap,
 * so it is held while Lp moves: (1 − k'²)/k'² = leakFactor·(1 − k²)/k² / lpFactor.
 */
/**
 * Where a core design's estimated leakage, referred to each secondary (× n²), exceeds the
 * leakage the stage design assumed (coupling k: Llk = n²·Lp·(1 − k²)/k²): the secondaries would
 * sag below the computed windows. One text per such winding.
 */
export function leakageProblems(d: CoupledBuckDesign, core: { leakage: readonly number[] }): string[] {
  const out: string[] = [];
  core.leakage.forEach((l, i) => {
    const w = d.secondaries[i];
    if (!w) return;
    const n = Math.abs(w.turns) / d.primaryTurns;
    const atSec = l * n * n;
    const max = (n * n * d.inductance * (1 - w.coupling ** 2)) / w.coupling ** 2;
    if (atSec > max) out.push(`estimated leakage of S${i + 1} (${(atSec * 1e9).toFixed(0)} nH at the secondary) exceeds the ${(max * 1e9).toFixed(0)} nH the design assumed: interleave or wind bifilar`);
  });
  return out;
}

export function withMagneticCorner(d: CoupledBuckDesign, lpFactor: number, leakFactor: number): CoupledBuckDesign {
  const kOf = (k: number) => 1 / Math.sqrt(1 + (leakFactor * (1 - k * k)) / (k * k) / lpFactor);
  const secondaries = d.secondaries.map((w) => ({ ...w, coupling: kOf(w.coupling) }));
  const out: CoupledBuckDesign = { ...d, inductance: (d.inductance * lpFactor) as Henries, secondaries };
  const mutual = mutualLeakage(d);
  if (d.secondaryCoupling && mutual) {
    const ls = secondaries.map((w) => ((w.turns / d.primaryTurns) ** 2 * out.inductance) / (w.coupling * w.coupling));
    out.secondaryCoupling = secondaries.map((wi, i) => secondaries.map((wj, j) =>
      i === j ? 1 : wi.coupling * wj.coupling + (leakFactor * mutual[i]![j]!) / Math.sqrt(ls[i]! * ls[j]!)));
  }
  return out;
}

/**
 * The magnetic corners the windows add: nominal, and Lp at 1 ∓ its tolerance with the
 * leakage at each end of its range (the output is not monotonic in the leakage: the drop at
 * load grows with it, the charge the ring delivers at light load too).
 */
export function coupledMagneticCorners(d: CoupledBuckDesign): { design: CoupledBuckDesign; label: string }[] {
  const t = magneticTolerance(d);
  const out = [{ design: d, label: 'magnetic nominal' }];
  if (!(t.inductance > 0) && !(t.leakageLow < 1)) return out;
  const lps = t.inductance > 0 ? [1 - t.inductance, 1 + t.inductance] : [1];
  const leaks = t.leakageLow < 1 ? [t.leakageLow, 1] : [1];
  for (const g of lps) {
    for (const f of leaks) {
      if (g === 1 && f === 1) continue;
      out.push({ design: withMagneticCorner(d, g, f), label: `Lp ${g === 1 ? 'nominal' : `${g < 1 ? '−' : '+'}${r3(Math.abs(g - 1) * 100)} %`}, leakage ${r3(f * 100)} %` });
    }
  }
  return out;
}

/**
 * Every output at one window corner (windows.ts), as magnitudes: the primary at the setpoint
 * under the draw, every rectifier drop scaled by 1 ± its spread.
 */
export function coupledWindowOutputs(d: CoupledBuckDesign, vin: number, iout: number[], x: ToleranceDraw): OutputSpan[] {
  const sp = setpoint(d.divider, d.controller.vrefTolerance, x);
  const vfScale = 1 + d.secondaries.reduce((a, w) => Math.max(a, w.rectifier.vfSpread), 0) * x.vf;
  return coupledOutputs(d, vin, iout, { vPrimary: sp, vfScale }).map((o) => {
    const m = Math.abs(o.voltage);
    return { lo: m - o.ripplePP / 2, hi: m + o.ripplePP / 2 };
  });
}

/** The outputs rise with the setpoint and fall with the rectifier drop: two cases bound them. */
export function coupledWindowCases(): ToleranceCase[] {
  return boundingCases('reference and divider', true);
}

/** A Monte Carlo draw of the magnetic inside the tolerances its sheet states (`u` in [−1, 1], then `rnd` in [0, 1)). */
export function drawMagnetic(d: CoupledBuckDesign, u: () => number, rnd: () => number): CoupledBuckDesign {
  const t = magneticTolerance(d);
  return withMagneticCorner(d, 1 + t.inductance * u(), t.leakageLow + (1 - t.leakageLow) * rnd());
}

export interface CoupledEvalOptions {
  /** Evaluate with the primary at this voltage instead of the divider's setpoint. */
  vPrimary?: number;
  /** Scale every rectifier drop (1 ± spread for the windows). */
  vfScale?: number;
  /**
   * What the caller reads besides the voltages and duty: 'full' (default) every current and
   * loss; 'ripple' the ripple terms but not the RMS currents and rectifier losses (left 0);
   * 'voltages' neither (ripple and loss terms left 0). The voltages are the same in all three.
   */
  detail?: 'full' | 'ripple' | 'voltages';
  /**
   * Evaluations and windows (evaluateCoupledBuck, coupledOutputs) replace the closed form by
   * the numerical periodic steady state (pss.ts) where the closed form is not valid (default
   * true); false keeps the closed form everywhere (the designer's inner searches).
   */
  numeric?: boolean;
}

/** Internal numbers of one operating point, shared with the netlist writer and tests. */
export interface CoupledPoint {
  vpri: number;
  duty: number;
  /** Magnetizing current: average, ripple, peak, valley. */
  im: number;
  dim: number;
  impk: number;
  /** Primary-winding current at the end of the off-time (the low-side negative peak when < 0). */
  iend: number;
  voff: number;
  von: number;
  toff: number;
  sec: SecondaryPoint[];
  /** The numerical periodic steady state, when it ran (see numericPoint). */
  numeric?: NumericCheck;
}

/** What the numerical periodic steady state gave at a point. */
export interface NumericCheck {
  converged: boolean;
  /** Per secondary: the numbers are the numerical model's (inside its validated region). */
  covered: boolean[];
  /** Per secondary: share of its charge from the ring touching forward again after the rectifier stopped. */
  ringShare: number[];
  /** Per secondary: the rectifier's conduction time over the off-time (PSS_CONDUCTION). */
  conduction: number[];
  /** Per secondary not covered: why. */
  why: string[];
  /** Per secondary: the numerical output magnitude (NaN when it did not converge). */
  vout: number[];
  periods: number;
  /** |energy out / energy in − 1| over the converged period. */
  energyError: number;
}

export interface SecondaryPoint {
  n: number;
  llk: number;
  /** Load plus preload current. */
  isec: number;
  iload: number;
  ipre: number;
  vsec: number;
  ipk: number;
  irms: number;
  /** Off-time current i(t) = iinf·(1 − e^(−t/τ)) + beta·t + i0·e^(−t/τ), clamped at zero. */
  iinf: number;
  /** Winding current at the start of the off-time, left by the leakage ring with the rectifier capacitance. */
  i0: number;
  /** Time the rectifier conducts in the off-time (toff unless the current reaches zero first). */
  tc: number;
  beta: number;
  tau: number;
  /** Average rectifier loss. */
  pRect: number;
  /** Charge the output capacitor gives up each period while the winding delivers less than the load. */
  qdef: number;
  /**
   * e^(−t/τ) at the off-time samples t = (m + ½)/OFF_SAMPLES·toff of the pass that sampled the
   * waveform (the point's τ and toff), so the primary's sums reuse them; null when not sampled.
   */
  ex: number[] | null;
}

/** Samples over the off-time for the RMS, loss and ripple sums. */
const OFF_SAMPLES = 32;

function dt(d: CoupledBuckDesign): number {
  return d.controller.deadTime * d.fsw;
}

/** Solve one secondary for its voltage given the off-time winding drive. */
/**
 * Solve one secondary for its voltage. The off-time drive falls linearly as the primary
 * winding current (and so its resistive drop) falls: n·Voff(t) = n·(voff0 − sl·t).
 */
function fillPoint(
  o: SecondaryPoint, n: number, llk: number, isec: number, iload: number, ipre: number, vsec: number, ipk: number,
  irms: number, iinf: number, beta: number, tau: number, pRect: number, qdef: number, i0 = 0, tc = 0,
): SecondaryPoint {
  o.n = n; o.llk = llk; o.isec = isec; o.iload = iload; o.ipre = ipre; o.vsec = vsec; o.ipk = ipk;
  o.irms = irms; o.iinf = iinf; o.beta = beta; o.tau = tau; o.pRect = pRect; o.qdef = qdef; o.i0 = i0; o.tc = tc;
  return o;
}

/**
 * Energy the rectifier's junction capacitance (plus any linear capacitance across it) hands
 * the leakage when the off-time starts: the capacitance, reverse-biased at vr0 through the
 * on-time, discharges through the leakage while the winding drives e' = n·Voff − Vsec, so
 * ½·Llk·i0² = ∫0^vr0 (v + e')·C(v) dv (lossless ring, the on-time ring taken as decayed).
 * For C(v) = cjo·(1 + v/vj)^−m with S = 1 + vr0/vj:
 *   Q = cjo·vj·(S^(1−m) − 1)/(1 − m),  W = ∫ v·C dv = cjo·vj²·[(S^(2−m) − 1)/(2 − m) − (S^(1−m) − 1)/(1 − m)].
 */
function ringEnergy(rect: DiodeModel, cLin: number, vr0: number, ep: number): number {
  if (!(vr0 > 0)) return 0;
  let q = cLin * vr0;
  let w = 0.5 * cLin * vr0 * vr0;
  const c0 = rect.cjo ?? 0;
  if (c0 > 0) {
    const vj = rect.vj ?? 0.5;
    const m = rect.m ?? 0.5;
    const S = 1 + vr0 / vj;
    const a1 = (Math.pow(S, 1 - m) - 1) / (1 - m);
    const a2 = (Math.pow(S, 2 - m) - 1) / (2 - m);
    q += c0 * vj * a1;
    w += c0 * vj * vj * (a2 - a1);
  }
  // What is left of the on-time ring is not counted: its phase at turn-off decides whether
  // it adds or takes energy, and on the grid counting it on average made the fit worse.
  return Math.max(0, w + ep * q);
}

/**
 * Discontinuous secondary: the winding starts the off-time at i0 and the drive is negative
 * (the output sits above n·Voff − drop), so i(t) = (i0 − α)·e^(−t/τ) + α with α < 0 reaches
 * zero at tc = τ·ln(1 − i0/α) after delivering Q = τ·i0 + α·tc. Returns a = −α for the
 * wanted charge q < τ·i0 (Newton on a, from the inductive limit a ≈ τ·i0²/(2q)).
 */
function discontinuousDrive(i0: number, tau: number, q: number): number {
  const qn = q / (tau * i0);
  // g(x) = 1 − x·ln(1 + 1/x) with x = a/i0, decreasing from 1 (x → 0) to 0.
  let x = Math.max(1 / (2 * Math.max(qn, 1e-12)) - 0.5, 1e-6);
  for (let k = 0; k < 30; k++) {
    const l = Math.log1p(1 / x);
    const g = 1 - x * l - qn;
    const dg = -l + 1 / (1 + x);
    const nx = x - g / dg;
    const next = nx > 0 ? nx : x / 2;
    if (Math.abs(next - x) < 1e-12 * x) { x = next; break; }
    x = next;
  }
  return x * i0;
}

/**
 * The result is written into `out` (the caller's point for this winding, read before the
 * call and replaced by it: the operating-point loop allocates nothing per pass).
 */
function solveSecondary(d: CoupledBuckDesign, w: SecondaryWinding, voff0: number, sl: number, von: number, toff: number, iload: number, vfScale: number, vguess: number, full: boolean, losses: boolean, drop: number, last: boolean, out: SecondaryPoint): SecondaryPoint {
  const n = Math.abs(w.turns) / d.primaryTurns;
  const k = w.coupling;
  const llk = (n * n * d.inductance * (1 - k * k)) / (k * k);
  const T = 1 / d.fsw;
  const rect = w.rectifier;
  let vsec = vguess;
  let sp: SecondaryPoint | null = null;
  // The ring is the leakage with the rectifier's junction capacitance. An RC snubber damps
  // it (its energy goes to the resistor, counted as a loss); the model does not follow the
  // snubber's own charge pumping, so snubbed windings are outside the validated region.
  const cLin = 0;
  const ring = (rect.cjo ?? 0) > 0;
  // With the ring, passes before the operating point's last one need not settle the voltage:
  // the outer loop carries it on as the next guess.
  const passes = ring ? (last ? 24 : 2) : 6;
  let i0 = 0;
  let tc = toff;
  // Secant on g(v) = (voltage the loop gives for v) − v when the ring feeds back through i0.
  let xa = NaN;
  let ga = NaN;
  for (let it = 0; it < passes; it++) {
    const ipre = w.preload ? Math.max(0, vsec) / w.preload.resistance : 0;
    const isec = iload + ipre;
    // Below a nanoampere the winding is treated as unloaded (keeps the diode's small-signal
    // resistance finite).
    if (!(isec > 1e-9)) {
      sp = fillPoint(out, n, llk, 0, iload, 0, n * voff0, 0, 0, 0, 0, 0, 0, 0);
      if (Math.abs(sp.vsec - vsec) < 1e-12) break;
      vsec = sp.vsec;
      continue;
    }
    if (ring) {
      // The leakage ring at the start of the off-time leaves the winding current at i0.
      const e = ringEnergy(rect, cLin, n * von + vsec, n * voff0 - drop - vsec);
      i0 = Math.sqrt((2 * e) / llk);
    }
    const ic = Math.max((isec * T) / toff, i0 / 2);
    const rd = vfScale * ((w.rectifier.n * THERMAL_VOLTAGE) / ic + w.rectifier.rs);
    const v0 = vfScale * vfOfDiode(rect, ic) - rd * ic;
    const rt = rd + (w.resistance as number);
    const tau = llk / rt;
    const x = toff / tau;
    const rise = -Math.expm1(-x);
    const shape = toff - tau * rise;
    // Loop: Llk·di/dt = E0 − b·t − Rt·i, i(0) = i0, with b = n·sl. Solution
    // i(t) = α(1 − e^(−t/τ)) + β·t + i0·e^(−t/τ), β = −b/Rt, α = (E0 + Llk·b/Rt)/Rt.
    const b = n * sl;
    let beta = -b / rt;
    let qdec = 0;
    let E0 = 0;
    let alpha = 0;
    let iend = 0;
    const ringQ = i0 * tau * rise;
    // After the high side turns on the winding reverses; the current decays through the
    // leakage at (n·Von + Vsec + V0)/Llk and still charges the output meanwhile.
    const vrev0 = Math.max(n * von + vsec + v0, 1e-3);
    for (let j = 0; j < 4; j++) {
      alpha = (isec * T - qdec - (beta * toff * toff) / 2 - ringQ) / shape;
      E0 = alpha * rt - (llk * b) / rt;
      iend = Math.max(0, alpha * rise + beta * toff + i0 * (1 - rise));
      qdec = Math.min((iend * iend * llk) / (2 * vrev0), 0.5 * isec * T);
    }
    tc = toff;
    if (i0 > 0 && alpha * rise + beta * toff + i0 * (1 - rise) < 0) {
      // The ring's charge alone exceeds the load's: the current reaches zero before the
      // off-time ends and the output settles above n·Voff (peak charging at light load).
      const a = discontinuousDrive(i0, tau, isec * T);
      alpha = -a;
      beta = 0;
      E0 = -a * rt;
      iend = 0;
      qdec = 0;
      tc = Math.min(toff, tau * Math.log1p(i0 / a));
    }
    const vPrev = vsec;
    // A rectified output cannot reverse: past its range the model's voltage stops at zero.
    vsec = Math.max(0, n * voff0 - drop - v0 - E0);
    const iinf = alpha;
    const settled = (!w.preload && !ring) || Math.abs(vsec - vPrev) < 1e-10 * Math.max(1, Math.abs(vsec)) || (ring && !last && it === passes - 1);
    // Only the pass that ends the loop is returned: earlier passes skip the sampling below.
    if (!settled && it < passes - 1) {
      if (ring) {
        const g = vsec - vPrev;
        let next = vPrev + 0.5 * g;
        if (Number.isFinite(ga) && g !== ga) {
          const sec = vPrev - (g * (vPrev - xa)) / (g - ga);
          if (sec > 0 && Number.isFinite(sec)) next = sec;
        }
        xa = vPrev;
        ga = g;
        vsec = next;
      }
      continue;
    }
    if (!full) {
      sp = fillPoint(out, n, llk, isec, iload, ipre, vsec, iend, 0, iinf, beta, tau, 0, 0, i0, tc);
      break;
    }
    // RMS and rectifier loss by sampling the waveform.
    const N = OFF_SAMPLES;
    let s2 = 0;
    let pr = 0;
    let short = 0;
    const exs = out.ex ?? (out.ex = new Array<number>(N));
    for (let m = 0; m < N; m++) {
      const t = ((m + 0.5) / N) * toff;
      const ex = Math.exp(-t / tau);
      exs[m] = ex;
      const i = Math.max(0, alpha * (1 - ex) + beta * t + i0 * ex);
      if (losses) {
        s2 += i * i;
        pr += vfScale * vfOfDiode(rect, i) * i;
      }
      short += Math.max(0, isec - i);
    }
    const ms = (s2 / N) * (toff / T);
    const vrev = Math.max(n * von + vsec + v0, 1e-3);
    const tdec = (iend * llk) / vrev;
    const irms = losses ? Math.sqrt(ms + (iend * iend * tdec) / (3 * T)) : 0;
    const pRect = losses ? (pr / N) * (toff / T) + vfScale * vfOfDiode(rect, iend / 2) * (iend / 2) * (tdec / T) : 0;
    // The capacitor carries the load through the on-time and while the rising winding current
    // is still below it; the leakage's decay charge at turn-on gives some back.
    const qdef = Math.max(0, isec * (T - toff) - qdec + (short / N) * toff);
    sp = fillPoint(out, n, llk, isec, iload, ipre, vsec, iend, irms, iinf, beta, tau, pRect, qdef, i0, tc);
    break;
  }
  return sp!;
}

/**
 * Leakage shared between secondaries, seen with the primary clamped: the Schur complement
 * of the inductance matrix, Lm_ij = M_ij − M_ip·M_jp/Lp = (k_ij − k_i·k_j)·√(Ls_i·Ls_j), with
 * Ls = n²·Lp/k² (this model's convention). Zero for the star model; null when no secondary
 * coupling is given. Remembered per design (the matrix does not change between calls).
 */
const mutualCache = new WeakMap<CoupledBuckDesign, { key: number[][]; m: number[][] | null }>();
export function mutualLeakage(d: CoupledBuckDesign): number[][] | null {
  const kss = d.secondaryCoupling;
  if (!kss) return null;
  const hit = mutualCache.get(d);
  if (hit && hit.key === kss) return hit.m;
  const w = d.secondaries;
  const nS = w.length;
  const ls = w.map((x) => ((x.turns / d.primaryTurns) ** 2 * d.inductance) / (x.coupling * x.coupling));
  let any = false;
  const m = w.map((_, i) => w.map((__, j) => {
    if (i === j) return 0;
    const kij = kss[i]?.[j] ?? w[i]!.coupling * w[j]!.coupling;
    const v = (kij - w[i]!.coupling * w[j]!.coupling) * Math.sqrt(ls[i]! * ls[j]!);
    if (v !== 0) any = true;
    return v;
  }));
  void nS;
  const out = any ? m : null;
  mutualCache.set(d, { key: kss, m: out });
  return out;
}

/**
 * While designCoupledBuck finishes a design it asks for the same operating points several
 * times (the magnetic's demand, the capacitor passes, the banks' RMS and the feasibility
 * checks all take Vin min and max, at full load and with the primary light). The points of
 * that one design are remembered under their inputs and under every value of the design that
 * coupledPoint reads and the designer still changes (winding resistances, rectifiers,
 * preloads), so a change is a miss, never a stale point. Points are read, never changed.
 */
let finishing: { design: CoupledBuckDesign; points: Map<string, CoupledPoint> } | null = null;

function pointKey(d: CoupledBuckDesign, vin: number, iout: number[], opts: CoupledEvalOptions): string {
  let k = `${vin}|${iout.join(',')}|${opts.vPrimary}|${opts.vfScale}|${opts.detail}|${d.primaryResistance}|${d.primaryTurns}|${d.inductance}`;
  for (const w of d.secondaries) {
    const r = w.rectifier;
    k += `|${w.turns},${w.coupling},${w.resistance},${r.is},${r.n},${r.rs},${r.cjo},${r.vj},${r.m},${w.preload ? `${w.preload.resistance},${w.preload.current}` : '-'}`;
  }
  return k;
}

export function coupledPoint(d: CoupledBuckDesign, vin: number, iout: number[], opts: CoupledEvalOptions = {}): CoupledPoint {
  if (finishing === null || finishing.design !== d) return solvePoint(d, vin, iout, opts);
  const key = pointKey(d, vin, iout, opts);
  let p = finishing.points.get(key);
  if (!p) {
    p = solvePoint(d, vin, iout, opts);
    finishing.points.set(key, p);
  }
  return p;
}

function solvePoint(d: CoupledBuckDesign, vin: number, iout: number[], opts: CoupledEvalOptions): CoupledPoint {
  const vpri = opts.vPrimary ?? d.divider.vout;
  const vfScale = opts.vfScale ?? 1;
  const detail = opts.detail ?? 'full';
  const ipri = Math.max(0, Math.abs(iout[0] ?? 0));
  const rhs = d.highSide.rdsOn * d.rdsHotFactor;
  const rls = d.lowSide.rdsOn * d.rdsHotFactor;
  const rp = d.primaryResistance as number;
  const tdf = dt(d);
  let duty = vpri / vin;
  const sec: SecondaryPoint[] = d.secondaries.map((w) => ({
    n: Math.abs(w.turns) / d.primaryTurns, llk: 0, isec: 0, iload: 0, ipre: 0,
    vsec: (Math.abs(w.turns) / d.primaryTurns) * vpri - 0.4, ipk: 0, irms: 0, iinf: 0, i0: 0, tc: 0, beta: 0, tau: 0, pRect: 0, qdef: 0, ex: null,
  }));
  let im = ipri, dim = 0, iend = 0, voff = vpri, von = vin - vpri, toff = (1 - duty) / d.fsw;
  const MAX_IT = 12;
  let duty0 = -1;
  const nSec = d.secondaries.length;
  const loads = new Array<number>(nSec);
  for (let i = 0; i < nSec; i++) loads[i] = Math.abs(iout[i + 1] ?? 0);
  const losses = detail === 'full';
  const mutual = mutualLeakage(d);
  for (let it = 0; it < MAX_IT; it++) {
    // Plain loops (same summation order as a left fold): this runs for every corner.
    let sumN = 0;
    for (let i = 0; i < nSec; i++) sumN += sec[i]!.n * sec[i]!.isec;
    im = ipri + sumN;
    const ioff = ipri - (sumN * duty) / (1 - duty);
    voff = vpri + ioff * (rls + rp);
    von = vin - vpri - im * (rhs + rp);
    const vfb = vfOfDiode(d.bodyDiode, Math.abs(im));
    // The dead time after the high side turns off holds the switch node one body-diode drop
    // below ground; so does the one before it turns on while the primary current is positive.
    const vdead = vpri + vfb;
    // Second dead time with a negative primary current: the switch node flies to Vin + Vf
    // until the secondaries, through their leakage, have taken the primary current back to
    // zero; only then do they clamp the windings again (seen in ngspice: a few ns with a
    // tightly coupled magnetic, the whole dead time with a loose one).
    const vm2 = vin + vfb - vpri;
    let tUp = 0;
    if (iend < 0) {
      let rate = vm2 / d.inductance;
      for (const s of sec) if (s.isec > 0 && s.llk > 0) rate += (s.n * (s.n * vm2 + s.vsec + 0.5)) / s.llk;
      tUp = Math.min(d.controller.deadTime, -iend / rate);
    }
    const upf = tUp * d.fsw;
    // Volt-second balance on Lp:
    // D·Von = (1 − D − 2td)·Voff + (2td − tUp)·(Vpri + Vf) − tUp·(Vin + Vf − Vpri)
    duty = ((1 - 2 * tdf) * voff + (2 * tdf - upf) * vdead - upf * vm2) / (von + voff);
    // Past the physical limit (input at or below the primary) keep the arithmetic finite; the
    // caller sees a duty above the controller's maximum and regulates down.
    if (!(von > 0) || !(von + voff > 0) || duty > 0.999) duty = 0.999;
    else if (!(duty > 1e-4)) duty = 1e-4;
    dim = (von * duty) / (d.inductance * d.fsw);
    toff = Math.max((1 - duty) / d.fsw - tUp, (0.5 * (1 - duty)) / d.fsw);
    // The primary winding current falls from the magnetizing peak to iend over the off-time;
    // its drop across Rls + Rp makes the off-time drive fall linearly.
    const sl = ((im + dim / 2 - iend) * (rls + rp)) / toff;
    const voff0 = voff + (sl * toff) / 2;
    const last = it === MAX_IT - 1;
    const prevDuty = duty0;
    const full = last && detail !== 'voltages';
    let sumPk = 0;
    for (let i = 0; i < nSec; i++) {
      // Leakage shared with the other secondaries: Σ Lm_ij·di_j/dt, with each winding's
      // current slope taken as its average over the off-time (end current / toff) from the
      // previous pass; in the leakage-limited limit this is 2·Lm·fsw·I_j/(1−D)², the mutual
      // counterpart of the self-leakage term.
      let drop = 0;
      if (mutual) {
        const row = mutual[i]!;
        for (let j = 0; j < nSec; j++) if (j !== i) drop += (row[j]! * (sec[j]!.ipk - sec[j]!.i0)) / toff;
      }
      const sp = solveSecondary(d, d.secondaries[i]!, voff0, sl, von, toff, loads[i]!, vfScale, sec[i]!.vsec, full, losses, drop, last, sec[i]!);
      sumPk += sp.n * sp.ipk;
    }
    iend = im - dim / 2 - sumPk;
    if (last) break;
    // Converged: finish with one pass that also integrates the RMS currents and losses.
    if (Math.abs(duty - prevDuty) < 1e-12 && it > (mutual ? 4 : 1)) it = MAX_IT - 2;
    duty0 = duty;
  }
  return { vpri, duty, im, dim, impk: im + dim / 2, iend, voff, von, toff, sec };
}

/**
 * The switching cycle as the numerical periodic steady state reads it (pss.ts): the design's
 * inductance matrix (Lp; Ls = n²·Lp/k²; mutuals k·√(La·Lb), secondary pairs from
 * secondaryCoupling or k_i·k_j), its switches, body diodes, resistances and rectifiers, at the
 * closed-form point p (its duty and secondary voltages are the starting values).
 */
export function pssCircuit(d: CoupledBuckDesign, vin: number, iout: number[], p: CoupledPoint, vfScale = 1): PssCircuit {
  const lp = d.inductance as number;
  const ws = d.secondaries;
  const ls = ws.map((w) => ((w.turns / d.primaryTurns) ** 2 * lp) / (w.coupling * w.coupling));
  const kss = d.secondaryCoupling;
  const L = [lp, ...ls].map((_, a) => [lp, ...ls].map((__, b) => {
    if (a === b) return a === 0 ? lp : ls[a - 1]!;
    if (a === 0 || b === 0) { const j = Math.max(a, b) - 1; return ws[j]!.coupling * Math.sqrt(lp * ls[j]!); }
    const i = a - 1, j = b - 1;
    const k = kss?.[i]?.[j] ?? ws[i]!.coupling * ws[j]!.coupling;
    return k * Math.sqrt(ls[i]! * ls[j]!);
  }));
  return {
    vin, vpri: p.vpri, ipri: Math.max(0, Math.abs(iout[0] ?? 0)), fsw: d.fsw as number, duty: p.duty,
    deadTime: d.controller.deadTime, rhs: d.highSide.rdsOn * d.rdsHotFactor, rls: d.lowSide.rdsOn * d.rdsHotFactor,
    rp: d.primaryResistance as number, body: d.bodyDiode, L,
    windings: ws.map((w, i) => ({
      r: w.resistance as number, rect: w.rectifier, vfScale,
      ...(w.snubber ? { snubber: { r: w.snubber.r as number, c: w.snubber.c } } : {}),
      iload: Math.abs(iout[i + 1] ?? 0), gpre: w.preload ? 1 / (w.preload.resistance as number) : 0,
      vguess: p.sec[i]!.vsec,
    })),
  };
}

/**
 * The closed form's own validity test for secondary i (see VALIDATED_RING_SHARE): null inside,
 * else why not and the numbers.
 */
function closedFormMiss(d: CoupledBuckDesign, p: CoupledPoint, i: number): { why: string; ringShare: number } | null {
  const w = d.secondaries[i]!;
  const s = p.sec[i]!;
  if (!(s.isec > 0)) return null;
  const T = 1 / d.fsw;
  const ringShare = s.i0 > 0 && s.tau > 0 ? (s.i0 * s.tau * -Math.expm1(-p.toff / s.tau)) / (s.isec * T) : 0;
  const discontinuous = s.tc < 0.999 * p.toff;
  if (!(ringShare > VALIDATED_RING_SHARE || discontinuous || w.snubber)) return null;
  const why = w.snubber ? 'it has a snubber' : discontinuous
    ? `its current stops ${r3((p.toff - s.tc) * 1e9)} ns before the off-time ends (peak charging by the leakage ring)`
    : `the leakage ring gives ${r3(ringShare * 100)} % of its charge (validated up to ${VALIDATED_RING_SHARE * 100} %)`;
  return { why, ringShare };
}

/**
 * Where the numerical model holds. Against the independent ngspice grid its secondaries agree
 * within 2 % while each rectifier conducts through the off-time (at least PSS_CONDUCTION of
 * it), i.e. while conduction resets the leakage ring every period, also where the closed
 * form's ring estimate is off (a ring giving half the charge and more). Where the current
 * stops early the ring with the rectifier capacitance, lightly damped, rings on through the
 * rest of the period and its phase at the next edge decides the output: the grid's
 * light-load points read 2–30 % off in either direction, and ±1 % leakage moves the
 * computed output by up to 25 %, so such points stay flagged with the numbers. Rectifiers
 * with a transit time (reverse recovery) and snubbed windings are not covered either (the
 * grid's few such windings read up to 6 % off).
 */
export const PSS_CONDUCTION = 0.99;
/** Integration steps one numerical solve may take before it reports no result. */
export const PSS_STEP_BUDGET = 3e5;
/** Largest energy-balance error over the converged period for the numbers to be used. */
export const PSS_ENERGY_LIMIT = 0.005;

/**
 * Where the closed form is outside its validated region (a peak-charged, discontinuous or
 * snubbed secondary) and every rectifier has a capacitance (or a snubber) to ring with: the
 * numerical periodic steady state of the switching cycle (pss.ts). Secondaries it covers take
 * its voltage, currents and rectifier loss; the others keep the closed form and their flag.
 * Mutates p (adds p.numeric).
 */
export function numericPoint(d: CoupledBuckDesign, vin: number, iout: number[], p: CoupledPoint, vfScale = 1): void {
  const S = d.secondaries.length;
  if (!S) return;
  // The cheap test first: the numerical model needs every rectifier's capacitance.
  if (!d.secondaries.every((w) => (w.rectifier.cjo ?? 0) > 0 || w.snubber)) return;
  // Solve only where it can help: some secondary the closed form misses must be one the
  // numerical model could cover (no reverse recovery, no snubber: not validated there).
  let miss = false;
  for (let i = 0; i < S && !miss; i++) {
    const w = d.secondaries[i]!;
    if (!((w.rectifier.tt ?? 0) > 0) && !w.snubber && closedFormMiss(d, p, i)) miss = true;
  }
  if (!miss) return;
  const base = solvePss(pssCircuit(d, vin, iout, p, vfScale), { maxSteps: PSS_STEP_BUDGET });
  const energyError = Math.abs(base.energyOut / base.energyIn - 1);
  const converged = base.converged && energyError < PSS_ENERGY_LIMIT;
  const check: NumericCheck = {
    converged, covered: new Array<boolean>(S).fill(false),
    ringShare: base.sec.map((x) => (converged ? x.ringShare : NaN)), vout: base.sec.map((x) => (converged ? x.vout : NaN)),
    periods: base.periods, energyError,
    why: new Array<string>(S).fill(''), conduction: new Array<number>(S).fill(NaN),
  };
  p.numeric = check;
  if (!converged) return;
  for (let i = 0; i < S; i++) {
    const x = base.sec[i]!;
    const w = d.secondaries[i]!;
    if ((w.rectifier.tt ?? 0) > 0) { check.why[i] = 'its rectifier has a transit time (reverse recovery), which the numerical model is not validated for'; continue; }
    if (w.snubber) { check.why[i] = 'its snubber is not validated in the numerical model'; continue; }
    const share = x.conduction / p.toff;
    check.conduction[i] = share;
    if (!(share >= PSS_CONDUCTION)) {
      check.why[i] = `its rectifier conducts ${r3(share * 100)} % of the off-time (validated from ${PSS_CONDUCTION * 100} %): the leakage ring with the rectifier capacitance then rings on, lightly damped, and its phase at the switching edges decides the output`;
      continue;
    }
    check.covered[i] = true;
    const s = p.sec[i]!;
    s.vsec = x.vout;
    s.ipre = w.preload ? x.vout / (w.preload.resistance as number) : 0;
    s.isec = s.iload + s.ipre;
    s.ipk = x.ipk;
    s.irms = x.irms;
    s.pRect = x.pRect;
    s.tc = Math.min(p.toff, x.conduction);
  }
}

/** The closed-form point with the numerical cycle where the closed form stops (options.numeric). */
function evaluatedPoint(d: CoupledBuckDesign, vin: number, iout: number[], opts: CoupledEvalOptions): CoupledPoint {
  const p = regulatedPoint(d, vin, iout, opts);
  if (opts.numeric !== false) numericPoint(d, vin, iout, p, opts.vfScale ?? 1);
  return p;
}

/**
 * Mean squares of the primary-winding current: during the on-time (magnetizing triangle)
 * and during the off-time (magnetizing ramp minus the reflected secondaries, sampled).
 */
export function primaryMeanSquares(p: CoupledPoint): { msOn: number; msOff: number } {
  const msOn = p.im * p.im + (p.dim * p.dim) / 12;
  const N = OFF_SAMPLES;
  let s2 = 0;
  const slope = p.dim / p.toff;
  for (let m = 0; m < N; m++) {
    const t = ((m + 0.5) / N) * p.toff;
    let i = p.impk - slope * t;
    for (const s of p.sec) {
      if (!(s.tau > 0)) continue;
      const ex = s.ex ? s.ex[m]! : Math.exp(-t / s.tau);
      i -= s.n * Math.max(0, s.iinf * (1 - ex) + s.beta * t + s.i0 * ex);
    }
    s2 += i * i;
  }
  return { msOn, msOff: s2 / N };
}

/**
 * Peak-to-peak ripple of the primary output: the charge its capacitor gives up while the
 * primary-winding current is below the load (sampled over the on- and off-time), plus the
 * ESR step over the winding current's swing.
 */
export function primaryRipple(p: CoupledPoint, ipri: number, cap: CapacitorChoice, fsw: number): number {
  const N = OFF_SAMPLES;
  const ton = p.duty / fsw;
  const toff = p.toff;
  let short = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (let m = 0; m < N; m++) {
    const i = p.impk - p.dim + (p.dim * (m + 0.5)) / N;
    short += (Math.max(0, ipri - i) * ton) / N;
    lo = Math.min(lo, i); hi = Math.max(hi, i);
  }
  const slope = p.dim / toff;
  for (let m = 0; m < N; m++) {
    const t = ((m + 0.5) / N) * toff;
    let i = p.impk - slope * t;
    for (const s of p.sec) {
      if (!(s.tau > 0)) continue;
      const ex = s.ex ? s.ex[m]! : Math.exp(-t / s.tau);
      i -= s.n * Math.max(0, s.iinf * (1 - ex) + s.beta * t + s.i0 * ex);
    }
    short += (Math.max(0, ipri - i) * toff) / N;
    lo = Math.min(lo, i); hi = Math.max(hi, i);
  }
  return short / cap.effective + cap.esr * (hi - lo);
}

/** RMS and peak current of every winding (primary first) at one operating point. */
export function windingCurrents(d: CoupledBuckDesign, vin: number, iout: number[], at?: CoupledPoint): { rms: number; peak: number }[] {
  const p = at ?? coupledPoint(d, vin, iout);
  const { msOn, msOff } = primaryMeanSquares(p);
  const primaryRms = Math.sqrt(msOn * p.duty + msOff * p.toff * d.fsw);
  return [
    { rms: primaryRms, peak: Math.max(p.impk, Math.abs(p.iend)) },
    ...p.sec.map((s) => ({ rms: s.irms, peak: Math.max(s.ipk, s.i0) })),
  ];
}

/**
 * RMS ripple current of each capacitor bank at one point. A capacitor carries what its
 * source delivers less the DC it passes on, so its RMS is that of the AC part,
 * √(Irms² − Iavg²) [Erickson & Maksimović, capacitor charge balance; common practice]:
 * an output bank the rectified winding's pulsed current less the load and preload (the
 * primary's bank the primary-winding current less the primary load), the input bank the
 * high-side current less the input's average.
 */
export function coupledBankRms(d: CoupledBuckDesign, p: CoupledPoint, ipri: number): { cin: number; cout: number; secondaries: number[] } {
  const { msOn, msOff } = primaryMeanSquares(p);
  const hsSq = msOn * p.duty;
  const priSq = hsSq + msOff * p.toff * d.fsw;
  return {
    cin: Math.sqrt(Math.max(0, hsSq - (p.im * p.duty) ** 2)),
    cout: Math.sqrt(Math.max(0, priSq - ipri * ipri)),
    secondaries: p.sec.map((s) => Math.sqrt(Math.max(0, s.irms * s.irms - s.isec * s.isec))),
  };
}

/** Current density of the custom magnetic's windings [common practice: 4–6 A/mm², natural cooling]. */
export const WINDING_CURRENT_DENSITY = 5;

/**
 * What the custom magnetic must carry: Lp, the flux's peak and swing at Vin max with every
 * output at full load, and per winding the largest RMS and peak over Vin min/max × (all
 * outputs at full load | primary at its minimum) for the wire; the losses are stated at the
 * one point Vin max, all outputs at full load (where the flux swing is largest), with that
 * point's RMS and average currents, so the stage evaluation there reads the same numbers.
 */
export function coupledMagneticDemand(d: CoupledBuckDesign): MagneticDemand {
  const full = d.outputs.map((o) => o.currentMax as number);
  const lightPri = [d.outputs[0]!.currentMin as number, ...full.slice(1)];
  const worst = coupledPoint(d, d.vinMax, full);
  const atWorst = windingCurrents(d, d.vinMax, full, worst);
  const points = [windingCurrents(d, d.vinMin, full), windingCurrents(d, d.vinMin, lightPri), atWorst, windingCurrents(d, d.vinMax, lightPri)];
  const rms = points[0]!.map((_, i) => Math.max(...points.map((p) => p[i]!.rms)));
  const peak = points[0]!.map((_, i) => Math.max(...points.map((p) => p[i]!.peak)));
  const vpri = d.divider.vout;
  const swing = Math.max(d.vinMax - vpri, vpri);
  const crosses = !!d.isolation && d.isolation.class !== 'none';
  return {
    inductance: d.inductance, peakCurrent: Math.max(peak[0]!, worst.impk), rippleCurrent: worst.dim, fsw: d.fsw,
    isolation: d.isolation?.class ?? 'none',
    windings: [
      { name: 'P', designTurns: d.primaryTurns, rms: rms[0]!, average: full[0]!, peak: peak[0]!, voltage: swing, crossesBarrier: false,
        lossRms: atWorst[0]!.rms, lossAverage: full[0]! },
      ...d.secondaries.map((w, i) => ({
        name: `S${i + 1}`, designTurns: w.turns, rms: rms[i + 1]!, average: full[i + 1]!, peak: peak[i + 1]!,
        voltage: (Math.abs(w.turns) / d.primaryTurns) * swing, crossesBarrier: crosses,
        lossRms: atWorst[i + 1]!.rms, lossAverage: worst.sec[i]!.isec,
      })),
    ],
  };
}

/**
 * Magnetic losses at one operating point. With the designed core: Steinmetz core loss at the
 * point's flux swing ΔB = Lp·ΔIm/(Np·Ae) (core-design.ts coreLossAt, coefficients from the
 * core table), copper loss per winding Rdc·(Iavg² + F_R·(Irms² − Iavg²)) with the Dowell
 * factor F_R of the designed winding [Erickson ch. 13]. Without it (a design made before the
 * core was designed): the labelled κ·½·L·ΔI²·fsw and the plain I²R of the winding resistances.
 */
function magneticLosses(d: CoupledBuckDesign, p: CoupledPoint, ipri: number, primaryMs: number): { core: number; primary: number; secondary: number } {
  const c = d.magneticCore;
  if (!c) {
    return {
      core: d.coreLossFraction * 0.5 * d.inductance * p.dim * p.dim * d.fsw,
      primary: primaryMs * (d.primaryResistance as number),
      secondary: p.sec.reduce((a, s, i) => a + s.irms * s.irms * (d.secondaries[i]!.resistance as number), 0),
    };
  }
  const np = d.primaryTurns * c.turnsMultiplier;
  const swing = (d.inductance * p.dim) / (np * c.core.ae);
  const w = c.windings;
  return {
    core: coreLossAt(c, d.fsw, swing),
    primary: windingCopperLoss(w[0]!.rdc, w[0]!.fr, Math.sqrt(primaryMs), ipri),
    secondary: p.sec.reduce((a, s, i) => a + windingCopperLoss(w[i + 1]!.rdc, w[i + 1]!.fr, s.irms, s.isec), 0),
  };
}

/**
 * The operating point, with the primary out of regulation when the controller runs out of
 * duty: the primary then settles where the maximum duty puts it (found by bisection).
 */
function regulatedPoint(d: CoupledBuckDesign, vin: number, iout: number[], opts: CoupledEvalOptions): CoupledPoint {
  const p = coupledPoint(d, vin, iout, opts);
  const dmax = d.controller.maxDuty;
  if (!(p.duty > dmax)) return p;
  let lo = 0;
  let hi = p.vpri;
  let best = p;
  for (let k = 0; k < 40; k++) {
    const mid = (lo + hi) / 2;
    const q = coupledPoint(d, vin, iout, { ...opts, vPrimary: mid });
    if (q.duty > dmax) hi = mid;
    else { lo = mid; best = q; }
    if (hi - lo < 1e-6 * Math.max(1, p.vpri)) break;
  }
  return best.duty > dmax ? coupledPoint(d, vin, iout, { ...opts, vPrimary: lo }) : best;
}

/** Output voltages (signed) and ripple only, for the windows: no losses, no flags. */
export function coupledOutputs(d: CoupledBuckDesign, vin: number, iout: number[], opts: CoupledEvalOptions = {}): { voltage: number; ripplePP: number }[] {
  const p = evaluatedPoint(d, vin, iout, { detail: 'ripple', ...opts });
  const fsw = d.fsw as number;
  const ipri = Math.max(0, Math.abs(iout[0] ?? 0));
  return [
    { voltage: p.vpri, ripplePP: primaryRipple(p, ipri, d.cout, fsw) },
    ...p.sec.map((s, i) => {
      const w = d.secondaries[i]!;
      return { voltage: Math.sign(w.turns) * s.vsec, ripplePP: s.qdef / w.cout.effective + w.cout.esr * Math.max(s.ipk, s.i0) };
    }),
  ];
}

export function evaluateCoupledBuck(d: CoupledBuckDesign, op: OperatingPoint, opts: CoupledEvalOptions = {}): StageEvaluation {
  const vin = op.vin as number;
  const p = evaluatedPoint(d, vin, op.iout as number[], opts);
  const required = p.vpri < (opts.vPrimary ?? d.divider.vout) ? coupledPoint(d, vin, op.iout as number[], opts).duty : p.duty;
  const fsw = d.fsw as number;
  const rhs = d.highSide.rdsOn * d.rdsHotFactor;
  const rls = d.lowSide.rdsOn * d.rdsHotFactor;
  const rp = d.primaryResistance as number;
  const ipri = Math.max(0, Math.abs(op.iout[0] ?? 0));
  const { msOn, msOff } = primaryMeanSquares(p);
  const offShare = p.toff * fsw;
  const td = d.controller.deadTime;
  const vfb = diodeVf(d.bodyDiode, Math.max(Math.abs(p.impk), Math.abs(p.iend)));
  const hsRmsSq = msOn * p.duty;
  const mag = magneticLosses(d, p, ipri, hsRmsSq + msOff * offShare);
  const bankRms = coupledBankRms(d, p, ipri);
  const loss: Record<string, number> = {
    'hs-conduction': hsRmsSq * rhs,
    'ls-conduction': msOff * rls * Math.max(0, 1 - p.duty - 2 * td * fsw),
    // ½·Vin·I·t·fsw at each hard edge; the turn-on edge is soft when the current is negative.
    'hs-switching': 0.5 * vin * fsw * (d.highSide.tf * p.impk + d.highSide.tr * Math.max(0, p.iend)),
    'output-capacitance': 0.5 * (d.highSide.coss + d.lowSide.coss) * vin * vin * fsw,
    'dead-time': vfb * (Math.abs(p.impk) + Math.abs(p.iend)) * td * fsw,
    'gate-drive': (d.highSide.qg + d.lowSide.qg) * d.controller.vDrive * fsw,
    'primary-copper': mag.primary,
    'secondary-copper': mag.secondary,
    rectifiers: p.sec.reduce((a, s) => a + s.pRect, 0),
    'magnetic-core': mag.core,
    // Each bank's RMS ripple current (coupledBankRms) through its ESR.
    'output-capacitor-esr': bankRms.cout ** 2 * d.cout.esr
      + bankRms.secondaries.reduce((a, x, i) => a + x * x * d.secondaries[i]!.cout.esr, 0),
    'input-capacitor-esr': bankRms.cin ** 2 * d.cin.esr,
    // An RC snubber across a rectifier charges and discharges its capacitor through its
    // resistor at both edges: Cs·Vr²·fsw with Vr = n·Von + Vsec [common practice].
    snubber: snubberLoss(d, p),
    preload: p.sec.reduce((a, s) => a + s.vsec * s.ipre, 0),
    quiescent: vin * d.controller.iq,
  };
  const lossTotal = Object.values(loss).reduce((a, b) => a + b, 0);
  const pout = p.vpri * ipri + p.sec.reduce((a, s) => a + s.vsec * s.iload, 0);
  const pin = pout + lossTotal;
  const priPP = primaryRipple(p, ipri, d.cout, fsw);
  const outputs: OutputResult[] = [
    { nodeId: d.outputs[0]!.nodeId, voltage: p.vpri as Volts, current: ipri as Amps, ripplePP: priPP as Volts },
    ...p.sec.map((s, i) => {
      const w = d.secondaries[i]!;
      // Secondary capacitor: DESIGN.md §4 sizes it from ΔV = Isec·D/(fsw·C) + ESR·Ipk [common
      // practice]; here the whole shortfall charge (on-time plus the slow start of the
      // winding current) is counted, which ngspice shows is larger.
      const pp = s.qdef / w.cout.effective + w.cout.esr * Math.max(s.ipk, s.i0);
      return { nodeId: w.nodeId, voltage: (Math.sign(w.turns) * s.vsec) as Volts, current: s.iload as Amps, ripplePP: pp as Volts };
    }),
  ];
  const ta = op.ambient as number;
  // The designed magnetic's hot spot from McLyman's surface rise at this loss (not linear in
  // the loss, so expressed as the equivalent K/W at this point); else the generic K/W.
  const magPower = loss['primary-copper']! + loss['secondary-copper']! + loss['magnetic-core']!;
  const magTheta = d.magneticCore && magPower > 0 ? temperatureRise(magPower, d.magneticCore.core.surface) / magPower : d.thetaJA.inductor;
  const parts = [
    ...switchingParts(d,
      loss['hs-conduction']! + loss['hs-switching']! + loss['output-capacitance']! / 2,
      loss['ls-conduction']! + loss['dead-time']! + loss['output-capacitance']! / 2,
      loss['gate-drive']! + loss.quiescent!, ta),
    part('coupled magnetic', magPower, magTheta, ta, d.magneticCore && magPower > 0 ? 'core-surface' : 'default-from-memory'),
    ...p.sec.map((s, i) => part(`rectifier D${i + 1}`, s.pRect, d.secondaries[i]!.thetaJA, ta, thetaSourceOf(d))),
  ];
  const flags: StageFlag[] = [...switchingFlags(d, vin, required, p.impk, p.iend), ...thermalFlags(parts, d.tjMax), ...rippleFlags(outputs, d.outputs)];
  if (p.duty > d.dutyWarn) {
    flags.push(flag('duty-high-for-secondaries', 'warning',
      `duty ${r3(p.duty)} at Vin ${r3(vin)} V is above ${d.dutyWarn}: secondary regulation degrades as (1−D)² shrinks; a higher input or a lower primary voltage helps`,
      { duty: r3(p.duty), limit: d.dutyWarn, vin }));
  }
  flags.push(...regionFlags(d, p));
  flags.push(...bankRippleFlags([
    { bank: d.cin, rms: bankRms.cin }, { bank: d.cout, rms: bankRms.cout },
    ...d.secondaries.map((w, i) => ({ bank: w.cout, rms: bankRms.secondaries[i]! })),
  ]));
  if (pout > d.powerLimit) {
    flags.push(flag('power-above-range', 'warning', `output power ${r3(pout)} W is above the ${d.powerLimit} W a coupled-winding buck suits`, { pout: r3(pout), limit: d.powerLimit }));
  }
  if (d.secondaries.length > d.maxSecondaries) {
    flags.push(flag('too-many-windings', 'warning', `${d.secondaries.length} secondaries exceed the preferred ${d.maxSecondaries} per magnetic`, { secondaries: d.secondaries.length, limit: d.maxSecondaries }));
  }
  return {
    kind: 'cwbuck',
    vin: vin as Volts,
    iin: (pin / vin) as Amps,
    pin: pin as Watts,
    pout: pout as Watts,
    loss: lossTotal as Watts,
    efficiency: (pin > 0 ? pout / pin : 0) as Ratio,
    duty: p.duty as Ratio,
    lossBreakdown: loss as Record<string, Watts>,
    parts,
    outputs,
    flags,
  };
}

/**
 * Where the model has been checked. Against the independent ngspice grid
 * (test/reference/independent-grid.ts) the secondaries agree within 2 % and the efficiency
 * within 3 points while every secondary (a) conducts through the whole off-time, (b) gets
 * no more than VALIDATED_RING_SHARE of its charge per period from the leakage ring with the
 * rectifier capacitance, and (c) has no snubber. Outside, the light-load output depends on
 * the phase of a lightly damped ring (the grid shows 5–50 % above n·Vpri), which no closed
 * form follows: the point is flagged with its numbers.
 */
export const VALIDATED_RING_SHARE = 0.45;

function snubberLoss(d: CoupledBuckDesign, p: CoupledPoint): number {
  let a = 0;
  for (let i = 0; i < p.sec.length; i++) {
    const sn = d.secondaries[i]!.snubber;
    if (sn) a += sn.c * (p.sec[i]!.n * p.von + p.sec[i]!.vsec) ** 2 * d.fsw;
  }
  return a;
}
/** The grid's span: duty, coupling to the primary, |M/Lp| turns ratio, secondaries per magnetic. */
export const VALIDATED_SPAN = { duty: [0.075, 0.62], coupling: [0.97, 0.999], ratio: [0.48, 8], secondaries: 3 } as const;

export function regionFlags(d: CoupledBuckDesign, p: CoupledPoint): StageFlag[] {
  const out: StageFlag[] = [];
  const span = VALIDATED_SPAN;
  const outside = (what: string, key: string, v: number, lo: number, hi: number, nodeId?: string) => {
    out.push(flag('outside-validated-region', 'warning',
      `${what} ${r3(v)} is outside the ${lo}…${hi} the coupled-winding model was checked over (independent ngspice grid)`,
      { [key]: r3(v), min: lo, max: hi, ...(nodeId ? { nodeId } : {}) }));
  };
  if (p.duty < span.duty[0] || p.duty > span.duty[1]) outside('duty', 'duty', p.duty, span.duty[0], span.duty[1]);
  const ws = d.secondaries;
  if (ws.length > span.secondaries) {
    out.push(flag('outside-validated-region', 'warning', `${ws.length} secondaries: the model was checked with up to ${span.secondaries}`, { secondaries: ws.length, max: span.secondaries }));
  }
  for (let i = 0; i < ws.length; i++) {
    const w = ws[i]!;
    const ratio = Math.abs(w.turns) / d.primaryTurns;
    if (w.coupling < span.coupling[0] || w.coupling > span.coupling[1]) outside(`${w.nodeId} coupling`, 'coupling', w.coupling, span.coupling[0], span.coupling[1], w.nodeId);
    if (ratio < span.ratio[0] || ratio > span.ratio[1]) outside(`${w.nodeId} ratio`, 'ratio', ratio, span.ratio[0], span.ratio[1], w.nodeId);
    const s = p.sec[i]!;
    if (p.numeric?.covered[i]) continue;
    const miss = closedFormMiss(d, p, i);
    if (!miss) continue;
    const nc = p.numeric;
    const numeric = !nc ? ((w.rectifier.cjo ?? 0) > 0 || w.snubber ? '' : '; the numerical switching-cycle model needs every rectifier\'s capacitance (rectifier.cjo), which is not given')
      : !nc.converged ? `; the numerical switching-cycle model did not settle (${Number.isFinite(nc.periods) ? `${nc.periods} periods, ${Number.isFinite(nc.energyError) ? `energy balance ${r3(nc.energyError * 100)} %` : 'no energy balance'}` : `its ${PSS_STEP_BUDGET.toExponential(0)} integration steps ran out`})`
      : `; the numerical switching-cycle model gives ${r3(nc.vout[i]!)} V, but ${nc.why[i]}`;
    out.push(flag('outside-validated-region', 'warning',
      `${w.nodeId}: ${r3(s.vsec)} V at ${r3(s.iload * 1e3)} mA is outside the region the coupled-winding model was checked in, because ${miss.why}${numeric}; a larger load or preload brings it back`,
      { nodeId: w.nodeId, vsec: r3(s.vsec), iload: s.iload, ringShare: r3(miss.ringShare), conductionShare: r3(s.tc / p.toff), ...(nc && Number.isFinite(nc.vout[i]!) ? { numericVsec: r3(nc.vout[i]!), ...(Number.isFinite(nc.conduction[i]!) ? { numericConduction: r3(nc.conduction[i]!) } : {}) } : {}) }));
  }
  return out;
}

/**
 * Peak reverse voltage across a rectifier. At turn-on the winding steps to −n·Von and the
 * leakage rings with the rectifier capacitance around Vr = n·Von + Vsec: twice that in a
 * lossless ring, plus what is left of the previous ring (up to one more Vr when lightly
 * damped; taken as 3·Vr), plus the recovery current of a silicon part: the stored
 * charge TT·i at turn-on is swept out at di/dt = Vr/Llk, Irr = √(2·Q·di/dt), and rings
 * up Irr·Z0 with Z0 = √(Llk/C). The independent grid simulates 2.7–2.95 Vr for Schottky
 * parts without snubber.
 */
export function rectifierPeakReverse(d: CoupledBuckDesign, p: CoupledPoint, i: number): number {
  const w = d.secondaries[i]!;
  const s = p.sec[i]!;
  const vr = s.n * p.von + s.vsec;
  if (w.snubber) return 1.3 * vr; // the grid's two snubbed windings: 1.17–1.18·Vr
  let spike = 3 * vr;
  const tt = w.rectifier.tt ?? 0;
  const c0 = w.rectifier.cjo ?? 0;
  if (tt > 0 && c0 > 0 && s.llk > 0 && s.ipk > 0) {
    const vj = w.rectifier.vj ?? 0.5;
    const m = w.rectifier.m ?? 0.5;
    const c = c0 / Math.pow(1 + vr / vj, m);
    // The stored charge follows the falling current when the fall (i·Llk/Vr) is slower
    // than TT: what is left at the zero crossing is about TT·min(i, TT·di/dt).
    const slope = vr / s.llk;
    const irr = Math.sqrt(2 * tt * Math.min(s.ipk, tt * slope) * slope);
    spike += irr * Math.sqrt(s.llk / c);
  }
  return spike;
}

/** Preload current a secondary needs (DESIGN.md §4 [C]: specify a minimum load). */
function preloadFor(o: OutputSpec): number {
  return Math.max(GENERIC_DEFAULTS.preloadShare * (o.currentMax as number), GENERIC_DEFAULTS.preloadFloor);
}

/** Why a rectifier model cannot be used ("field: reason"), or null. */
function diodeErrors(d: DiodeModel): string | null {
  const pos = (v: unknown) => typeof v === 'number' && Number.isFinite(v) && v > 0;
  const nonNeg = (v: unknown) => typeof v === 'number' && Number.isFinite(v) && v >= 0;
  if (!pos(d.is)) return 'is: must be a positive saturation current (A)';
  if (!pos(d.n)) return 'n: must be a positive emission coefficient';
  if (!nonNeg(d.rs)) return 'rs: must be a series resistance ≥ 0 (Ω)';
  if (!nonNeg(d.vfSpread) || d.vfSpread >= 0.5) return 'vfSpread: must be between 0 and 0.5';
  if (d.cjo !== undefined && !nonNeg(d.cjo)) return 'cjo: must be a capacitance ≥ 0 (F)';
  if (d.vj !== undefined && !pos(d.vj)) return 'vj: must be a positive junction potential (V)';
  if (d.m !== undefined && !(pos(d.m) && d.m < 1)) return 'm: must be a grading coefficient between 0 and 1';
  if (d.tt !== undefined && !nonNeg(d.tt)) return 'tt: must be a transit time ≥ 0 (s)';
  return null;
}

/**
 * Why a secondary coupling matrix cannot be used, or null: square with one row per secondary,
 * symmetric, each entry in (0, 1), and with the primary coupling k the whole matrix
 * positive definite (a passive magnetic).
 */
function couplingMatrixError(kss: number[][], nSecs: number, k: number): string | null {
  if (!Array.isArray(kss) || kss.length !== nSecs || kss.some((r) => !Array.isArray(r) || r.length !== nSecs)) return `must be ${nSecs}×${nSecs} (one row and column per secondary)`;
  for (let i = 0; i < nSecs; i++) {
    for (let j = 0; j < nSecs; j++) {
      const v = kss[i]![j]!;
      if (i === j) continue;
      if (typeof v !== 'number' || !(v > 0 && v < 1)) return `[${i}][${j}] must be between 0 and 1 (got ${String(v)})`;
      if (Math.abs(v - kss[j]![i]!) > 1e-12) return `must be symmetric ([${i}][${j}] ≠ [${j}][${i}])`;
    }
  }
  const m = nSecs + 1;
  const at = (a: number, b: number) => (a === b ? 1 : a === 0 || b === 0 ? k : kss[a - 1]![b - 1]!);
  const L: number[][] = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  for (let i = 0; i < m; i++) {
    for (let j = 0; j <= i; j++) {
      let s = at(i, j);
      for (let q = 0; q < j; q++) s -= L[i]![q]! * L[j]![q]!;
      if (i === j) {
        if (!(s > 0)) return `with coupling ${k} to the primary the inductance matrix is not positive definite (no passive magnetic has these couplings)`;
        L[i]![i] = Math.sqrt(s);
      } else L[i]![j] = s / L[j]![j]!;
    }
  }
  return null;
}

/**
 * Computed preloads (see designCoupledBuck). Returns, per secondary, whether the chosen
 * preload reaches the band and the validated region; sets `preload` on the design.
 */
function computePreloads(design: CoupledBuckDesign, vinMax: number, light: number[], room: number[] | null): boolean[] {
  return design.secondaries.map((w, i) => {
    const o = design.outputs[i + 1]!;
    const v = Math.abs(o.voltage as number);
    const limit = room ? v * (1 + Math.max(room[i]!, 0.25 * (o.tolerance as number))) : Infinity;
    const fits = (ipre: number): boolean => {
      w.preload = ipre > 0 ? { resistance: (v / ipre) as Ohms, current: ipre as Amps } : null;
      const p = coupledPoint(design, vinMax, light, { detail: 'voltages' });
      const s = p.sec[i]!;
      return s.isec > 0 && s.vsec <= limit && s.tc >= 0.999 * p.toff;
    };
    if (fits(0)) { w.preload = null; return true; }
    const imax = Math.max(o.currentMax as number, 1e-3);
    let reached = fits(imax);
    let hi = imax;
    if (reached) {
      // Geometric bisection from 0.1 % of full load: eight halvings of the ratio reach about
      // 3 %, finer than the E24 step the resistor is then rounded to.
      let lo = imax * 1e-3;
      if (fits(lo)) hi = lo;
      for (let k = 0; k < 8 && hi > lo; k++) {
        const mid = Math.sqrt(lo * hi);
        if (fits(mid)) hi = mid; else lo = mid;
      }
    }
    w.preload = e24Preload(v, hi);
    if (reached) reached = fits(w.preload.current);
    w.preload = e24Preload(v, hi);
    return reached;
  });
}

/** The E24 resistor at or just below V/I (drawing at least I), with its current. */
function e24Preload(v: number, i: number): { resistance: Ohms; current: Amps } {
  let r = nearest('E24', v / i);
  if (r > v / i) r = nearest('E24', r * 0.9);
  return { resistance: r as Ohms, current: (v / r) as Amps };
}

export interface CoupledSpecExtras {
  maxSecondaries?: number;
  isolation?: { class: IsolationClass; workingVoltage: Volts } | null;
  coupling?: number;
}

export function designCoupledBuck(spec: StageSpec & CoupledSpecExtras): { ok: true; design: CoupledBuckDesign; reasons: string[]; flags: StageFlag[] } | { ok: false; flags: StageFlag[] } {
  const outer = finishing;
  try {
    return designCoupled(spec);
  } finally {
    finishing = outer;
  }
}

function designCoupled(spec: StageSpec & CoupledSpecExtras): { ok: true; design: CoupledBuckDesign; reasons: string[]; flags: StageFlag[] } | { ok: false; flags: StageFlag[] } {
  const bad = specErrors(spec);
  if (bad.length) return { ok: false, flags: bad };
  if (spec.outputs.length < 2) return { ok: false, flags: [flag('bad-input', 'error', 'a coupled-winding buck needs the primary output and at least one secondary', { field: 'outputs' })] };
  const pri = spec.outputs[0]!;
  const vpri = pri.voltage as number;
  if (!(vpri > 0) || vpri >= spec.vinMin) {
    return { ok: false, flags: [flag('no-headroom', 'error', `primary ${r3(vpri)} V must be positive and below the lowest input ${r3(spec.vinMin)} V`, { vpri, vinMin: spec.vinMin })] };
  }
  const k = spec.coupling ?? GENERIC_DEFAULTS.coupling;
  if (!(k > 0.5 && k < 1)) return { ok: false, flags: [flag('bad-input', 'error', `coupling: must be between 0.5 and 1 (got ${k})`, { field: 'coupling' })] };
  const reasons: string[] = [];
  const lib = spec.library;
  const refs: StagePartRef[] = [];
  let ctl: ControllerParams = { ...GENERIC_DEFAULTS.controller };
  let switches = {
    highSide: { ...GENERIC_DEFAULTS.highSide }, lowSide: { ...GENERIC_DEFAULTS.lowSide }, rdsHotFactor: GENERIC_DEFAULTS.rdsHotFactor as number,
    thetaJA: { highSide: GENERIC_DEFAULTS.switchThetaJA as number, lowSide: GENERIC_DEFAULTS.switchThetaJA as number, controller: GENERIC_DEFAULTS.controllerThetaJA as number },
    integrated: false,
  };
  if (lib) {
    // The controller's rating is checked against the magnetizing current's peak, which the
    // preliminary estimate below bounds (all outputs at full load, ideal ratios).
    const vf0 = (o: OutputSpec) => diodeVf(GENERIC_DEFAULTS.rectifier, o.currentMax as number);
    const im0 = (pri.currentMax as number) + spec.outputs.slice(1).reduce((a, o) => a + ((Math.abs(o.voltage) + vf0(o)) / vpri) * (o.currentMax as number), 0);
    const ipk0 = im0 * (1 + GENERIC_DEFAULTS.rippleTarget / 2);
    const sw = chooseSwitcher(lib, { vinMin: spec.vinMin, vinMax: spec.vinMax, iNeed: ipk0, ipk: ipk0, forcedPwm: true, ...(spec.margins ? { margins: spec.margins } : {}) });
    if ('problem' in sw) return { ok: false, flags: [flag('no-library-part', 'error', sw.problem, { vinMax: spec.vinMax, current: r3(ipk0) })] };
    ctl = sw.controller;
    switches = { highSide: sw.highSide, lowSide: sw.lowSide, rdsHotFactor: sw.rdsHotFactor, thetaJA: sw.thetaJA, integrated: sw.integrated };
    refs.push(...sw.refs);
    reasons.push(`parts: ${sw.reason} (forced PWM, synchronous low side)`);
  }
  const divider = bestDivider(vpri, ctl.vref);
  if (!divider) return { ok: false, flags: [flag('below-reference', 'error', `primary ${r3(vpri)} V is not above the ${ctl.vref} V reference`, { vpri, vref: ctl.vref })] };
  reasons.push(`feedback divider ${divider.rTop} Ω / ${divider.rBottom} Ω (E96) sets the primary to ${r3(divider.vout)} V, error ${r3(divider.error * 100)} %`);
  const fsw = spec.fsw as number;
  const secs = spec.outputs.slice(1);
  let rect: DiodeModel = { ...GENERIC_DEFAULTS.rectifier, ...(spec.rectifier ?? {}) };
  // With a library the rectifiers are library rows: a first choice from the plateau
  // n·(Vin,max − Vpri) + |Vout| times the turn-on spike factor on ideal ratios, confirmed
  // once the turns are known (below). One row for all windings until then.
  let rectRows: ({ row: LibraryRow; ref: StagePartRef } | null)[] = spec.outputs.slice(1).map(() => null);
  const thermal = { ambient: spec.ambient as number, tjMax: spec.tjMax as number };
  if (lib && !spec.rectifier) {
    rectRows = spec.outputs.slice(1).map((o, i) => {
      const n = (Math.abs(o.voltage) + 0.5) / vpri;
      const c = chooseRectifier(lib, 3 * (n * (spec.vinMax - vpri) + Math.abs(o.voltage)), (o.currentMax as number) * 1.1, `rectifier, winding ${i + 1}`, thermal);
      return 'problem' in c ? null : c;
    });
    const first = rectRows.find((r) => r);
    if (first) rect = diodeFromRow(first.row, GENERIC_DEFAULTS.rectifier);
  }
  const rectBad = diodeErrors(rect);
  if (rectBad) return { ok: false, flags: [flag('bad-input', 'error', `rectifier.${rectBad}`, { field: `rectifier.${rectBad.split(':')[0]}` })] };
  const mt = spec.magneticTolerance;
  if (mt !== undefined && !(mt && mt.inductance >= 0 && mt.inductance < 0.5 && mt.leakageLow > 0 && mt.leakageLow <= 1)) {
    return { ok: false, flags: [flag('bad-input', 'error', 'magneticTolerance: inductance must be 0 to below 0.5 and leakageLow above 0, at most 1', { field: 'magneticTolerance' })] };
  }
  const nSecs = spec.outputs.length - 1;
  const kss = spec.secondaryCoupling;
  if (kss !== undefined) {
    const why = couplingMatrixError(kss, nSecs, k);
    if (why) return { ok: false, flags: [flag('bad-input', 'error', `secondaryCoupling: ${why}`, { field: 'secondaryCoupling' })] };
  }
  // Magnetizing current at full load with ideal ratios, for the ripple target.
  const n0 = secs.map((o) => (Math.abs(o.voltage) + diodeVf(rect, o.currentMax as number)) / vpri);
  const imFull = Math.max((pri.currentMax as number) + secs.reduce((a, o, i) => a + n0[i]! * (o.currentMax as number), 0), 0.05);
  const target = GENERIC_DEFAULTS.rippleTarget;
  const dAtMax = vpri / spec.vinMax;
  const lCalc = ((spec.vinMax - vpri) * dAtMax) / (target * imFull * fsw);
  const Lp = nearest('E12', lCalc);
  reasons.push(`Lp = ${r3(Lp * 1e6)} µH (E12) for ${target * 100} % ripple of the ${r3(imFull)} A magnetizing current at Vin ${r3(spec.vinMax)} V`);
  const ripple = ((spec.vinMax - vpri) * dAtMax) / (Lp * fsw);
  let isat = (imFull + ripple / 2) * (1 + GENERIC_DEFAULTS.saturationMargin);
  const rp = (GENERIC_DEFAULTS.inductorDcrCoeff * Math.sqrt(Lp / 1e-6)) / Math.sqrt(isat);
  const dMaxEst = Math.min(0.95, vpri / spec.vinMin);
  // With the rectifier capacitance known, the secondaries are preloaded for continuous
  // conduction at their lightest load (found below on the ideal ratios before the turns).
  let cjPreload: number[] | null = null;
  // What the template takes from the spec alone (not from the turns or the preloads), chosen
  // once: the turns search below builds a template for every trial.
  const secCout = secs.map((o, i) => {
    const ipk = (2 * (o.currentMax as number)) / Math.max(1 - dMaxEst, 0.05);
    const esr = GENERIC_DEFAULTS.ceramicEsr;
    const budget = Math.max((o.rippleLimit as number) * 0.5 - esr * ipk, (o.rippleLimit as number) * 0.1);
    // Cout ≥ Isec·D/(fsw·ΔV) [common practice], plus the charge lost while a ramping
    // winding current is still below the load, Isec·(1−D)²/(4·fsw); at least 4.7 µF
    const need = Math.max(((o.currentMax as number) * (dMaxEst + (1 - dMaxEst) ** 2 / 4)) / (fsw * budget), 4.7e-6);
    return chooseCeramic(`secondary ${i + 1} output`, need, Math.abs(o.voltage) * (1 + o.tolerance) * 1.1, spec.ceramicDerating);
  });
  const secRect = secs.map((_, i) => (rectRows[i] ? diodeFromRow(rectRows[i]!.row, GENERIC_DEFAULTS.rectifier) : rect));
  // Primary capacitor: the on-time surplus Σn·Isec·D/fsw plus ΔIm/(8·fsw), within half the
  // ripple limit after the ESR step [common practice]; at least 10 µF.
  const priCout = chooseCeramic('primary output', Math.max(10e-6,
    (secs.reduce((a, o, i) => a + n0[i]! * (o.currentMax as number), 0) * dMaxEst + ripple / 8)
      / (fsw * Math.max((pri.rippleLimit as number) * 0.5 - GENERIC_DEFAULTS.ceramicEsr * (ripple + imFull), (pri.rippleLimit as number) * 0.1))),
    vpri * (1 + pri.tolerance), spec.ceramicDerating);
  const cinChoice = chooseCeramic('input', Math.max((imFull * 0.25) / (fsw * 0.01 * spec.vinMin), 1e-6), spec.vinMax, spec.ceramicDerating);
  const template = (turnsP: number, turnsS: number[]): CoupledBuckDesign => ({
    kind: 'cwbuck',
    vinMin: spec.vinMin, vinNom: spec.vinNom, vinMax: spec.vinMax,
    outputs: spec.outputs.map((o) => ({ ...o })),
    fsw: spec.fsw,
    primaryTurns: turnsP,
    inductance: Lp as Henries,
    primaryResistance: rp as Ohms,
    isat: isat as Amps,
    coreLossFraction: GENERIC_DEFAULTS.coreLossFraction,
    secondaries: secs.map((o, i) => {
      const ns = turnsS[i]!;
      const n = Math.abs(ns) / turnsP;
      const ipre = cjPreload ? cjPreload[i]! : preloadFor(o);
      const preload = cjPreload ? (ipre > 0 ? e24Preload(Math.abs(o.voltage), ipre) : null)
        : (o.currentMin as number) < ipre
          ? { resistance: nearest('E24', Math.abs(o.voltage) / ipre) as Ohms, current: 0 as Amps }
          : null;
      if (preload) preload.current = (Math.abs(o.voltage) / preload.resistance) as Amps;
      return {
        nodeId: o.nodeId,
        turns: ns,
        coupling: k,
        resistance: (rp * n * n) as Ohms,
        rectifier: { ...secRect[i]! },
        rectifierReverseVoltage: (n * (spec.vinMax - vpri) + Math.abs(o.voltage)) as Volts,
        cout: { ...secCout[i]! },
        preload,
        thetaJA: rectRows[i] ? (rectRows[i]!.row.params.thetaJA as number) : GENERIC_DEFAULTS.rectifierThetaJA,
      };
    }),
    cout: { ...priCout },
    cin: { ...cinChoice },
    divider,
    highSide: { ...switches.highSide },
    lowSide: { ...switches.lowSide },
    rdsHotFactor: switches.rdsHotFactor,
    bodyDiode: { ...GENERIC_DEFAULTS.bodyDiode },
    controller: ctl,
    thetaJA: { ...switches.thetaJA, inductor: GENERIC_DEFAULTS.inductorThetaJA },
    tjMax: spec.tjMax,
    ...(switches.integrated ? { integrated: true } : {}),
    maxSecondaries: spec.maxSecondaries ?? GENERIC_DEFAULTS.maxSecondaries,
    powerLimit: GENERIC_DEFAULTS.coupledPowerLimit as Watts,
    dutyWarn: GENERIC_DEFAULTS.coupledDutyWarn as Ratio,
    isolation: spec.isolation ?? null,
    ...(kss ? { secondaryCoupling: kss.map((row) => [...row]) } : {}),
    ...(spec.magneticTolerance ? { magneticTolerance: { ...spec.magneticTolerance } } : {}),
  });
  // Turns: the smallest Np (from 3, common practice for a defined leakage and flux) whose
  // integer secondaries keep every secondary's band (secondaries light at Vin max, at full
  // load at Vin min, after the rectifier drop) inside the room its tolerance leaves after
  // the setpoint, rectifier and ripple spreads; failing that (up
  // to Np = 20), the smallest Np that puts the band's centre within 25 % of the tolerance of
  // the target, then 50 %, then 100 %, before giving up. How wide the band is around
  // that centre is the window's business (stageWindows), not a reason to refuse: a planner
  // may still post-regulate the winding.
  // High end: primary at full load (its current lifts the low-side drop the windings see),
  // secondaries light; low end the other way round.
  const light = [pri.currentMax as number, ...secs.map((o) => o.currentMin as number)];
  const heavy = [pri.currentMin as number, ...secs.map((o) => o.currentMax as number)];
  // What the band may use of each tolerance: less the setpoint spread (reference plus two
  // E96 resistors), the rectifier-drop spread and half the ripple limit.
  const setTol = ctl.vrefTolerance + 2 * divider.tolerance;
  const room = secs.map((o) => {
    const v = Math.abs(o.voltage);
    return (o.tolerance as number) - setTol - (rect.vfSpread * diodeVf(rect, o.currentMax as number)) / v - (o.rippleLimit as number) / 2 / v;
  });
  if ((rect.cjo ?? 0) > 0) {
    const NP = 1000;
    const probe = template(NP, n0.map((n, i) => Math.round(n * NP) * Math.sign(secs[i]!.voltage)));
    computePreloads(probe, spec.vinMax as number, light, null);
    cjPreload = probe.secondaries.map((w) => (w.preload ? w.preload.current : 0));
    // The preloads' reflected current adds to the magnetizing peak.
    isat += cjPreload.reduce((a, ip, i) => a + n0[i]! * ip, 0) * (1 + GENERIC_DEFAULTS.saturationMargin);
  }
  // The same turns are often asked for twice (the refined combination is one of the ±1
  // trials when every secondary moved the same way): solved once.
  const errorsSeen = new Map<string, { centre: number; half: number }[]>();
  const errorsFor = (turnsP: number, turnsS: number[]) => {
    const key = `${turnsP}:${turnsS.join(':')}`;
    const seen = errorsSeen.get(key);
    if (seen) return seen;
    const e = solveErrors(turnsP, turnsS);
    errorsSeen.set(key, e);
    return e;
  };
  // A turns trial differs from the template only in the turns and the winding resistances
  // that scale with them (n²·Rp), so the trials share one template built once the preloads
  // are known (the same numbers reach coupledPoint as from a full template per trial).
  let trialBase: CoupledBuckDesign | null = null;
  const trial = (turnsP: number, turnsS: number[]): CoupledBuckDesign => {
    trialBase ??= template(turnsP, turnsS);
    const base = trialBase;
    return {
      ...base,
      primaryTurns: turnsP,
      secondaries: base.secondaries.map((w, i) => {
        const n = Math.abs(turnsS[i]!) / turnsP;
        return { ...w, turns: turnsS[i]!, resistance: (rp * n * n) as Ohms };
      }),
    };
  };
  const solveErrors = (turnsP: number, turnsS: number[]) => {
    const dsg = trial(turnsP, turnsS);
    // The band's extremes: light load at Vin max (most off-time, least drop) and full load at
    // Vin min (least off-time, most drop).
    const a = coupledPoint(dsg, spec.vinMax as number, light, { detail: 'voltages' });
    const b = coupledPoint(dsg, spec.vinMin as number, heavy, { detail: 'voltages' });
    return secs.map((o, i) => {
      const t = Math.abs(o.voltage);
      const va = a.sec[i]!.vsec;
      const vb = b.sec[i]!.vsec;
      return { centre: ((va + vb) / 2 - t) / t, half: Math.abs(va - vb) / 2 / t };
    });
  };
  const scoreOf = (e: { centre: number; half: number }[]) =>
    Math.max(...e.map((x, i) => Math.abs(x.centre) / (secs[i]!.tolerance as number)));
  let chosen: { np: number; ns: number[]; err: number[] } | null = null;
  const NP_MAX = 40;
  const tried: { np: number; ns: number[]; err: number[]; each: number[]; score: number; fit: number }[] = [];
  for (let np = 3; np <= NP_MAX; np++) {
    const ns = n0.map((n, i) => Math.max(1, Math.round(n * np)) * Math.sign(secs[i]!.voltage));
    // Refine every secondary by ±1 turn with the full model. The windings hardly load each
    // other once the primary clamps them, so all secondaries step together and each keeps
    // its own best; a last evaluation gives the errors of the combination.
    const base = errorsFor(np, ns);
    const stepped = [-1, 1].map((step) => {
      const trial = ns.map((x, i) => Math.max(1, Math.abs(x) + step) * Math.sign(secs[i]!.voltage));
      return { trial, e: errorsFor(np, trial) };
    });
    let changed = false;
    for (let i = 0; i < ns.length; i++) {
      let bestAbs = Math.abs(base[i]!.centre);
      for (const st of stepped) {
        if (st.trial[i] !== ns[i] && Math.abs(st.e[i]!.centre) < bestAbs) { bestAbs = Math.abs(st.e[i]!.centre); ns[i] = st.trial[i]!; changed = true; }
      }
    }
    const e = changed ? errorsFor(np, ns) : base;
    const score = scoreOf(e);
    // Whole band inside the room the tolerances leave: the preferred outcome.
    const fit = Math.max(...e.map((x, i) => (room[i]! > 0 ? (Math.abs(x.centre) + x.half) / room[i]! : Infinity)));
    tried.push({ np, ns, err: e.map((x) => x.centre), each: e.map((x, i) => Math.abs(x.centre) / (secs[i]!.tolerance as number)), score, fit });
    if (fit <= 1) break;
    // Beyond Np = 20 stop looking for a band fit once some Np centres the bands well.
    if (np >= 20 && tried.some((t) => t.score <= 0.25)) break;
  }
  chosen = tried.find((t) => t.fit <= 1) ?? null;
  for (const share of [0.25, 0.5, 1.0]) {
    if (chosen) break;
    chosen = tried.find((t) => t.score <= share) ?? null;
  }
  if (!chosen) {
    const best = tried.reduce((a, b) => (b.score < a.score ? b : a));
    return {
      ok: false,
      flags: secs.flatMap((o, i) => best.each[i]! <= 1 ? [] : [flag('turns-no-fit', 'error',
        `no integer turns up to Np = ${NP_MAX} keep ${o.nodeId} (${r3(o.voltage)} V ±${r3(o.tolerance * 100)} %) within tolerance: the centre of its band (light load at Vin max to full load at Vin min) is at best ${r3(best.err[i]! * 100)} % off (Np = ${best.np}, Ns = ${best.ns[i]})`,
        { nodeId: o.nodeId, error: r3(best.err[i]!), np: best.np, ns: best.ns[i]! })]),
    };
  }
  const design = template(chosen.np, chosen.ns);
  finishing = { design, points: new Map() };
  // Rectifier reverse voltage: the turn-on spike at Vin max and full load, not the plateau
  // n·(Vin,max − Vpri) + |Vout| (the grid simulates 2.7–2.95 × the plateau).
  const atMax = coupledPoint(design, spec.vinMax as number, spec.outputs.map((o) => o.currentMax as number), { detail: 'voltages' });
  design.secondaries.forEach((w, i) => { w.rectifierReverseVoltage = rectifierPeakReverse(design, atMax, i) as Volts; });
  if (lib && !spec.rectifier) {
    // Confirm each winding's rectifier against its turn-on spike; a higher-rated row where
    // the first choice falls short (its drop and capacitance then replace the first).
    for (let i = 0; i < design.secondaries.length; i++) {
      const w = design.secondaries[i]!;
      const o = secs[i]!;
      const avg = (o.currentMax as number) + (w.preload?.current ?? 0);
      const got = rectRows[i];
      const fits = got && (got.row.params.vr as number) * 0.8 >= (w.rectifierReverseVoltage as number) && (got.row.params.if as number) >= 1.5 * avg;
      if (fits) continue;
      let c = chooseRectifier(lib, w.rectifierReverseVoltage as number, avg, `rectifier, winding ${i + 1}`, thermal);
      if ('problem' in c) {
        // No part blocks the undamped turn-on spike: an RC snubber across the rectifier
        // [common practice: Cs ≈ 3 × the rectifier's capacitance, Rs ≈ √(Llk/Cj), the ring's
        // characteristic impedance] holds the peak near 1.3 × the plateau (the independent
        // grid's snubbed windings: 1.17–1.18 ×), at a loss of Cs·Vr²·fsw.
        const plateau = atMax.sec[i]!.n * atMax.von + atMax.sec[i]!.vsec;
        const snubbed = chooseRectifier(lib, 1.3 * plateau, avg, `rectifier, winding ${i + 1}`, thermal);
        const cj = 'problem' in snubbed ? 0 : (snubbed.row.params.cj as number | undefined) ?? 0;
        if (!('problem' in snubbed) && cj > 0 && atMax.sec[i]!.llk > 0) {
          w.snubber = { r: nearest('E24', Math.sqrt(atMax.sec[i]!.llk / cj)) as Ohms, c: nearest('E12', 3 * cj) };
          reasons.push(`${o.nodeId}: RC snubber ${r3(w.snubber.r)} Ω / ${r3(w.snubber.c * 1e12)} pF across the rectifier: no library part blocks the ${r3(w.rectifierReverseVoltage as number)} V undamped turn-on spike; snubbed, about ${r3(1.3 * plateau)} V, at ${r3(w.snubber.c * plateau * plateau * (spec.fsw as number) * 1e3)} mW`);
          c = snubbed;
        }
      }
      if ('problem' in c) {
        return { ok: false, flags: [flag('no-library-part', 'error', `${o.nodeId}: ${c.problem}: the turn-on spike is ${r3((w.rectifierReverseVoltage as number) / (atMax.sec[i]!.n * atMax.von + atMax.sec[i]!.vsec))} × the winding's plateau; a lower turns ratio, a snubber or a higher-rated rectifier in the library is needed`, { nodeId: o.nodeId, reverse: r3(w.rectifierReverseVoltage as number) })] };
      }
      rectRows[i] = c;
      w.rectifier = diodeFromRow(c.row, GENERIC_DEFAULTS.rectifier);
      w.thetaJA = c.row.params.thetaJA as number;
    }
    const again = coupledPoint(design, spec.vinMax as number, spec.outputs.map((o) => o.currentMax as number), { detail: 'voltages' });
    design.secondaries.forEach((w, i) => { w.rectifierReverseVoltage = rectifierPeakReverse(design, again, i) as Volts; });
    for (const r of rectRows) if (r) refs.push(r.ref);
  }
  // With the rectifier's capacitance known the preload is computed: the smallest that keeps
  // each secondary, at its lightest load with the primary at full load and Vin max, inside
  // its band and in continuous conduction (where the grid shows the model within 4 %; a
  // peak-charged secondary strays 5–50 %). Without it the 2 % rule stays.
  const computed = (rect.cjo ?? 0) > 0 || design.secondaries.some((w) => (w.rectifier.cjo ?? 0) > 0) ? computePreloads(design, spec.vinMax as number, light, room) : null;
  // The magnetic is specified by this design: its saturation current covers the worst
  // magnetizing peak with the preloads in place (Vin max, full load), plus the margin.
  {
    const pk = coupledPoint(design, spec.vinMax as number, spec.outputs.map((o) => o.currentMax as number), { detail: 'voltages' });
    design.isat = Math.max(design.isat as number, Math.max(pk.impk, Math.abs(pk.iend)) * (1 + GENERIC_DEFAULTS.saturationMargin)) as Amps;
  }

  // The custom magnetic on a core of the table: its windings' DC resistance replaces the
  // generic estimate (the currents move a little with it, so the core is designed again
  // until the wire, and so the resistance, stays put; twice is usually enough).
  for (let pass = 0; pass < 3; pass++) {
    const core = designMagneticCore(coupledMagneticDemand(design), { currentDensity: WINDING_CURRENT_DENSITY });
    const same = design.magneticCore && core.windings.every((w, i) => w.rdc === design.magneticCore!.windings[i]!.rdc);
    design.magneticCore = core;
    design.primaryResistance = core.windings[0]!.rdc as Ohms;
    design.secondaries.forEach((w, i) => { w.resistance = core.windings[i + 1]!.rdc as Ohms; });
    if (same) break;
  }
  // The construction's estimated leakage must not exceed what the windows assumed (the spec
  // sheet states that range as a requirement): else the core design is open, and flagged below.
  for (const text of leakageProblems(design, design.magneticCore!)) {
    design.magneticCore!.problems.push(text);
    design.magneticCore!.ok = false;
  }
  {
    const c = design.magneticCore!;
    reasons.push(`magnetic: ${c.core.name}, ${c.material.name}, turns × ${c.turnsMultiplier} = ${c.windings.map((w) => Math.abs(w.turns)).join(':')}, peak flux ${r3(c.peakFlux * 1e3)} mT (limit ${r3(c.fluxLimit * 1e3)} mT); at Vin ${r3(spec.vinMax)} V and full load core loss ${r3(c.coreLoss * 1e3)} mW (Steinmetz, coefficients from memory), copper ${r3(c.copperLoss * 1e3)} mW (DC resistance with the Dowell AC factor); winding resistances are the designed windings'`);
  }

  // Second pass on the output capacitors with the full ripple model: where an output uses
  // more than half its ripple limit at Vin min or max (full load), enlarge its bank.
  const fullLoad = spec.outputs.map((o) => o.currentMax);
  for (const vin of [spec.vinMin, spec.vinMax]) {
    const ev = evaluateCoupledBuck(design, { vin, iout: fullLoad, ambient: spec.ambient });
    ev.outputs.forEach((out, i) => {
      const lim = spec.outputs[i]!.rippleLimit as number;
      if (!(out.ripplePP > 0.5 * lim)) return;
      const bank = i === 0 ? design.cout : design.secondaries[i - 1]!.cout;
      const grown = chooseCeramic(bank.role, bank.effective * (out.ripplePP / (0.5 * lim)), bank.workingVoltage, spec.ceramicDerating);
      if (i === 0) design.cout = grown;
      else design.secondaries[i - 1]!.cout = grown;
    });
  }
  // Every bank's RMS ripple current, the largest at Vin min and max with every output at full
  // load: the library part count below covers it with the parts' ripple rating.
  {
    const at = [spec.vinMin, spec.vinMax].map((vin) => coupledBankRms(design, coupledPoint(design, vin, fullLoad as number[]), pri.currentMax as number));
    design.cin = { ...design.cin, rmsCurrent: Math.max(...at.map((a) => a.cin)) };
    design.cout = { ...design.cout, rmsCurrent: Math.max(...at.map((a) => a.cout)) };
    design.secondaries.forEach((w, i) => { w.cout = { ...w.cout, rmsCurrent: Math.max(...at.map((a) => a.secondaries[i]!)) }; });
  }
  if (lib) {
    // Capacitor banks as library rows (ESR, rating and ripple current of the part).
    const banks: [CapacitorChoice, (c: CapacitorChoice) => void][] = [
      [design.cin, (c) => { design.cin = c; }],
      [design.cout, (c) => { design.cout = c; }],
      ...design.secondaries.map((w) => [w.cout, (c: CapacitorChoice) => { w.cout = c; }] as [CapacitorChoice, (c: CapacitorChoice) => void]),
    ];
    for (const [bank, set] of banks) {
      const pick = chooseCeramicRow(lib, bank, spec.electrolyticDerating);
      if (!pick) continue;
      set(pick.bank);
      refs.push(pick.ref);
    }
    design.parts = refs;
  }
  design.secondaries.forEach((w) => {
    const c = w.cout;
    reasons.push(`${w.nodeId}: output capacitor ${c.count} × ${r3(c.value * 1e6)} µF ${c.ratedVoltage} V ${c.partKind ?? 'ceramic'}; RMS ripple current up to ${r3(c.rmsCurrent ?? 0)} A (√(Irect,rms² − Iload²) of the rectified winding's pulses)${c.rippleRating ? ` against ${c.count} × ${r3(c.rippleRating)} A` : ''}`);
  });
  reasons.push(`turns ${chosen.np}:${chosen.ns.join(':')} (primary:secondaries, sign = winding sense) centre the secondaries' bands (light load at Vin max to full load at Vin min) at ${chosen.err.map((e) => `${r3(e * 100)} %`).join(', ')} of target`);
  reasons.push(`coupling k = ${k} (leakage ${design.secondaries.map((w) => `${r3(((w.turns / chosen!.np) ** 2 * Lp * (1 - k * k)) / (k * k) * 1e9)} nH`).join(', ')} seen from the secondaries)`);
  design.secondaries.forEach((w, i) => {
    const plateau = atMax.sec[i]!.n * atMax.von + atMax.sec[i]!.vsec;
    reasons.push(`${w.nodeId}: rectifier reverse voltage up to ${r3(w.rectifierReverseVoltage)} V at the turn-on edge (Vin ${r3(spec.vinMax)} V), ${r3((w.rectifierReverseVoltage as number) / plateau)} × the ${r3(plateau)} V plateau: the leakage rings with the rectifier capacitance and, lightly damped, keeps ringing (the independent grid simulates 2.7–2.95 ×; its two RC-snubbed windings 1.2 ×)`);
  });
  const libCj = rectRows.map((r) => (r ? (r.row.params.cj as number | undefined) ?? 0 : 0)).filter((c) => c > 0);
  if (!computed && libCj.length) {
    reasons.push(`the library gives the rectifiers' capacitance (${libCj.map((c) => `${r3(c * 1e12)} pF`).join(', ')}), but the leakage ring it sets is not modelled in this design: the ring model is validated only while a secondary conducts through the whole off-time, and on the independent ngspice grid a secondary at 1–10 % load read 1.5–57 % above the plain model; the 2 % preload rule stands in, so check light-load secondaries on the bench`);
  } else if (!computed) {
    reasons.push('rectifier capacitance not given (rectifier.cjo): the leakage ring and the peak charging of lightly loaded secondaries are not modelled, and the 2 % preload rule is a rule of thumb; on the independent ngspice grid a secondary at 1–10 % load read 1.5–57 % above this model');
  }
  design.secondaries.forEach((w, i) => {
    if (!w.preload) return;
    if (computed) {
      reasons.push(`${w.nodeId}: preload ${r3(w.preload.resistance)} Ω (${r3(w.preload.current * 1e3)} mA, ${r3(w.preload.current * w.preload.current * w.preload.resistance * 1e3)} mW), the smallest E24 value that keeps it inside its band and in continuous conduction at ${r3((secs[i]!.currentMin as number) * 1e3)} mA and Vin ${r3(spec.vinMax)} V: the leakage ring with the rectifier's ${r3((w.rectifier.cjo ?? 0) * 1e12)} pF peak-charges a lighter load${computed[i] ? '' : ' (even a full-load preload does not get it there: see the flags)'}`);
    } else {
      reasons.push(`${w.nodeId}: preload ${r3(w.preload.resistance)} Ω (${r3(w.preload.current * 1e3)} mA) because a lightly loaded secondary rises above its target`);
    }
  });
  // Full load at Vin min and max, and the primary at its lightest with the secondaries at
  // full load (the deepest low-side negative peak).
  const full = spec.outputs.map((o) => o.currentMax);
  const lightPri = [pri.currentMin, ...secs.map((o) => o.currentMax)];
  const flags = feasibility(design, spec.ambient as number, full as number[], (vin) => {
    const a = evaluateCoupledBuck(design, { vin: vin as Volts, iout: full, ambient: spec.ambient });
    const b = evaluateCoupledBuck(design, { vin: vin as Volts, iout: lightPri, ambient: spec.ambient });
    return { ...a, flags: [...a.flags, ...b.flags] };
  });
  if (flags.some((f) => f.severity === 'error')) return { ok: false, flags };
  const mc = design.magneticCore!;
  if (!mc.ok) {
    flags.push(flag('magnetic-core-open', 'warning', `the custom magnetic does not close on any core of the table (best attempt ${mc.core.name}: ${mc.problems.join('; ')}); its losses are those of that attempt`,
      { core: mc.core.name, problems: mc.problems.length }));
  }
  return { ok: true, design, reasons, flags };
}
