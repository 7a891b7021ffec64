/**
 * Seeded generator of random (invented) requirement sets for the planner's property tests
 * and benchmarks. Same seed, same requirements. Values are plausible but invented.
 */
import type { Amps, Hertz, Ratio, Volts } from '../units.ts';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES, type Domain, type Load, type NoiseClass, type Requirements, type StageKind } from '../model.ts';

export { seededRandom } from '../random.ts';
import { seededRandom } from '../random.ts';

export interface InstanceOptions {
  rails: number;
  seed: number;
  /** Share of rails in isolated domains (0..1). */
  isolatedShare?: number;
  maxSecondaries?: number;
  allowedKinds?: StageKind[];
  /** Chance a rail is quiet. */
  quietShare?: number;
  /** Chance a rail is negative (isolated domains only). */
  negativeShare?: number;
}

const MAIN_V = [12, 5, 3.3, 2.5, 1.8, 1.5, 1.2, 1.0, 0.9, 6, 9, 2.8];
const ISO_V = [15, 12, 5, 3.3, 2.5, 1.8, 10, 6];

/** One invented instance with exactly `rails` rails (one load per rail). */
export function randomRequirements(o: InstanceOptions): Requirements {
  const rnd = seededRandom(o.seed * 7919 + o.rails);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rnd() * xs.length)]!;
  const domains: Domain[] = [
    { id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 as Volts },
    { id: 'isoA', name: 'Iso A', isolation: 'basic', workingVoltage: 250 as Volts },
    { id: 'isoB', name: 'Iso B', isolation: 'functional', workingVoltage: 60 as Volts },
  ];
  const modes = [
    { id: 'run', name: 'run', share: 0.8 as Ratio },
    { id: 'burst', name: 'burst', share: 0.15 as Ratio },
    { id: 'idle', name: 'idle', share: 0.05 as Ratio },
  ];
  const loads: Load[] = [];
  const used = new Set<string>();
  let guard = 0;
  while (loads.length < o.rails && guard++ < 10_000) {
    const iso = rnd() < (o.isolatedShare ?? 0.3);
    const dom = iso ? (rnd() < 0.6 ? 'isoA' : 'isoB') : 'main';
    let v = iso ? pick(ISO_V) : pick(MAIN_V);
    if (iso && rnd() < (o.negativeShare ?? 0.2)) v = -v;
    const noise: NoiseClass = rnd() < (o.quietShare ?? 0.15) ? 'quiet' : (rnd() < 0.5 ? 'standard' : 'rugged');
    const key = `${dom}:${v}:${noise}`;
    if (used.has(key)) continue;
    used.add(key);
    const base = 0.02 + rnd() * (Math.abs(v) > 6 ? 0.15 : 0.5);
    const quiet = noise === 'quiet';
    loads.push({
      id: `L${loads.length + 1}`, name: `load ${loads.length + 1}`, domainId: dom, voltage: v as Volts,
      tolerance: (quiet ? 0.02 : pick([0.03, 0.05, 0.05, 0.08, 0.1])) as Ratio,
      current: { run: base as Amps, burst: (base * (1 + rnd())) as Amps, idle: (base * 0.2) as Amps },
      rippleLimit: (quiet ? 0.005 : pick([0.01, 0.03, 0.05])) as Volts,
      noiseClass: noise,
    });
  }
  return {
    meta: { name: `random ${o.rails} rails seed ${o.seed}`, description: 'Invented random instance for planner tests', revision: 1 },
    sources: [{ id: 'in', name: 'Input', vNom: 24 as Volts, vMin: 18 as Volts, vMax: 30 as Volts, currentLimit: 5 as Amps }],
    domains, modes, loads, limits: { ...DEFAULT_LIMITS },
    preferences: {
      ...DEFAULT_PREFERENCES,
      maxSecondaries: o.maxSecondaries ?? DEFAULT_PREFERENCES.maxSecondaries,
      allowedKinds: o.allowedKinds ?? ['buck', 'cwbuck', 'ldo'],
      switchingFrequency: 400e3 as Hertz,
    },
  };
}
