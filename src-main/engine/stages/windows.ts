/**
 * Worst-case output windows. The corner set (docs/stage-json.md):
 *   every input voltage given (normally Vin min, nom, max)
 * × every output at its smallest and its largest current (all 2^n combinations, so the
 *   cross-regulation between windings is covered)
 * × the tolerance extremes: reference and E96 divider resistors (setpoint low / high),
 *   rectifier drop (1 ∓ spread) for coupled windings, LDO accuracy ± (outputs rise with the
 *   setpoint and fall with the drop, so "setpoint low, drop high" and "setpoint high, drop
 *   low" bound every output);
 * × for a coupled-winding stage, the magnetic's own tolerances as its specification sheet
 *   states them: Lp at 1 ∓ its tolerance, each with the leakage at both ends of its range,
 *   and the nominal magnetic (cwbuck/index.ts coupledMagneticCorners);
 * and each output's value at a corner is its DC voltage ∓ half its peak-to-peak ripple.
 * An optional seeded Monte Carlo draws every quantity uniformly inside its range (the
 * magnetic's Lp and leakage too).
 */
import type { Amps, Celsius, Volts } from '../units.ts';
import type { OutputSpec, OutputWindow } from './types.ts';
import type { DividerChoice } from '../eseries.ts';
import { buckAtDuty, buckPoint, evaluateBuck, type BuckDesign } from './buck/index.ts';
import { coupledMagneticCorners, coupledOutputs, magneticTolerance, withMagneticCorner, type CoupledBuckDesign } from './cwbuck/index.ts';
import { ldoPoint, type LdoDesign } from './ldo/index.ts';
import { boostWindowAt, type BoostDesign } from './boost/index.ts';
import { invertingWindowAt, type InvertingDesign } from './inverting/index.ts';
import { fourSwitchWindowAt, type FourSwitchDesign } from './buck-boost-4s/index.ts';
import { loadSwitchWindowAt, type LoadSwitchDesign } from './load-switch/index.ts';
import { isoModuleWindowAt, type IsoModuleDesign } from './iso-module/index.ts';
import { mulberry32, r3 } from './common.ts';

export type WindowDesign = BuckDesign | CoupledBuckDesign | LdoDesign | BoostDesign | InvertingDesign | FourSwitchDesign | LoadSwitchDesign | IsoModuleDesign;

export interface WindowCorners {
  vin: Volts[];
  iout: { min: Amps; max: Amps }[];
}

export interface WindowOptions {
  /**
   * Coupled-winding stages: 'extremes' (default) evaluates the magnetic's tolerance corners
   * at the operating corners of each output's nominal extremes; 'full' at every corner.
   */
  magneticSweep?: 'extremes' | 'full';
  monteCarlo?: { runs: number; seed: number };
  /** Ambient for the evaluations (does not move the voltages; default 25 °C). */
  ambient?: Celsius;
}

/** Tolerance draws: each in [−1, 1], scaled by the design's own tolerances. */
interface Draw {
  vref: number;
  rTop: number;
  rBottom: number;
  vf: number;
  accuracy: number;
}

function setpoint(div: DividerChoice, vrefTol: number, x: Draw): number {
  const vref = div.vref * (1 + vrefTol * x.vref);
  const rt = div.rTop * (1 + div.tolerance * x.rTop);
  const rb = div.rBottom * (1 + div.tolerance * x.rBottom);
  return vref * (1 + rt / rb);
}

