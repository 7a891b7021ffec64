/**
 * Stage engine speed per new stage kind: evaluations per second of one invented design of
 * each (boost, inverting, four-switch buck-boost, isolated module, load switch), sweeping the input range.
 */
import type { Metric } from '../harness.ts';
import { designStage, evaluateStage } from '../../src-main/engine/stages/index.ts';
import type { StageSpec } from '../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../src-main/engine/units.ts';

const base = { fsw: 500e3, ambient: 40, tjMax: 125, ceramicDerating: 0.6 };
const out = (nodeId: string, voltage: number, currentMax: number, tolerance = 0.05, rippleLimit = 0.1) =>
  [{ nodeId, voltage, tolerance, currentMin: 0.01, currentMax, rippleLimit }];

const KINDS: { name: string; spec: StageSpec; vin: [number, number]; iout: number }[] = [
  { name: 'boost', spec: { ...base, kind: 'boost', vinMin: 4.5, vinNom: 5, vinMax: 5.5, outputs: out('12v', 12, 1) } as unknown as StageSpec, vin: [4.5, 5.5], iout: 1 },
  { name: 'inverting', spec: { ...base, kind: 'inverting', vinMin: 10, vinNom: 12, vinMax: 14, outputs: out('n5', -5, 0.3) } as unknown as StageSpec, vin: [10, 14], iout: 0.3 },
  { name: 'buck_boost_4s', spec: { ...base, kind: 'buck-boost-4s', vinMin: 9, vinNom: 24, vinMax: 36, fsw: 400e3, outputs: out('12v', 12, 1) } as unknown as StageSpec, vin: [9, 36], iout: 1 },
  { name: 'iso_module', spec: { ...base, kind: 'iso-module', vinMin: 11.4, vinNom: 12, vinMax: 12.6, outputs: out('5v', 5, 0.25, 0.15) } as unknown as StageSpec, vin: [11.4, 12.6], iout: 0.25 },
  { name: 'load_switch', spec: { ...base, kind: 'load-switch', vinMin: 3.25, vinNom: 3.3, vinMax: 3.35, outputs: out('3v3', 3.3, 0.5) } as unknown as StageSpec, vin: [3.25, 3.35], iout: 0.5 },
];

export const metrics: Metric[] = KINDS.map((k) => ({
  name: `stage_evals_per_s_${k.name}`,
  unit: 'evaluations/s',
  async sample() {
    const r = designStage(k.spec);
    if (!r.ok) throw new Error(`bench design failed: ${r.flags.map((f) => f.text).join('; ')}`);
    const d = r.design;
    const xs: number[] = [];
    let sink = 0;
    for (let run = -1; run < 7; run++) {
      const t0 = performance.now();
      let n = 0;
      while (performance.now() - t0 < 250) {
        for (let j = 0; j < 50; j++, n++) {
          const vin = k.vin[0] + ((k.vin[1] - k.vin[0]) * (n % 16)) / 15;
          sink += evaluateStage(d, { vin: vin as Volts, iout: [(k.iout * (0.2 + 0.8 * ((n % 5) / 4))) as Amps], ambient: 40 as Celsius }).efficiency;
        }
      }
      if (run >= 0) xs.push(n / ((performance.now() - t0) / 1000));
    }
    if (!(sink > 0)) throw new Error('bench produced no results');
    return xs;
  },
}));
