/**
 * Operating points for the engine-vs-ngspice comparison (invented test circuits). Each is
 * designed by the engine, written out as an open-loop netlist at the computed duty, and run
 * in ngspice; the engine is then evaluated with the primary at the simulated voltage and the
 * loads at the simulated currents, and its outputs and efficiency are compared.
 */
import { designStage, evaluateStage, type StageDesign } from '../../src-main/engine/stages/index.ts';
import { buckNetlist, coupledBuckNetlist } from '../../src-main/export/spice.ts';
import type { OperatingPoint, OutputSpec, StageSpec } from '../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Hertz, Ratio, Volts } from '../../src-main/engine/units.ts';
import type { SpiceResult } from '../helpers/ngspice.ts';

const out = (nodeId: string, voltage: number, currentMax: number, tolerance = 0.08, rippleLimit = 0.1): OutputSpec => ({
  nodeId, voltage: voltage as Volts, tolerance: tolerance as Ratio, currentMin: (currentMax * 0.1) as Amps, currentMax: currentMax as Amps, rippleLimit: rippleLimit as Volts,
});

export interface SpicePoint {
  name: string;
  spec: StageSpec;
  vin: number;
  /** Load currents of the simulated point (default: every output at its largest current). */
  iout?: number[];
}

const spec = (kind: 'buck' | 'cwbuck', vin: [number, number, number], outputs: OutputSpec[], fsw: number, coupling?: number): StageSpec => ({
  kind, vinMin: vin[0] as Volts, vinNom: vin[1] as Volts, vinMax: vin[2] as Volts, outputs, fsw: fsw as Hertz,
  ambient: 25 as Celsius, tjMax: 150 as Celsius, ceramicDerating: 0.6 as Ratio, ...(coupling !== undefined ? { coupling } : {}),
});

export const SPICE_POINTS: SpicePoint[] = [
  { name: 'cw1', vin: 12, spec: spec('cwbuck', [10, 12, 14], [out('p5', 5, 0.4, 0.03, 0.05), out('s12', 12, 0.1)], 400e3, 0.99) },
  { name: 'cw2', vin: 24, spec: spec('cwbuck', [18, 24, 32], [out('p3v3', 3.3, 0.5, 0.03, 0.05), out('s5', 5, 0.2), out('n5', -5, 0.1)], 500e3, 0.98) },
  { name: 'cw3', vin: 48, spec: spec('cwbuck', [40, 48, 56], [out('p5', 5, 0.3, 0.03, 0.05), out('s15', 15, 0.08), out('n15', -15, 0.08), out('s5i', 5, 0.15)], 300e3, 0.997) },
  { name: 'cw4', vin: 12, spec: spec('cwbuck', [11, 12, 13], [out('p5v8', 5.8, 0.3, 0.03, 0.05), out('n12', -12, 0.06)], 400e3, 0.995) },
  { name: 'cw5', vin: 36, spec: spec('cwbuck', [30, 36, 42], [out('p12', 12, 0.3, 0.03, 0.1), out('s24', 24, 0.1)], 350e3, 0.985) },
  { name: 'cw6', vin: 20, spec: spec('cwbuck', [16, 20, 24], [out('p5', 5, 0.8, 0.03, 0.05), out('s12', 12, 0.15), out('s3v3', 3.3, 0.2), out('n8', -8, 0.1)], 400e3, 0.99) },
  // Cross-regulation: Vin min, primary at full load, secondaries at their lightest (with preload).
  { name: 'cw7', vin: 18, iout: [0.5, 0.02, 0.01], spec: spec('cwbuck', [18, 24, 32], [out('p3v3', 3.3, 0.5, 0.03, 0.05), out('s5', 5, 0.2), out('n5', -5, 0.1)], 500e3, 0.98) },
  { name: 'b1', vin: 12, spec: spec('buck', [10, 12, 14], [out('r3v3', 3.3, 2, 0.03, 0.04)], 500e3) },
  { name: 'b2', vin: 48, spec: spec('buck', [40, 48, 56], [out('r12', 12, 1, 0.03, 0.1)], 300e3) },
  // Forced PWM at light load: the inductor current goes negative every cycle.
  { name: 'b3', vin: 24, iout: [0.1], spec: spec('buck', [18, 24, 32], [out('r5', 5, 1.5, 0.03, 0.05)], 400e3) },
];

/** Loss terms the netlists model too (everything else is left out of the comparison). */
export const MODELLED_LOSSES = [
  'hs-conduction', 'ls-conduction', 'dead-time', 'inductor-copper', 'primary-copper', 'secondary-copper',
  'rectifiers', 'output-capacitor-esr', 'preload',
];

