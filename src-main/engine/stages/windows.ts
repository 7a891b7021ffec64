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
import type { StageDesign } from './index.ts';
import type { KindWindow, OutputSpan, ToleranceCase, ToleranceDraw } from './window-cases.ts';
// The registry imports the kind modules, some of which import this module: each side uses
// the other only inside functions.
import { kindModuleOf } from './registry.ts';
import { mulberry32, r3 } from './common.ts';

/** The designs the windows take: every kind's (stages/index.ts StageDesign). */
export type WindowDesign = StageDesign;

export interface WindowCorners {
  vin: Volts[];
  iout: { min: Amps; max: Amps }[];
}

export interface WindowOptions {
  /**
   * Stages whose magnetic has tolerances (coupled-winding): 'extremes' (default) evaluates the
   * magnetic's tolerance corners at the operating corners of each output's nominal extremes;
   * 'full' at every corner.
   */
  magneticSweep?: 'extremes' | 'full';
  monteCarlo?: { runs: number; seed: number };
  /** Ambient for the evaluations (does not move the voltages; default 25 °C). */
  ambient?: Celsius;
}

/** The kind's window entry (registry.ts); every registered kind has one. */
function windowOf(d: WindowDesign): KindWindow<WindowDesign> {
  const w = kindModuleOf(d.kind)?.window;
  if (!w) throw new RangeError(`kind: "${String(d.kind)}" has no stage model`);
  return w as KindWindow<WindowDesign>;
}

/** Signed output values (DC ∓ ripple/2 as [low, high] in magnitude) at one corner. */
function outputsAt(d: WindowDesign, vin: number, iout: number[], x: ToleranceDraw): OutputSpan[] {
  return windowOf(d).outputsAt(d, vin, iout, x);
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
  type At = { vin: number; mask: number; iout: number[]; tc: { x: ToleranceDraw; label: string; design: WindowDesign } };
  const loPt = new Array<At | null>(n).fill(null);
  const hiPt = new Array<At | null>(n).fill(null);
  const win = windowOf(d);
  const hasVf = win.rectifierDrop === true;
  const magnetic = win.magnetic ? win.magnetic.corners(d) : null;
  // The kind's tolerance cases (registry.ts `window.cases`), each at every magnetic corner
  // when the sweep is full.
  const tolCases: { x: ToleranceDraw; label: string; design: WindowDesign }[] = [];
  for (const c of win.cases(d) as ToleranceCase[]) {
    if (magnetic && opts.magneticSweep === 'full') {
      for (const m of magnetic) tolCases.push({ x: c.x, design: m.design, label: m.design === d ? c.label : `${c.label}, ${m.label}` });
      continue;
    }
    tolCases.push({ x: c.x, design: d, label: c.label });
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
  if (magnetic && opts.magneticSweep !== 'full' && magnetic.length > 1) {
    // The magnetic's corners at the operating corners where each output reached its nominal
    // extremes (the magnetic moves an output by a small fraction; where it peaks is where
    // the load, input and setpoint put it). Checked against the full sweep, every magnetic
    // corner at every operating corner, in test/engine/stages/cwbuck-magnetic-tolerance.test.ts.
    const seen = new Set<At>();
    for (const pt of [...loPt, ...hiPt]) {
      if (!pt || seen.has(pt)) continue;
      seen.add(pt);
      for (const m of magnetic) {
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
  const exhaustive = !(magnetic && opts.magneticSweep !== 'full' && magnetic.length > 1);
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
      const x: ToleranceDraw = { vref: u(), rTop: u(), rBottom: u(), vf: hasVf ? u() : 0, accuracy: u() };
      // A stage whose magnetic has tolerances also draws it inside the tolerances its sheet states.
      const dd: WindowDesign = win.magnetic ? win.magnetic.draw(d, u, rnd) : d;
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
