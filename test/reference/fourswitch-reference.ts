/**
 * Four-switch buck-boost reference against ngspice. The netlist here is written from first
 * principles (Erickson & Maksimović, *Fundamentals of Power Electronics*, ch. 2: a buck leg
 * and a boost leg joined by one inductor; in the buck region the output leg's upper switch
 * stays on, in the boost region the input leg's upper switch stays on, in between both legs
 * switch), independently of the engine's netlist writer (stages/buck-boost-4s/index.ts
 * fourSwitchNetlist): only the component values, the region and the duties come from the
 * engine.
 *
 * What the comparison can catch: errors in the duty model of each region (volt-second balance
 * with the switch, winding and dead-time drops), in the inductor current (Iout in buck,
 * Iout/(1 − D) in boost) and in the conduction, dead-time, winding and output-capacitor ESR
 * losses. What it cannot catch: the terms the netlist leaves out (switching overlap, Coss,
 * gate drive, core, quiescent, input capacitor) — so not the extra switching loss of the
 * transition band — closed-loop behaviour or a real controller's transition scheme.
 *
 * Operating points are invented test circuits.
 */
import { designStage, evaluateStage } from '../../src-main/engine/stages/index.ts';
import { fourSwitchPoint, type FourSwitchDesign } from '../../src-main/engine/stages/buck-boost-4s/index.ts';
import type { StageSpec } from '../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../src-main/engine/units.ts';

export interface FsRefPoint {
  name: string;
  spec: StageSpec;
  vin: number;
  iout: number;
}

const spec = (vin: [number, number, number], vout: number, imax: number, fsw: number, ripple = 0.05): StageSpec => ({
  kind: 'buck-boost-4s', vinMin: vin[0], vinNom: vin[1], vinMax: vin[2], fsw, ambient: 25, tjMax: 150, ceramicDerating: 0.6,
  outputs: [{ nodeId: 'out', voltage: vout, tolerance: 0.03, currentMin: 0, currentMax: imax, rippleLimit: ripple }],
} as unknown as StageSpec);

const liIon = spec([3, 3.7, 4.2], 3.3, 1, 1e6);
const wide = spec([9, 24, 36], 12, 1, 400e3, 0.1);

export const FS_POINTS: FsRefPoint[] = [
  { name: 'fs1', spec: liIon, vin: 3, iout: 1 }, // boost
  { name: 'fs2', spec: liIon, vin: 3.6, iout: 1 }, // transition
  { name: 'fs3', spec: liIon, vin: 4.2, iout: 1 }, // buck
  { name: 'fs4', spec: wide, vin: 9, iout: 1 }, // boost
  { name: 'fs5', spec: wide, vin: 24, iout: 1 }, // buck
];

export function designFor(p: FsRefPoint): FourSwitchDesign {
  const r = designStage(p.spec);
  if (!r.ok || r.design.kind !== 'buck-boost-4s') throw new Error(`${p.name}: design failed: ${r.ok ? r.design.kind : r.flags.map((f) => f.text).join('; ')}`);
  return r.design;
}

const n = (x: number) => x.toExponential(6);

/** The hand-written reference netlist of one point. */
export function referenceNetlist(p: FsRefPoint): string {
  const d = designFor(p);
  const pt = fourSwitchPoint(d, p.vin, p.iout);
  const T = 1 / d.fsw;
  const td = d.controller.deadTime;
  const stop = 2e-3;
  const from = stop - 50 * T;
  // A switching leg: upper switch on for duty·T from t = 0, lower after a dead time.
  const leg = (up: string, low: string, duty: number) => [
    `V${up} ${up} 0 PULSE(0 2 0 1n 1n ${n(duty * T - 1e-9)} ${n(T)})`,
    `V${low} ${low} 0 PULSE(0 2 ${n(duty * T + td)} 1n 1n ${n((1 - duty) * T - 2 * td - 1e-9)} ${n(T)})`,
  ];
  const rHi = d.highSide.rdsOn * d.rdsHotFactor;
  const rLo = d.lowSide.rdsOn * d.rdsHotFactor;
  return [
    `four-switch reference ${p.name} (${pt.region})`,
    `Vsrc in 0 ${n(p.vin)}`,
    ...(pt.region === 'boost' ? ['Vga ga 0 2', 'Vgb gb 0 0'] : leg('ga', 'gb', pt.db)),
    // Output leg: lower switch (to ground) is the boost switch, on for Dc·T.
    ...(pt.region === 'buck' ? ['Vgc gc 0 0', 'Vgd gd 0 2'] : leg('gc', 'gd', pt.dc)),
    'S1 in p ga 0 shi',
    'S2 p 0 gb 0 slo',
    'S3 q 0 gc 0 slo',
    'S4 q o gd 0 shi',
    `.model shi SW(VT=1 VH=0.2 RON=${n(rHi)} ROFF=1e8)`,
    `.model slo SW(VT=1 VH=0.2 RON=${n(rLo)} ROFF=1e8)`,
    'D1 p in dd',
    'D2 0 p dd',
    'D3 0 q dd',
    'D4 q o dd',
    `.model dd D(IS=${n(d.bodyDiode.is)} N=${n(d.bodyDiode.n)} RS=${n(d.bodyDiode.rs)})`,
    `Lm p a ${n(d.inductance)} IC=${n(p.iout / (1 - pt.dc))}`,
    `Rw a q ${n(d.dcr)}`,
    `Co o c ${n(d.cout.effective)} IC=${n(pt.vout)}`,
    `Rc c 0 ${n(d.cout.esr)}`,
    `Rl o 0 ${n(pt.vout / p.iout)}`,
    '.options method=gear reltol=1e-4',
    `.tran 10n ${n(stop)} ${n(from - T)} 10n uic`,
    `.meas tran v_out0 AVG v(o) FROM=${n(from)} TO=${n(stop)}`,
    `.meas tran i_in AVG i(Vsrc) FROM=${n(from)} TO=${n(stop)}`,
    '.end',
    '',
  ].join('\n');
}

export const FS_MODELLED = ['a-conduction', 'b-conduction', 'c-conduction', 'd-conduction', 'dead-time', 'inductor-copper', 'output-capacitor-esr'];

export interface FsRefRow { name: string; vin: number; region: string; vEngine: number; vSim: number; errorPct: number; etaEngine: number; etaSim: number }

export function compareFourSwitch(p: FsRefPoint, sim: { v_out0: number; i_in: number }): FsRefRow {
  const d = designFor(p);
  const op = { vin: p.vin as Volts, iout: [p.iout as Amps], ambient: 25 as Celsius };
  const nominal = evaluateStage(d, op);
  const vEngine = nominal.outputs[0]!.voltage as number;
  const iSim = (p.iout * sim.v_out0) / vEngine;
  const ev = evaluateStage(d, { ...op, iout: [iSim as Amps] });
  const modelled = FS_MODELLED.reduce((a, k) => a + (ev.lossBreakdown[k] as number), 0);
  return {
    name: p.name, vin: p.vin, region: fourSwitchPoint(d, p.vin, p.iout).region, vEngine, vSim: sim.v_out0,
    errorPct: ((vEngine - sim.v_out0) / sim.v_out0) * 100,
    etaEngine: (ev.pout as number) / ((ev.pout as number) + modelled),
    etaSim: (sim.v_out0 * iSim) / (-sim.i_in * p.vin),
  };
}
