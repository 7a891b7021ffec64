/**
 * SPICE netlist of the synchronous buck, open loop at the duty the engine computes, for
 * ngspice batch mode (`ngspice -b file.cir`), and the pieces the coupled-winding buck's
 * writer shares (cwbuck/netlist.ts). Pure functions returning text; export/spice.ts
 * describes what the netlists model and measure.
 */
import { buckPoint, type BuckDesign } from './index.ts';
import type { OperatingPoint } from '../types.ts';
import { showText } from '../../text-rules.ts';

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
export function f(x: number): string {
  if (!Number.isFinite(x)) throw new RangeError(`netlist value ${x} is not finite`);
  return Number.parseFloat(x.toPrecision(6)).toExponential().replace('e+', 'e');
}

const CAUTION = [
  '* CAUTION: a simulation of estimated values, not a verified design. Where the input comes',
  '* from mains or a winding crosses an isolation barrier, the applicable safety standard,',
  '* local codes and a qualified engineer decide; this file certifies nothing.',
];

export function header(title: string, d: { outputs: { nodeId: string; voltage: number }[] }, vin: number, duty: number): string[] {
  return [
    spiceComment(`Railwright open-loop netlist: ${title}`),
    spiceComment(`outputs: ${d.outputs.map((o, i) => `v_out${i} = ${o.nodeId} (${o.voltage} V)`).join(', ')}`),
    `* Vin ${f(vin)} V, duty ${duty.toFixed(5)} (computed by the stage engine)`,
    ...CAUTION,
  ];
}

export function drives(fsw: number, duty: number, dead: number, rds: { hs: number; ls: number }, body: { is: number; n: number; rs: number }): string[] {
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

export function analysis(fsw: number, outs: string[], opts: NetlistOptions): string[] {
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

export function load(name: string, node: string, ret: string, v: number, i: number): string[] {
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

