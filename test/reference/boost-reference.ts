/**
 * Boost reference against ngspice. The netlist here is written from first principles
 * (Erickson & Maksimović, *Fundamentals of Power Electronics*, ch. 2: an inductor from the
 * input to a switch node, a ground-referenced main switch on for D·T, a synchronous rectifier
 * to the output capacitor for the rest of the period less the dead times, body diodes across
 * both switches), independently of the engine's netlist writer (stages/boost/index.ts
 * boostNetlist): only the component values and the duty come from the engine.
 *
 * What the comparison can catch: errors in the engine's duty model (volt-second balance with
 * the switch, winding and dead-time drops), in the inductor-current relation IL = Iout/(1 − D),
 * and in the conduction, dead-time, winding and output-capacitor ESR losses. What it cannot
 * catch: the loss terms the netlist leaves out (switching overlap, Coss, gate drive, core,
 * quiescent, input capacitor), closed-loop behaviour, and whether the chosen values are good
 * choices (the same values go into both).
 *
 * Operating points are invented test circuits.
 */
import { designStage, evaluateStage } from '../../src-main/engine/stages/index.ts';
import type { BoostDesign } from '../../src-main/engine/stages/boost/index.ts';
import type { StageSpec } from '../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../src-main/engine/units.ts';

export interface BoostRefPoint {
  name: string;
  spec: StageSpec;
  vin: number;
  iout: number;
}

const spec = (vin: [number, number, number], vout: number, imax: number, fsw: number, ripple = 0.1): StageSpec => ({
  kind: 'boost', vinMin: vin[0], vinNom: vin[1], vinMax: vin[2], fsw, ambient: 25, tjMax: 150, ceramicDerating: 0.6,
  outputs: [{ nodeId: 'out', voltage: vout, tolerance: 0.03, currentMin: 0, currentMax: imax, rippleLimit: ripple }],
} as unknown as StageSpec);

export const BOOST_POINTS: BoostRefPoint[] = [
  { name: 'bst1', spec: spec([4.5, 5, 5.5], 12, 1, 500e3), vin: 4.5, iout: 1 },
  { name: 'bst2', spec: spec([4.5, 5, 5.5], 12, 1, 500e3), vin: 5.5, iout: 1 },
  { name: 'bst3', spec: spec([3, 3.3, 3.6], 5, 0.5, 1e6, 0.05), vin: 3.3, iout: 0.5 },
  { name: 'bst4', spec: spec([9, 12, 14], 24, 0.5, 400e3, 0.2), vin: 12, iout: 0.5 },
  // Light load in forced PWM: the inductor current reverses every cycle.
  { name: 'bst5', spec: spec([4.5, 5, 5.5], 12, 1, 500e3), vin: 5, iout: 0.05 },
];

export function designFor(p: BoostRefPoint): BoostDesign {
  const r = designStage(p.spec);
  if (!r.ok || r.design.kind !== 'boost') throw new Error(`${p.name}: design failed: ${r.ok ? r.design.kind : r.flags.map((f) => f.text).join('; ')}`);
  return r.design;
}

const n = (x: number) => x.toExponential(6);

/** The hand-written reference netlist of one point. */
export function referenceNetlist(p: BoostRefPoint): string {
  const d = designFor(p);
  const ev = evaluateStage(d, { vin: p.vin as Volts, iout: [p.iout as Amps], ambient: 25 as Celsius });
  const D = ev.duty as number;
  const T = 1 / d.fsw;
  const td = d.controller.deadTime;
  const vo = ev.outputs[0]!.voltage as number;
  const stop = 2e-3;
  const from = stop - 50 * T;
  return [
    `boost reference ${p.name}`,
    `Vsrc in 0 ${n(p.vin)}`,
    `Lm in a ${n(d.inductance)} IC=${n(p.iout / (1 - D))}`,
    `Rw a x ${n(d.dcr)}`,
    // Main switch x→0 during [0, D·T]; rectifier x→o during [D·T + td, T − td].
    `Vg1 g1 0 PULSE(0 2 0 1n 1n ${n(D * T - 1e-9)} ${n(T)})`,
    `Vg2 g2 0 PULSE(0 2 ${n(D * T + td)} 1n 1n ${n((1 - D) * T - 2 * td - 1e-9)} ${n(T)})`,
    'S1 x 0 g1 0 sm',
    'S2 x o g2 0 sr',
    `.model sm SW(VT=1 VH=0.2 RON=${n(d.lowSide.rdsOn * d.rdsHotFactor)} ROFF=1e8)`,
    `.model sr SW(VT=1 VH=0.2 RON=${n(d.highSide.rdsOn * d.rdsHotFactor)} ROFF=1e8)`,
    'D1 0 x dd',
    'D2 x o dd',
    `.model dd D(IS=${n(d.bodyDiode.is)} N=${n(d.bodyDiode.n)} RS=${n(d.bodyDiode.rs)})`,
    `Co o c ${n(d.cout.effective)} IC=${n(vo)}`,
    `Rc c 0 ${n(d.cout.esr)}`,
    `Rl o 0 ${n(vo / p.iout)}`,
    '.options method=gear reltol=1e-4',
    `.tran 10n ${n(stop)} ${n(from - T)} 10n uic`,
    `.meas tran v_out0 AVG v(o) FROM=${n(from)} TO=${n(stop)}`,
    `.meas tran i_in AVG i(Vsrc) FROM=${n(from)} TO=${n(stop)}`,
    '.end',
    '',
  ].join('\n');
}

/** Loss terms the reference netlist models too. */
export const BOOST_MODELLED = ['ls-conduction', 'hs-conduction', 'dead-time', 'inductor-copper', 'output-capacitor-esr'];

export interface BoostRefRow {
  name: string;
  vin: number;
  duty: number;
  vEngine: number;
  vSim: number;
  errorPct: number;
  etaEngine: number;
  etaSim: number;
}

/** Engine against one simulation: the engine evaluated at the simulated load current. */
export function compareBoost(p: BoostRefPoint, sim: { v_out0: number; i_in: number }): BoostRefRow {
  const d = designFor(p);
  const op = { vin: p.vin as Volts, iout: [p.iout as Amps], ambient: 25 as Celsius };
  const nominal = evaluateStage(d, op);
  const vEngine = nominal.outputs[0]!.voltage as number;
  // The load is a resistor vEngine/iout: at the simulated voltage it draws iout·vSim/vEngine.
  const iSim = (p.iout * sim.v_out0) / vEngine;
  const ev = evaluateStage(d, { ...op, iout: [iSim as Amps] });
  const modelled = BOOST_MODELLED.reduce((a, k) => a + (ev.lossBreakdown[k] as number), 0);
  const pout = sim.v_out0 * iSim;
  return {
    name: p.name, vin: p.vin, duty: nominal.duty as number, vEngine, vSim: sim.v_out0,
    errorPct: ((vEngine - sim.v_out0) / sim.v_out0) * 100,
    etaEngine: (ev.pout as number) / ((ev.pout as number) + modelled),
    etaSim: pout / (-sim.i_in * p.vin),
  };
}
