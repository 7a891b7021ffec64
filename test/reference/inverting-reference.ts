/**
 * Inverting buck-boost reference against ngspice. The netlist here is written from first
 * principles (Erickson & Maksimović, *Fundamentals of Power Electronics*, ch. 2: the main
 * switch connects the input to the inductor for D·T, the inductor runs to ground, and for the
 * rest of the period less the dead times a synchronous rectifier connects it to the negative
 * output capacitor; body diodes across both switches), independently of the engine's netlist
 * writer (stages/inverting/index.ts invertingNetlist): only the component values and the duty
 * come from the engine.
 *
 * What the comparison can catch: errors in the duty model (volt-second balance with the drops
 * and dead times, |Vout| = Vin·D/(1 − D) ideally), in IL = Iout/(1 − D), and in the
 * conduction, dead-time, winding and output-capacitor ESR losses. What it cannot catch: the
 * loss terms the netlist leaves out (switching overlap, Coss, gate drive, core, quiescent, the
 * input capacitor), closed-loop behaviour, and whether the values are good choices.
 *
 * Operating points are invented test circuits.
 */
import { designStage, evaluateStage } from '../../src-main/engine/stages/index.ts';
import type { InvertingDesign } from '../../src-main/engine/stages/inverting/index.ts';
import type { StageSpec } from '../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../src-main/engine/units.ts';

export interface InvRefPoint {
  name: string;
  spec: StageSpec;
  vin: number;
  iout: number;
}

const spec = (vin: [number, number, number], vout: number, imax: number, fsw: number, ripple = 0.05): StageSpec => ({
  kind: 'inverting', vinMin: vin[0], vinNom: vin[1], vinMax: vin[2], fsw, ambient: 25, tjMax: 150, ceramicDerating: 0.6,
  outputs: [{ nodeId: 'neg', voltage: vout, tolerance: 0.05, currentMin: 0, currentMax: imax, rippleLimit: ripple }],
} as unknown as StageSpec);

export const INV_POINTS: InvRefPoint[] = [
  { name: 'inv1', spec: spec([10, 12, 14], -5, 0.3, 500e3), vin: 10, iout: 0.3 },
  { name: 'inv2', spec: spec([10, 12, 14], -5, 0.3, 500e3), vin: 14, iout: 0.3 },
  { name: 'inv3', spec: spec([4.5, 5, 5.5], -12, 0.2, 400e3, 0.1), vin: 5, iout: 0.2 },
  { name: 'inv4', spec: spec([18, 24, 30], -15, 0.5, 300e3, 0.1), vin: 24, iout: 0.5 },
  // Light load in forced PWM: the inductor current reverses every cycle.
  { name: 'inv5', spec: spec([10, 12, 14], -5, 0.3, 500e3), vin: 12, iout: 0.02 },
];

export function designFor(p: InvRefPoint): InvertingDesign {
  const r = designStage(p.spec);
  if (!r.ok || r.design.kind !== 'inverting') throw new Error(`${p.name}: design failed: ${r.ok ? r.design.kind : r.flags.map((f) => f.text).join('; ')}`);
  return r.design;
}

const n = (x: number) => x.toExponential(6);

/** The hand-written reference netlist of one point. */
export function referenceNetlist(p: InvRefPoint): string {
  const d = designFor(p);
  const ev = evaluateStage(d, { vin: p.vin as Volts, iout: [p.iout as Amps], ambient: 25 as Celsius });
  const D = ev.duty as number;
  const T = 1 / d.fsw;
  const td = d.controller.deadTime;
  const vo = ev.outputs[0]!.voltage as number; // negative
  const stop = 2e-3;
  const from = stop - 50 * T;
  return [
    `inverting reference ${p.name}`,
    `Vsrc in 0 ${n(p.vin)}`,
    `Vg1 g1 0 PULSE(0 2 0 1n 1n ${n(D * T - 1e-9)} ${n(T)})`,
    `Vg2 g2 0 PULSE(0 2 ${n(D * T + td)} 1n 1n ${n((1 - D) * T - 2 * td - 1e-9)} ${n(T)})`,
    'S1 in x g1 0 sm',
    'S2 x o g2 0 sr',
    `.model sm SW(VT=1 VH=0.2 RON=${n(d.highSide.rdsOn * d.rdsHotFactor)} ROFF=1e8)`,
    `.model sr SW(VT=1 VH=0.2 RON=${n(d.lowSide.rdsOn * d.rdsHotFactor)} ROFF=1e8)`,
    'D1 x in dd',
    'D2 o x dd',
    `.model dd D(IS=${n(d.bodyDiode.is)} N=${n(d.bodyDiode.n)} RS=${n(d.bodyDiode.rs)})`,
    `Lm x a ${n(d.inductance)} IC=${n(p.iout / (1 - D))}`,
    `Rw a 0 ${n(d.dcr)}`,
    `Co o c ${n(d.cout.effective)} IC=${n(vo)}`,
    `Rc c 0 ${n(d.cout.esr)}`,
    `Rl o 0 ${n(-vo / p.iout)}`,
    '.options method=gear reltol=1e-4',
    `.tran 10n ${n(stop)} ${n(from - T)} 10n uic`,
    `.meas tran v_out0 AVG v(o) FROM=${n(from)} TO=${n(stop)}`,
    `.meas tran i_in AVG i(Vsrc) FROM=${n(from)} TO=${n(stop)}`,
    '.end',
    '',
  ].join('\n');
}

export const INV_MODELLED = ['hs-conduction', 'ls-conduction', 'dead-time', 'inductor-copper', 'output-capacitor-esr'];

export interface InvRefRow {
  name: string;
  vin: number;
  duty: number;
  vEngine: number;
  vSim: number;
  errorPct: number;
  etaEngine: number;
  etaSim: number;
}

export function compareInverting(p: InvRefPoint, sim: { v_out0: number; i_in: number }): InvRefRow {
  const d = designFor(p);
  const op = { vin: p.vin as Volts, iout: [p.iout as Amps], ambient: 25 as Celsius };
  const nominal = evaluateStage(d, op);
  const vEngine = nominal.outputs[0]!.voltage as number;
  const iSim = (p.iout * sim.v_out0) / vEngine;
  const ev = evaluateStage(d, { ...op, iout: [iSim as Amps] });
  const modelled = INV_MODELLED.reduce((a, k) => a + (ev.lossBreakdown[k] as number), 0);
  const pout = Math.abs(sim.v_out0 * iSim);
  return {
    name: p.name, vin: p.vin, duty: nominal.duty as number, vEngine, vSim: sim.v_out0,
    errorPct: ((vEngine - sim.v_out0) / Math.abs(sim.v_out0)) * 100,
    etaEngine: (ev.pout as number) / ((ev.pout as number) + modelled),
    etaSim: pout / (-sim.i_in * p.vin),
  };
}