/** Signed output values (DC ∓ ripple/2 as [low, high] in magnitude) at one corner. */
function outputsAt(d: WindowDesign, vin: number, iout: number[], x: Draw): { lo: number; hi: number }[] {
  const ambient = 25 as Celsius;
  if (d.kind === 'buck') {
    const sp = setpoint(d.divider, d.controller.vrefTolerance, x);
    const io = iout[0] ?? 0;
    const ev = evaluateBuck(d, { vin: vin as Volts, iout: [io as Amps], ambient });
    let v = sp;
    if (buckPoint(d, vin, io, sp).duty > d.controller.maxDuty) {
      // Out of regulation: the output follows the maximum duty.
      v = buckAtDuty(d, vin, io, d.controller.maxDuty).vout;
    }
    const rp = ev.outputs[0]!.ripplePP as number;
    return [{ lo: v - rp / 2, hi: v + rp / 2 }];
  }
  if (d.kind === 'boost') {
    // Boost: setpoint from reference and divider; out of regulation (duty limit, or an input
    // above the setpoint) the output follows the input (stages/boost/index.ts).
    return [boostWindowAt(d, vin, iout[0] ?? 0, setpoint(d.divider, d.controller.vrefTolerance, x))];
  }
  if (d.kind === 'iso-module') {
    // Unregulated: the input's spread and the load-regulation line set the output (magnitudes).
    return [isoModuleWindowAt(d, vin, iout[0] ?? 0)];
  }
  if (d.kind === 'load-switch') {
    // The input less the hot drop; no reference or divider of its own (the corners' tolerance
    // cases give the same value).
    return [loadSwitchWindowAt(d, vin, iout[0] ?? 0)];
  }
  if (d.kind === 'buck-boost-4s') {
    return [fourSwitchWindowAt(d, vin, iout[0] ?? 0, setpoint(d.divider, d.controller.vrefTolerance, x))];
  }
  if (d.kind === 'inverting') {
    // Inverting: magnitudes (the caller signs them); the setpoint is on |Vout|.
    return [invertingWindowAt(d, vin, iout[0] ?? 0, setpoint(d.divider, d.controller.vrefTolerance, x))];
  }
  if (d.kind === 'cwbuck') {
    const sp = setpoint(d.divider, d.controller.vrefTolerance, x);
    const vfScale = 1 + d.secondaries.reduce((a, w) => Math.max(a, w.rectifier.vfSpread), 0) * x.vf;
    return coupledOutputs(d, vin, iout, { vPrimary: sp, vfScale }).map((o) => {
      const m = Math.abs(o.voltage);
      return { lo: m - o.ripplePP / 2, hi: m + o.ripplePP / 2 };
    });
  }
  const set = Math.abs(d.outputs[0]!.voltage) * (1 + d.accuracy * x.accuracy);
  const p = ldoPoint(d, Math.abs(vin), iout[0] ?? 0, set);
  return [{ lo: p.vout - p.ripple / 2, hi: p.vout + p.ripple / 2 }];
}

/** "min/max/…": which outputs are at their largest current in a corner. */
function cornerLoads(n: number, mask: number): string {
  const parts: string[] = [];
  for (let i = 0; i < n; i++) parts.push(mask & (1 << i) ? 'max' : 'min');
  return parts.join('/');
}

function bandOf(o: OutputSpec): { min: number; max: number } {
  const a = (o.voltage as number) * (1 - o.tolerance);
  const b = (o.voltage as number) * (1 + o.tolerance);
  return { min: Math.min(a, b), max: Math.max(a, b) };
}