export interface Prepared {
  point: SpicePoint;
  design: StageDesign;
  op: OperatingPoint;
  netlist: string;
  /** Engine output voltages at the nominal point (sets the load resistors). */
  nominal: number[];
}

export function prepare(p: SpicePoint): Prepared {
  const r = designStage(p.spec);
  if (!r.ok) throw new Error(`${p.name}: design failed: ${r.flags.map((f) => f.text).join('; ')}`);
  const design = r.design;
  const op: OperatingPoint = { vin: p.vin as Volts, iout: (p.iout ?? p.spec.outputs.map((o) => o.currentMax)) as Amps[], ambient: 25 as Celsius };
  const ev = evaluateStage(design, op);
  const netlist = design.kind === 'buck' ? buckNetlist(design, op) : design.kind === 'cwbuck' ? coupledBuckNetlist(design, op) : '';
  return { point: p, design, op, netlist, nominal: ev.outputs.map((o) => o.voltage as number) };
}

export interface ComparisonRow {
  name: string;
  vin: number;
  duty: number;
  coupling: number | null;
  outputs: { nodeId: string; engine: number; sim: number; errorPct: number; rippleEngine: number; rippleSim: number }[];
  etaEngine: number;
  etaSim: number;
  /** Open loop: the engine's primary setpoint (which set the duty) against the simulated primary. */
  primarySetpoint: number;
}

export function compare(x: Prepared, sim: SpiceResult): ComparisonRow {
  const { design, op } = x;
  const vsim = design.outputs.map((_, i) => sim.meas[`v_out${i}`]);
  if (vsim.some((v) => v === undefined)) throw new Error(`${x.point.name}: ngspice gave no v_out for every output`);
  // Loads are resistors R = V_engine/I: at the simulated voltage they draw I·V_sim/V_engine.
  const isim = op.iout.map((i, k) => (i as number) * (vsim[k]! / x.nominal[k]!));
  const ev = evaluateStage(design, { ...op, iout: isim as Amps[] }, design.kind === 'cwbuck' ? { vPrimary: vsim[0]! } : undefined);
  const modelled = MODELLED_LOSSES.reduce((a, k) => a + ((ev.lossBreakdown[k] as number | undefined) ?? 0), 0);
  const etaEngine = (ev.pout as number) / ((ev.pout as number) + modelled);
  const pinSim = -sim.meas.i_in! * (op.vin as number);
  const poutSim = isim.reduce((a, i, k) => a + Math.abs(i * vsim[k]!), 0);
  return {
    name: x.point.name,
    vin: op.vin as number,
    duty: evaluateStage(design, op).duty as number,
    coupling: design.kind === 'cwbuck' ? design.secondaries[0]!.coupling : null,
    outputs: design.outputs.map((o, k) => {
      const engine = ev.outputs[k]!.voltage as number;
      return {
        nodeId: o.nodeId, engine, sim: vsim[k]!, errorPct: ((engine - vsim[k]!) / Math.abs(vsim[k]!)) * 100,
        rippleEngine: ev.outputs[k]!.ripplePP as number, rippleSim: sim.meas[`vpp_out${k}`] ?? Number.NaN,
      };
    }),
    etaEngine,
    etaSim: poutSim / pinSim,
    primarySetpoint: x.nominal[0]!,
  };
}

export function formatTable(rows: ComparisonRow[]): string {
  const lines = [
    'Engine outputs evaluated with the primary at its simulated voltage and the loads at their simulated currents;',
    'the last column compares the open-loop primary with the setpoint the engine computed the duty for.',
    '',
    '| point | Vin (V) | D | k | output | engine (V) | ngspice (V) | error % | ripple engine / ngspice (mV p-p) | η engine | η ngspice | primary setpoint → sim |',
    '|---|---|---|---|---|---|---|---|---|---|---|---|',
  ];
  for (const r of rows) {
    r.outputs.forEach((o, i) => {
      lines.push(`| ${i === 0 ? r.name : ''} | ${i === 0 ? r.vin : ''} | ${i === 0 ? r.duty.toFixed(3) : ''} | ${i === 0 ? (r.coupling ?? '–') : ''} | ${o.nodeId} | ${o.engine.toFixed(3)} | ${o.sim.toFixed(3)} | ${o.errorPct.toFixed(2)} | ${(o.rippleEngine * 1e3).toFixed(1)} / ${(o.rippleSim * 1e3).toFixed(1)} | ${i === 0 ? (r.etaEngine * 100).toFixed(1) + ' %' : ''} | ${i === 0 ? (r.etaSim * 100).toFixed(1) + ' %' : ''} | ${i === 0 ? `${r.primarySetpoint.toFixed(3)} → ${o.sim.toFixed(3)} V` : ''} |`);
    });
  }
  return lines.join('\n');
}
