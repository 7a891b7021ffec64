/**
 * SPICE netlist of the coupled-winding buck, open loop at the duty the engine computes, for
 * ngspice batch mode; export/spice.ts describes what the netlists model and measure.
 */
import { coupledPoint, type CoupledBuckDesign } from './index.ts';
import type { OperatingPoint } from '../types.ts';
import { analysis, drives, f, header, load, spiceComment, type NetlistOptions } from '../buck/netlist.ts';

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
