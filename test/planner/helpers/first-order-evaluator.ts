/**
 * A first-order stage evaluator for the planner's SEARCH tests (oracle and MILP equality,
 * determinism, cancel): simple closed-form losses and windows so hundreds of random instances
 * run in seconds. It is not the engineering model (that is engine/stages, checked by its own
 * reference tests); it only has to be a consistent, monotone cost surface with real
 * feasibility limits, so that the search can be compared with independent solvers on it.
 * Shapes of the equations, common practice: buck η from a fixed + proportional + I²R loss,
 * LDO loss (Vin − Vout)·I, secondaries that sag with load and rise at light load.
 */
import type { Amps, Celsius, KelvinPerWatt, Ratio, Volts, Watts } from '../../../src-main/engine/units.ts';
import type { OperatingPoint, OutputWindow, StageEvaluation, StageFlag, StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { StageEvaluator } from '../../../src-main/engine/planner/types.ts';
import type { StageDesign } from '../../../src-main/engine/stages/index.ts';

interface D { spec: StageSpec }

/**
 * The planner carries the design a StageEvaluator returns as a StageDesign and hands it back
 * to the same evaluator. This evaluator's design is its own token (the spec, no `kind`): the
 * planner's reads of a design's own fields narrow on `design.kind` first, so they skip it.
 * The token crosses the planner's type in these two functions only.
 */
const token = (d: D): StageDesign => d as unknown as StageDesign;
const unToken = (d: StageDesign): D => d as unknown as D;

const THETA = 60; // K/W for every dissipating part (from memory: a small power package)

function flag(code: string, text: string): StageFlag {
  return { code, severity: 'error', text };
}

function lossOf(spec: StageSpec, vin: number, iout: number[]): { loss: number; duty?: number } {
  const pout = spec.outputs.reduce((a, o, i) => a + Math.abs(o.voltage) * (iout[i] ?? 0), 0);
  const itot = iout.reduce((a, b) => a + b, 0);
  if (spec.kind === 'ldo') {
    const vo = Math.abs(spec.outputs[0]!.voltage);
    return { loss: (vin - vo) * (iout[0] ?? 0) + vin * 50e-6 };
  }
  const fixed = spec.kind === 'cwbuck' ? 0.03 + 0.01 * (spec.outputs.length - 1) : 0.02;
  const prop = spec.kind === 'cwbuck' ? 0.07 : 0.05;
  const vpri = Math.abs(spec.outputs[0]!.voltage);
  return { loss: fixed + prop * pout + 0.05 * itot * itot, duty: Math.min(1, vpri / vin / 0.9) };
}

function evaluate(design: StageDesign, op: OperatingPoint): StageEvaluation {
  const { spec } = unToken(design);
  const vin = Math.abs(op.vin);
  const { loss, duty } = lossOf(spec, vin, op.iout);
  const pout = spec.outputs.reduce((a, o, i) => a + Math.abs(o.voltage) * (op.iout[i] ?? 0), 0);
  const pin = pout + loss;
  const flags: StageFlag[] = [];
  if (duty !== undefined && spec.kind === 'cwbuck' && duty > 0.6) flags.push(flag('duty', `duty ${duty.toFixed(2)} above 0.6`));
  if (duty !== undefined && spec.kind === 'buck' && duty > 0.9) flags.push(flag('duty', `duty ${duty.toFixed(2)} above 0.9`));
  if (spec.kind === 'ldo') {
    const vo = Math.abs(spec.outputs[0]!.voltage);
    if (vin < vo + 0.3) flags.push(flag('dropout', `input ${vin.toFixed(2)} V below output + 0.3 V dropout`));
  }
  const tj = op.ambient + loss * THETA;
  const ripple = spec.outputs.map((o, i) => {
    if (spec.kind === 'ldo') return (spec.vinRipple ?? 0) * 10 ** (-50 / 20);
    return i === 0 ? 0.008 : 0.02 + 0.01 * (op.iout[i] ?? 0);
  });
  return {
    kind: spec.kind, vin: op.vin, iin: (pin / vin) as Amps, pin: pin as Watts, pout: pout as Watts, loss: loss as Watts,
    efficiency: (pin > 0 ? pout / pin : 1) as Ratio,
    ...(duty !== undefined ? { duty: duty as Ratio } : {}),
    lossBreakdown: { total: loss as Watts },
    parts: [{ role: 'main', power: loss as Watts, thetaJA: THETA as KelvinPerWatt, thetaSource: 'default-from-memory', tj: tj as Celsius }],
    outputs: spec.outputs.map((o, i) => ({ nodeId: o.nodeId, voltage: o.voltage, current: (op.iout[i] ?? 0) as Amps, ripplePP: ripple[i]! as Volts })),
    flags,
  };
}

function windows(design: StageDesign, corners: { vin: Volts[]; iout: { min: Amps; max: Amps }[] }): OutputWindow[] {
  const { spec } = unToken(design);
  return spec.outputs.map((o, i) => {
    const t = Math.abs(o.voltage);
    let lo: number, hi: number;
    if (spec.kind === 'ldo') { lo = t * 0.99; hi = t * 1.01; }
    else if (i === 0) { lo = t * 0.985; hi = t * 1.015; }
    else {
      const c = corners.iout[i]!;
      const sag = 0.4 * (c.max - c.min);
      const rise = c.min < 0.1 * c.max ? 0.03 * t : 0;
      lo = t * 0.98 - sag / 2;
      hi = t * 1.02 + sag / 2 + rise;
    }
    const sign = o.voltage < 0 ? -1 : 1;
    const amin = t * (1 - o.tolerance), amax = t * (1 + o.tolerance);
    const inside = lo >= amin - 1e-12 && hi <= amax + 1e-12;
    return {
      nodeId: o.nodeId, target: o.voltage,
      min: (sign < 0 ? -hi : lo) as Volts, max: (sign < 0 ? -lo : hi) as Volts,
      allowedMin: (sign < 0 ? -amax : amin) as Volts, allowedMax: (sign < 0 ? -amin : amax) as Volts,
      inside, minCorner: 'first-order', maxCorner: 'first-order',
    };
  });
}

export const firstOrderEvaluator: StageEvaluator = {
  design(spec) {
    const flags: StageFlag[] = [];
    for (const o of spec.outputs) {
      const lo = Math.min(Math.abs(spec.vinMin), Math.abs(spec.vinMax));
      if (spec.kind !== 'cwbuck' && Math.abs(o.voltage) >= lo) flags.push(flag('step-up', `output ${o.voltage} V not below Vin min ${spec.vinMin} V`));
    }
    if (spec.kind === 'cwbuck' && spec.outputs.length > 1 + 4) flags.push(flag('secondaries', 'too many windings'));
    if (spec.kind === 'cwbuck') {
      const p = spec.outputs.reduce((a, o) => a + Math.abs(o.voltage) * o.currentMax, 0);
      if (p > 15) flags.push(flag('power', `stage power ${p.toFixed(1)} W above 15 W`));
    }
    if (flags.length) return { ok: false, flags };
    return { ok: true, design: token({ spec }) };
  },
  evaluate,
  windows,
};
