/**
 * SPICE netlists of the switching stages, open loop at the duty the engine computes, for
 * ngspice batch mode (`ngspice -b file.cir`). Pure functions returning text.
 *
 * What the netlists model: the two switches as voltage-controlled switches with their hot
 * on-resistance and body diodes, driven by PULSE sources with the controller's dead time;
 * the inductor or coupled magnetic (K statements from the coupling factors, winding
 * resistances), rectifier diodes with the design's diode model, output capacitors with ESR,
 * loads and preloads as resistors. Not modelled (an ideal input source, instant switch
 * transitions): switching overlap, output capacitance, gate drive, core and quiescent
 * losses, input capacitor.
 *
 * Measurements (`.meas tran`, over the last cycles): v_out<i>, the average of output i
 * (signed, against its own return), vpp_out<i> its peak-to-peak ripple, and i_in, the
 * average current drawn from the input source (negative by the SPICE sign convention).
 */
import { buckPoint, type BuckDesign } from '../engine/stages/buck/index.ts';
import { coupledPoint, type CoupledBuckDesign } from '../engine/stages/cwbuck/index.ts';
import type { OperatingPoint } from '../engine/stages/types.ts';
import { showText } from '../engine/text-rules.ts';

/**
 * Any text as one SPICE comment line. User text never starts a line of a netlist: it is
 * put after "* " (a bare "*#" or whitespace before "*#" would make ngspice run the rest
 * as a command), every control, line-break and bidirectional character is written as
 * `\u{..}` (text-rules.ts), so nothing after it can become a dot-command, a `.control`
 * block or a '+' continuation line. The only function that puts text into a netlist.
 */
export function spiceComment(text: string): string {
  return `* ${showText(text)}`;
}

export interface NetlistOptions {
  /** Simulated time (s); default 1.5 ms. */
  stopTime?: number;
  /** Averaging window at the end (in switching periods); default 40. */
  measureCycles?: number;
  /** Largest time step (s); default 10 ns, never larger. */
  maxStep?: number;
}

/** Numbers in SPICE's plain exponent form. */
function f(x: number): string {
  if (!Number.isFinite(x)) throw new RangeError(`netlist value ${x} is not finite`);
  return Number.parseFloat(x.toPrecision(6)).toExponential().replace('e+', 'e');
}

const CAUTION = [
  '* CAUTION: a simulation of estimated values, not a verified design. Where the input comes',
  '* from mains or a winding crosses an isolation barrier, the applicable safety standard,',
  '* local codes and a qualified engineer decide; this file certifies nothing.',
];

function header(title: string, d: { outputs: { nodeId: string; voltage: number }[] }, vin: number, duty: number): string[] {
  return [
    spiceComment(`Railwright open-loop netlist: ${title}`),
    spiceComment(`outputs: ${d.outputs.map((o, i) => `v_out${i} = ${o.nodeId} (${o.voltage} V)`).join(', ')}`),
    `* Vin ${f(vin)} V, duty ${duty.toFixed(5)} (computed by the stage engine)`,
    ...CAUTION,
  ];
}

function drives(fsw: number, duty: number, dead: number, rds: { hs: number; ls: number }, body: { is: number; n: number; rs: number }): string[] {
  const T = 1 / fsw;
  const edge = 1e-9;
  const ton = duty * T;
  const tls = (1 - duty) * T - 2 * dead;
  if (!(ton > 2 * edge) || !(tls > 2 * edge)) throw new RangeError(`duty ${duty} leaves no room for both switches at ${fsw} Hz`);
  return [
    '* gate drives: high side on for D·T, low side after the dead time',
    `VGH gh 0 PULSE(0 1 0 ${f(edge)} ${f(edge)} ${f(ton - edge)} ${f(T)})`,
    `VGL gl 0 PULSE(0 1 ${f(ton + dead)} ${f(edge)} ${f(edge)} ${f(tls - edge)} ${f(T)})`,
    'SHS vin sw gh 0 SWHS',
    'SLS sw 0 gl 0 SWLS',
    `.model SWHS SW(VT=0.5 VH=0.1 RON=${f(rds.hs)} ROFF=1e7)`,
    `.model SWLS SW(VT=0.5 VH=0.1 RON=${f(rds.ls)} ROFF=1e7)`,
    '* body diodes',
    'DBH sw vin DBODY',
    'DBL 0 sw DBODY',
    `.model DBODY D(IS=${f(body.is)} N=${f(body.n)} RS=${f(body.rs)})`,
  ];
}

function analysis(fsw: number, outs: string[], opts: NetlistOptions): string[] {
  const T = 1 / fsw;
  const stop = opts.stopTime ?? 1.5e-3;
  const cycles = opts.measureCycles ?? 40;
  const maxStep = Math.min(opts.maxStep ?? 10e-9, 10e-9);
  const from = stop - cycles * T;
  if (!(from > 0)) throw new RangeError(`stopTime ${stop} s is shorter than ${cycles} switching periods`);
  return [
    '.options method=gear reltol=1e-4',
    `.tran ${f(maxStep)} ${f(stop)} ${f(from - T)} ${f(maxStep)} uic`,
    ...outs.map((node, i) => `.meas tran v_out${i} AVG ${node} FROM=${f(from)} TO=${f(stop)}`),
    ...outs.map((node, i) => `.meas tran vpp_out${i} PP ${node} FROM=${f(from)} TO=${f(stop)}`),
    `.meas tran i_in AVG i(VIN) FROM=${f(from)} TO=${f(stop)}`,
    '.end',
  ];
}

