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
  /** The input (default 18–30 V, 24 V nominal). */
  source?: { vMin: number; vNom: number; vMax: number };
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
    sources: [{ id: 'in', name: 'Input', vNom: (o.source?.vNom ?? 24) as Volts, vMin: (o.source?.vMin ?? 18) as Volts, vMax: (o.source?.vMax ?? 30) as Volts, currentLimit: 5 as Amps }],
    domains, modes, loads, limits: { ...DEFAULT_LIMITS },
    preferences: {
      ...DEFAULT_PREFERENCES,
      maxSecondaries: o.maxSecondaries ?? DEFAULT_PREFERENCES.maxSecondaries,
      allowedKinds: o.allowedKinds ?? ['buck', 'cwbuck', 'ldo'],
      switchingFrequency: 400e3 as Hertz,
    },
  };
}

/**
 * An invented instance with a pair of isolated windings of opposite sign (±V) on a low
 * primary, where the pair can design on one magnetic while each winding alone may miss its
 * window (issue 11: winding sets feasible only together), plus up to `extra` further rails.
 */
export function pairedWindingRequirements(seed: number, extra = 1): Requirements {
  const rnd = seededRandom(seed * 104729 + 17);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rnd() * xs.length)]!;
  const vpair = pick([12, 12, 15, 10]);
  const tol = pick([0.06, 0.07, 0.08, 0.09, 0.1]);
  const vnom = pick([12, 12, 15, 24]);
  const vmin = vnom * pick([0.8, 0.83, 0.85]);
  const vmax = vnom * pick([1.15, 1.17, 1.2]);
  const ipair = 0.05 + rnd() * 0.1;
  const load = (id: string, domainId: string, v: number, t: number, i: number, noise: NoiseClass = 'standard'): Load => ({
    id, name: `load ${id}`, domainId, voltage: v as Volts, tolerance: t as Ratio,
    current: { run: i as Amps, idle: (i * 0.3) as Amps }, rippleLimit: 0.1 as Volts, noiseClass: noise,
  });
  const loads: Load[] = [
    load('P', 'main', pick([5, 5, 3.3]), 0.05, 0.1 + rnd() * 0.3),
    load('A', 'iso', vpair, tol, ipair),
    load('B', 'iso', -vpair, tol, ipair * (0.7 + rnd() * 0.6)),
  ];
  const extras: [string, number][] = [['main', 1.8], ['main', 3.3], ['iso', 5], ['main', 1.2]];
  for (let k = 0; k < extra; k++) {
    const [d, v] = extras[Math.floor(rnd() * extras.length)]!;
    if (loads.some((l) => l.domainId === d && l.voltage === v)) continue;
    loads.push(load(`X${k}`, d, v, pick([0.03, 0.05]), 0.05 + rnd() * 0.2));
  }
  return {
    meta: { name: `paired windings seed ${seed}`, description: 'Invented paired-winding instance for planner tests', revision: 1 },
    sources: [{ id: 'in', name: 'Input', vNom: vnom as Volts, vMin: vmin as Volts, vMax: vmax as Volts, currentLimit: 5 as Amps }],
    domains: [
      { id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 as Volts },
      { id: 'iso', name: 'Iso', isolation: 'functional', workingVoltage: 60 as Volts },
    ],
    modes: [{ id: 'run', name: 'run', share: 0.9 as Ratio }, { id: 'idle', name: 'idle', share: 0.1 as Ratio }],
    loads, limits: { ...DEFAULT_LIMITS },
    preferences: {
      ...DEFAULT_PREFERENCES,
      maxSecondaries: 2,
      allowedKinds: rnd() < 0.5 ? ['buck', 'cwbuck'] : ['buck', 'cwbuck', 'ldo'],
      switchingFrequency: 400e3 as Hertz,
    },
  };
}