export function stageWindows(d: WindowDesign, corners: WindowCorners, opts: WindowOptions = {}): OutputWindow[] {
  const n = d.outputs.length;
  if (!Array.isArray(corners.vin) || corners.vin.length === 0 || corners.vin.some((v) => !Number.isFinite(v))) {
    throw new RangeError('corners.vin: give at least one finite input voltage');
  }
  if (!Array.isArray(corners.iout) || corners.iout.length !== n) {
    throw new RangeError(`corners.iout: need one {min, max} per output (${n}), got ${Array.isArray(corners.iout) ? corners.iout.length : 'none'}`);
  }
  corners.iout.forEach((c, i) => {
    if (!(Number.isFinite(c.min) && Number.isFinite(c.max) && c.min >= 0 && c.max >= c.min)) {
      throw new RangeError(`corners.iout[${i}]: need 0 ≤ min ≤ max (got ${c.min}, ${c.max})`);
    }
  });
  const lo = new Array<number>(n).fill(Infinity);
  const hi = new Array<number>(n).fill(-Infinity);
  const loAt = new Array<string>(n).fill('');
  const hiAt = new Array<string>(n).fill('');
  // The operating corner (input, loads, tolerance case) of each output's extreme, for the
  // magnetic's corners below.
  type At = { vin: number; mask: number; iout: number[]; tc: { x: Draw; label: string; design: WindowDesign } };
  const loPt = new Array<At | null>(n).fill(null);
  const hiPt = new Array<At | null>(n).fill(null);
  const tolCases: { x: Draw; label: string; design: WindowDesign }[] = [];
  const hasVf = d.kind === 'cwbuck';
  const magnetic = d.kind === 'cwbuck' ? coupledMagneticCorners(d) : null;
  // Every output rises with the setpoint and falls with the rectifier drop, so two cases
  // bound them all: setpoint low with the drop high, and setpoint high with the drop low.
  for (const s of [-1, 1]) {
    const f = hasVf ? -s : 0;
    const x: Draw = { vref: s, rTop: s, rBottom: -s, vf: f, accuracy: s };
    const label = `${d.kind === 'ldo' ? 'accuracy' : 'reference and divider'} ${s < 0 ? 'low' : 'high'}${hasVf ? `, rectifier drop ${f < 0 ? 'low' : 'high'}` : ''}`;
    // A load switch has no setpoint: its output is the input less the drop, one case.
    if (d.kind === 'load-switch' || d.kind === 'iso-module') {
      if (s > 0) tolCases.push({ x, design: d, label: d.kind === 'load-switch' ? 'input less the hot switch drop' : 'ratio and load-regulation line' });
      continue;
    }
    if (d.kind === 'cwbuck' && opts.magneticSweep === 'full') {
      for (const m of magnetic!) tolCases.push({ x, design: m.design, label: m.design === d ? label : `${label}, ${m.label}` });
      continue;
    }
    tolCases.push({ x, design: d, label });
  }
  // An output whose smallest and largest currents are equal, or an input voltage given twice,
  // repeats corners already evaluated: they cannot set a new (strict) extreme, so skip them.
  let fixed = 0;
  corners.iout.forEach((c, i) => { if (c.min === c.max) fixed |= 1 << i; });
  for (let k = 0; k < corners.vin.length; k++) {
    const vin = corners.vin[k]!;
    if (corners.vin.indexOf(vin) < k) continue;
    for (let mask = 0; mask < 1 << n; mask++) {
      if (mask & fixed) continue;
      const iout = corners.iout.map((c, i) => (mask & (1 << i) ? c.max : c.min) as number);
      for (const tc of tolCases) {
        const vals = outputsAt(tc.design, vin, iout, tc.x);
        // The corner's label is built only when it sets a new extreme.
        let where: string | null = null;
        for (let i = 0; i < vals.length; i++) {
          const v = vals[i]!;
          const low = v.lo < lo[i]!, high = v.hi > hi[i]!;
          if (!low && !high) continue;
          where ??= `Vin ${r3(vin)} V, loads ${cornerLoads(iout.length, mask)}, ${tc.label}`;
          if (low) { lo[i] = v.lo; loAt[i] = where; loPt[i] = { vin, mask, iout, tc }; }
          if (high) { hi[i] = v.hi; hiAt[i] = where; hiPt[i] = { vin, mask, iout, tc }; }
        }
      }
    }
  }
  if (d.kind === 'cwbuck' && opts.magneticSweep !== 'full' && magnetic!.length > 1) {
    // The magnetic's corners at the operating corners where each output reached its nominal
    // extremes (the magnetic moves an output by a small fraction; where it peaks is where
    // the load, input and setpoint put it). Checked against the full sweep, every magnetic
    // corner at every operating corner, in test/engine/stages/cwbuck-magnetic-tolerance.test.ts.
    const seen = new Set<At>();
    for (const pt of [...loPt, ...hiPt]) {
      if (!pt || seen.has(pt)) continue;
      seen.add(pt);
      for (const m of magnetic!) {
        if (m.design === d) continue;
        const vals = outputsAt(m.design, pt.vin, pt.iout, pt.tc.x);
        let where: string | null = null;
        for (let i = 0; i < vals.length; i++) {
          const v = vals[i]!;
          const low = v.lo < lo[i]!, high = v.hi > hi[i]!;
          if (!low && !high) continue;
          where ??= `Vin ${r3(pt.vin)} V, loads ${cornerLoads(pt.iout.length, pt.mask)}, ${pt.tc.label}, ${m.label}`;
          if (low) { lo[i] = v.lo; loAt[i] = where; }
          if (high) { hi[i] = v.hi; hiAt[i] = where; }
        }
      }
    }
  }
  // Every corner of the set was evaluated unless the magnetic's corners were taken only at
  // the nominal extremes.
  const exhaustive = !(d.kind === 'cwbuck' && opts.magneticSweep !== 'full' && magnetic!.length > 1);
  let mc: { min: number[]; max: number[] } | null = null;
  const runs = opts.monteCarlo ? Math.max(0, Math.min(1e6, Math.floor(opts.monteCarlo.runs))) : 0;
  if (opts.monteCarlo && runs > 0) {
    const rnd = mulberry32(opts.monteCarlo.seed);
    const u = () => 2 * rnd() - 1;
    const vmin = Math.min(...corners.vin), vmax = Math.max(...corners.vin);
    mc = { min: new Array<number>(n).fill(Infinity), max: new Array<number>(n).fill(-Infinity) };
    for (let r = 0; r < runs; r++) {
      const vin = vmin + (vmax - vmin) * rnd();
      const iout = corners.iout.map((c) => c.min + (c.max - c.min) * rnd());
      const x: Draw = { vref: u(), rTop: u(), rBottom: u(), vf: hasVf ? u() : 0, accuracy: u() };
      // A coupled-winding stage also draws its magnetic inside the tolerances its sheet states.
      let dd: WindowDesign = d;
      if (d.kind === 'cwbuck') {
        const t = magneticTolerance(d);
        dd = withMagneticCorner(d, 1 + t.inductance * u(), t.leakageLow + (1 - t.leakageLow) * rnd());
      }
      outputsAt(dd, vin, iout, x).forEach((v, i) => {
        mc!.min[i] = Math.min(mc!.min[i]!, v.lo);
        mc!.max[i] = Math.max(mc!.max[i]!, v.hi);
      });
    }
  }
  return d.outputs.map((o, i) => {
    const neg = (o.voltage as number) < 0;
    const band = bandOf(o);
    const min = neg ? -hi[i]! : lo[i]!;
    const max = neg ? -lo[i]! : hi[i]!;
    const w: OutputWindow = {
      nodeId: o.nodeId,
      target: o.voltage,
      min: min as Volts,
      max: max as Volts,
      allowedMin: band.min as Volts,
      allowedMax: band.max as Volts,
      inside: min >= band.min - 1e-12 && max <= band.max + 1e-12,
      minCorner: neg ? hiAt[i]! : loAt[i]!,
      maxCorner: neg ? loAt[i]! : hiAt[i]!,
      exhaustive,
    };
    if (mc && opts.monteCarlo) {
      w.monteCarlo = {
        min: (neg ? -mc.max[i]! : mc.min[i]!) as Volts,
        max: (neg ? -mc.min[i]! : mc.max[i]!) as Volts,
        runs,
        seed: opts.monteCarlo.seed,
      };
    }
    return w;
  });
}
