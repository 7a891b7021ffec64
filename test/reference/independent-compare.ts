/**
 * The engine on the independent grid: each grid point becomes a CoupledBuckDesign with the
 * same circuit values (switch Ron without hot factor, body diodes, Lp, winding resistances,
 * rectifier drop parameters and capacitances, output capacitors), evaluated with the primary
 * at its simulated voltage and every load at its simulated current.
 */
import { coupledPoint, evaluateCoupledBuck, rectifierPeakReverse, type CoupledBuckDesign } from '../../src-main/engine/stages/cwbuck/index.ts';
import { GENERIC_DEFAULTS } from '../../src-main/engine/stages/defaults.ts';
import type { CapacitorChoice } from '../../src-main/engine/stages/common.ts';
import type { StageFlag } from '../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Henries, Hertz, Ohms, Ratio, Volts, Watts } from '../../src-main/engine/units.ts';
import { couplingOf, type GridPoint, type GridSimulated } from './independent-grid.ts';

const cap = (role: string, c: number, esr: number, v: number): CapacitorChoice => ({
  role, value: c, count: 1, ratedVoltage: 2 * Math.abs(v) + 1, workingVoltage: Math.abs(v), dielectric: 'ceramic', esr, effective: c, stress: 0.5,
});

/** Loss terms the grid's netlists contain (switching, core and controller losses are not simulated). */
export const GRID_LOSSES = ['hs-conduction', 'ls-conduction', 'dead-time', 'primary-copper', 'secondary-copper', 'rectifiers', 'output-capacitor-esr', 'preload', 'rectifier-capacitance', 'snubber'];

export function engineDesign(p: GridPoint): CoupledBuckDesign {
  const vpri = p.duty * p.vin;
  const d: CoupledBuckDesign = {
    kind: 'cwbuck',
    vinMin: p.vin as Volts, vinNom: p.vin as Volts, vinMax: p.vin as Volts,
    outputs: [
      { nodeId: 'o0', voltage: vpri as Volts, tolerance: 0.05 as Ratio, currentMin: 0 as Amps, currentMax: 1 as Amps, rippleLimit: 1 as Volts },
      ...p.sec.map((s, i) => ({
        nodeId: `o${i + 1}`, voltage: (Math.sign(s.n) * Math.abs(s.n) * vpri) as Volts, tolerance: 0.05 as Ratio,
        currentMin: 0 as Amps, currentMax: s.ifull as Amps, rippleLimit: 1 as Volts,
      })),
    ],
    fsw: p.fsw as Hertz,
    inductance: p.lp as Henries,
    isat: 100 as Amps,
    coreLossFraction: 0,
    cout: cap('primary output', p.pri.c, p.pri.esr, vpri),
    cin: cap('input', 10e-6, 0.005, p.vin),
    divider: { rTop: 1, rBottom: 1, vref: 0.8, vout: vpri, error: 0, tolerance: 0.01 },
    highSide: { ...GENERIC_DEFAULTS.highSide, rdsOn: p.rhs },
    lowSide: { ...GENERIC_DEFAULTS.lowSide, rdsOn: p.rls },
    rdsHotFactor: 1,
    bodyDiode: { ...p.body, vfSpread: 0.1 },
    controller: { ...GENERIC_DEFAULTS.controller, deadTime: p.deadTime, maxDuty: 0.99, minOnTime: 0 },
    thetaJA: { highSide: 60, lowSide: 60, controller: 60, inductor: 40 },
    tjMax: 150 as Celsius,
    primaryTurns: 1,
    primaryResistance: p.rp as Ohms,
    // The magnetic as the engine reads it: n = M/Lp = k·|Ns/Np| (every leakage on the
    // secondary side, exact while the switches clamp the primary).
    secondaries: p.sec.map((s, i) => ({
      nodeId: `o${i + 1}`,
      turns: Math.sign(s.n) * Math.abs(s.n) * s.k,
      coupling: s.k,
      resistance: s.r as Ohms,
      rectifier: { is: s.diode.is, n: s.diode.n, rs: s.diode.rs, vfSpread: 0.1, cjo: s.diode.cjo, vj: s.diode.vj, m: s.diode.m, tt: s.diode.tt },
      rectifierReverseVoltage: 0 as Volts,
      cout: cap(`secondary ${i + 1} output`, s.c, s.esr, Math.abs(s.n) * vpri),
      preload: null,
      thetaJA: 90,
      ...(s.snubber ? { snubber: { r: s.snubber.r as Ohms, c: s.snubber.c } } : {}),
    })),
    maxSecondaries: 3,
    powerLimit: 1000 as Watts,
    dutyWarn: 0.99 as Ratio,
    isolation: null,
  };
  // Secondary-to-secondary coupling as the winding arrangement gives it.
  if (p.kss) d.secondaryCoupling = p.sec.map((_, i) => p.sec.map((__, j) => couplingOf(p, i + 1, j + 1)));
  return d;
}

