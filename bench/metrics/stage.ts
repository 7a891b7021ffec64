/** Stage engine speed: evaluations per second of a coupled-winding buck with 3 secondaries. */
import type { Metric } from '../harness.ts';
import { designStage, evaluateStage } from '../../src-main/engine/stages/index.ts';
import type { StageSpec } from '../../src-main/engine/stages/types.ts';
import { coupledPoint, numericPoint } from '../../src-main/engine/stages/cwbuck/index.ts';
import type { Amps, Celsius, Volts } from '../../src-main/engine/units.ts';

const o = (nodeId: string, voltage: number, currentMin: number, currentMax: number, tolerance: number, rippleLimit: number) =>
  ({ nodeId, voltage, tolerance, currentMin, currentMax, rippleLimit }) as StageSpec['outputs'][number];

const spec = {
  kind: 'cwbuck', vinMin: 18, vinNom: 24, vinMax: 32, fsw: 400e3, ambient: 40, tjMax: 125, ceramicDerating: 0.6,
  outputs: [o('p5', 5, 0.05, 0.5, 0.03, 0.05), o('p12', 12, 0.01, 0.15, 0.08, 0.1), o('n12', -12, 0.01, 0.1, 0.08, 0.1), o('iso5', 5, 0, 0.2, 0.08, 0.1)],
} as unknown as StageSpec;

export const metrics: Metric[] = [
  {
    name: 'stage_evals_per_s',
    unit: 'evaluations/s',
    async sample() {
      const r = designStage(spec);
      if (!r.ok) throw new Error('bench design failed');
      const d = r.design;
      const out: number[] = [];
      let sink = 0;
      for (let run = -1; run < 7; run++) {
        const t0 = performance.now();
        let n = 0;
        while (performance.now() - t0 < 250) {
          for (let k = 0; k < 50; k++, n++) {
            const vin = 18 + (n % 15);
            const ev = evaluateStage(d, { vin: vin as Volts, iout: [0.5, 0.15 - (n % 5) * 0.02, 0.1, 0.2] as Amps[], ambient: 40 as Celsius });
            sink += ev.efficiency;
          }
        }
        if (run >= 0) out.push(n / ((performance.now() - t0) / 1000));
      }
      if (!(sink > 0)) throw new Error('bench produced no results');
      return out;
    },
  },
];

metrics.push({
  name: 'stage_design_ms',
  unit: 'ms',
  async sample() {
    const out: number[] = [];
    for (let run = -1; run < 7; run++) {
      const t0 = performance.now();
      const r = designStage(spec);
      if (!r.ok) throw new Error('bench design failed');
      if (run >= 0) out.push(performance.now() - t0);
    }
    return out;
  },
});

// The numerical switching-cycle model (cwbuck/pss.ts) runs only where the closed form stops:
// the same stage with a 60 pF Schottky (from memory) at light secondary load, each evaluation
// solving the periodic steady state.
metrics.push({
  name: 'stage_numeric_eval_ms',
  unit: 'ms',
  async sample() {
    const r = designStage({ ...spec, rectifier: { is: 3e-6, n: 1.05, rs: 0.05, vfSpread: 0.1, cjo: 60e-12, vj: 0.35, m: 0.5 } } as StageSpec);
    if (!r.ok || r.design.kind !== 'cwbuck') throw new Error('bench design failed');
    const d = r.design;
    for (const w of d.secondaries) w.preload = null;
    const iout = [0.5, 0.01, 0.01, 0.02];
    const probe = coupledPoint(d, 24, iout, { numeric: false });
    numericPoint(d, 24, iout, probe);
    if (!probe.numeric) throw new Error('bench point does not reach the numerical model');
    const out: number[] = [];
    for (let run = -1; run < 5; run++) {
      const t0 = performance.now();
      const ev = evaluateStage(d, { vin: (24 + Math.max(run, 0)) as Volts, iout: iout as Amps[], ambient: 40 as Celsius });
      if (!(ev.efficiency > 0)) throw new Error('bench produced no result');
      if (run >= 0) out.push(performance.now() - t0);
    }
    return out;
  },
});