function load(name: string, node: string, ret: string, v: number, i: number): string[] {
  return Math.abs(i) > 0 ? [`${name} ${node} ${ret} ${f(Math.abs(v / i))}`] : [];
}

export function buckNetlist(d: BuckDesign, op: OperatingPoint, opts: NetlistOptions = {}): string {
  const vin = op.vin as number;
  const io = Math.max(0, (op.iout[0] ?? 0) as number);
  const p = buckPoint(d, vin, io);
  const lines = [
    ...header('synchronous buck stage', d, vin, p.duty),
    `VIN vin 0 DC ${f(vin)}`,
    ...drives(d.fsw, p.duty, d.controller.deadTime, { hs: p.rhs, ls: p.rls }, d.bodyDiode),
    '* inductor with its winding resistance',
    `L1 sw lx ${f(d.inductance)} IC=${f(p.ivalley)}`,
    `RL1 lx out ${f(d.dcr)}`,
    '* output capacitor with ESR, load as a resistor',
    `COUT out cesr ${f(d.cout.effective)} IC=${f(p.vout)}`,
    `RESR cesr 0 ${f(d.cout.esr)}`,
    ...load('RLOAD', 'out', '0', p.vout, io),
    ...analysis(d.fsw, ['v(out)'], opts),
  ];
  return lines.join('\n') + '\n';
}

export function coupledBuckNetlist(d: CoupledBuckDesign, op: OperatingPoint, opts: NetlistOptions = {}): string {
  const vin = op.vin as number;
  const iout = op.iout.map((x) => Math.abs(x as number));
  const p = coupledPoint(d, vin, iout);
  const lines = [
    ...header(`coupled-winding buck stage, ${d.secondaries.length} secondar${d.secondaries.length === 1 ? 'y' : 'ies'}`, d, vin, p.duty),
    `VIN vin 0 DC ${f(vin)}`,
    ...drives(d.fsw, p.duty, d.controller.deadTime, { hs: d.highSide.rdsOn * d.rdsHotFactor, ls: d.lowSide.rdsOn * d.rdsHotFactor }, d.bodyDiode),
    '* coupled magnetic: primary = magnetizing inductance; secondary k has Ls = n²·Lp/k²,',
    '* coupling k to the primary and k_i·k_j to each other; dots on the first node',
    `LP sw xp ${f(d.inductance)} IC=${f(p.im - p.dim / 2)}`,
    `RP xp out ${f(d.primaryResistance)}`,
    `COUT out cpo ${f(d.cout.effective)} IC=${f(p.vpri)}`,
    `RPESR cpo 0 ${f(d.cout.esr)}`,
    ...load('RLOAD0', 'out', '0', p.vpri, iout[0] ?? 0),
  ];
  const measured = ['v(out)'];
  d.secondaries.forEach((w, i) => {
    const k = i + 1;
    const n = Math.abs(w.turns) / d.primaryTurns;
    const ls = (n * n * d.inductance) / (w.coupling * w.coupling);
    const s = p.sec[i]!;
    lines.push(spiceComment(`secondary ${k}: ${w.nodeId}, ${w.turns} turns against ${d.primaryTurns}${w.turns < 0 ? ' (reversed winding, reversed rectifier: negative output)' : ''}`));
    if (w.turns > 0) {
      // Dotted end at the return: the undotted end is positive while the low side conducts.
      lines.push(`LS${k} 0 wa${k} ${f(ls)} IC=0`);
      lines.push(`RS${k} wa${k} wb${k} ${f(w.resistance)}`);
      lines.push(`DS${k} wb${k} o${k} DRECT${k}`);
    } else {
      // Dotted end at the rectifier: that end goes negative while the low side conducts.
      lines.push(`LS${k} wa${k} 0 ${f(ls)} IC=0`);
      lines.push(`RS${k} wa${k} wb${k} ${f(w.resistance)}`);
      lines.push(`DS${k} o${k} wb${k} DRECT${k}`);
    }
    lines.push(`.model DRECT${k} D(IS=${f(w.rectifier.is)} N=${f(w.rectifier.n)} RS=${f(w.rectifier.rs)})`);
    const vs = Math.sign(w.turns) * s.vsec;
    lines.push(`CO${k} o${k} co${k} ${f(w.cout.effective)} IC=${f(vs)}`);
    lines.push(`RO${k}ESR co${k} 0 ${f(w.cout.esr)}`);
    lines.push(...load(`RLOAD${k}`, `o${k}`, '0', vs, iout[k] ?? 0));
    if (w.preload) lines.push(`RPRE${k} o${k} 0 ${f(w.preload.resistance)}`);
    lines.push(`KP${k} LP LS${k} ${f(w.coupling)}`);
    measured.push(`v(o${k})`);
  });
  for (let i = 0; i < d.secondaries.length; i++) {
    for (let j = i + 1; j < d.secondaries.length; j++) {
      lines.push(`KS${i + 1}_${j + 1} LS${i + 1} LS${j + 1} ${f(d.secondaries[i]!.coupling * d.secondaries[j]!.coupling)}`);
    }
  }
  lines.push(...analysis(d.fsw, measured, opts));
  return lines.join('\n') + '\n';
}