export interface GridRow {
  name: string;
  vin: number;
  duty: number;
  arrangement: string;
  outputs: { index: number; n: number; k: number; share: number; cj: number; diode: string; engine: number; sim: number; errorPct: number; vrEngine: number; vrSim: number }[];
  etaEngine: number;
  etaSim: number;
  flags: StageFlag[];
  /** No secondary flagged outside the region the model claims. */
  validated: boolean;
  /** Secondaries whose numbers came from the numerical switching-cycle model (pss.ts), not the closed form. */
  numeric: number[];
}

export function compareGrid(p: GridPoint, sim: GridSimulated): GridRow {
  const d = engineDesign(p);
  const iout = [sim.v[0]! / p.pri.rload, ...p.sec.map((s, i) => Math.abs(sim.v[i + 1]!) / s.rload)];
  const ev = evaluateCoupledBuck(d, { vin: p.vin as Volts, iout: iout as Amps[], ambient: 25 as Celsius }, { vPrimary: sim.v[0]! });
  const modelled = GRID_LOSSES.reduce((a, k) => a + ((ev.lossBreakdown[k] as number | undefined) ?? 0), 0);
  const etaEngine = (ev.pout as number) / ((ev.pout as number) + modelled);
  const pout = iout.reduce((a, i, k) => a + i * Math.abs(sim.v[k]!), 0);
  const etaSim = pout / (sim.iin * p.vin);
  const cp = coupledPoint(d, p.vin, iout, { vPrimary: sim.v[0]!, numeric: false });
  const numeric = p.sec.map((_, i) => i).filter((i) => Math.abs(ev.outputs[i + 1]!.voltage as number) !== cp.sec[i]!.vsec);
  return {
    name: p.name, vin: p.vin, duty: p.duty, arrangement: p.arrangement,
    outputs: p.sec.map((s, i) => {
      const engine = ev.outputs[i + 1]!.voltage as number;
      const vs = sim.v[i + 1]!;
      return {
        index: i + 1, n: s.n, k: s.k, share: s.share, cj: s.diode.cjo, diode: s.diode.kind,
        engine, sim: vs, errorPct: ((engine - vs) / Math.abs(vs)) * 100,
        vrEngine: rectifierPeakReverse(d, cp, i), vrSim: sim.vrMax[i]!,
      };
    }),
    etaEngine, etaSim, flags: ev.flags, validated: !ev.flags.some((f) => f.code === 'outside-validated-region'), numeric,
  };
}

export function formatGridTable(rows: GridRow[]): string {
  const lines = [
    'Independent grid: engine against ngspice (netlists by test/reference/independent-grid.ts, open loop at D;',
    'the engine is evaluated with the simulated primary voltage and the simulated load currents).',
    '',
    '| point | Vin (V) | D | n | k | load share | Cj (pF) | rectifier | arrangement | engine (V) | ngspice (V) | error % | Vr peak engine / ngspice (V) | η engine | η ngspice | Δη (pt) | validated |',
    '|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|',
    // validated: no outside-validated-region flag on the point; (numerical): this secondary's
    // numbers are the numerical switching-cycle model's (pss.ts), the closed form's otherwise.
  ];
  for (const r of rows) {
    r.outputs.forEach((o, i) => {
      const first = i === 0;
      lines.push(`| ${first ? r.name : ''} | ${first ? r.vin : ''} | ${first ? r.duty : ''} | ${o.n} | ${o.k} | ${(o.share * 100).toFixed(0)} % | ${(o.cj * 1e12).toFixed(0)} | ${o.diode} | ${first ? r.arrangement : ''} | ${o.engine.toFixed(3)} | ${o.sim.toFixed(3)} | ${o.errorPct.toFixed(2)} | ${o.vrEngine.toFixed(0)} / ${o.vrSim.toFixed(0)} | ${first ? (r.etaEngine * 100).toFixed(1) : ''} | ${first ? (r.etaSim * 100).toFixed(1) : ''} | ${first ? ((r.etaEngine - r.etaSim) * 100).toFixed(1) : ''} | ${first ? (r.validated ? 'yes' : 'flagged') : ''}${r.numeric.includes(i) ? ' (numerical)' : ''} |`);
    });
  }
  return lines.join('\n');
}
