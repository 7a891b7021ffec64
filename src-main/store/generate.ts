/**
 * Generated projects of any size for benchmarks and tests: `generateProject({ loads: 60,
 * seed: 1 })`. Deterministic for a seed; always passes validateRequirements. The content is
 * synthetic (labelled so in the description), not a design of any real product.
 */
import {
  DEFAULT_LIMITS, DEFAULT_PREFERENCES, type Domain, type Load, type NoiseClass, type OperatingMode,
  type Requirements,
} from '../engine/model.ts';
import type { Amps, Ratio, Volts } from '../engine/units.ts';
import type { ProjectDocument } from './json-format.ts';

export interface GenerateOptions {
  loads: number;
  seed?: number;
  /** Isolated domains besides the main one (default: one per 8 loads, at most 4). */
  isolatedDomains?: number;
}

/** The project's seeded generator (engine/random.ts), under the name the tests use. */
export { seededRandom as prng } from '../engine/random.ts';
import { seededRandom as prng } from '../engine/random.ts';

const DIGITAL: [number, number, NoiseClass][] = [[1.0, 0.03, 'rugged'], [1.2, 0.03, 'rugged'], [1.8, 0.05, 'standard'], [2.5, 0.05, 'standard'], [3.3, 0.05, 'standard'], [5, 0.05, 'rugged'], [12, 0.1, 'rugged']];
const ANALOG: [number, number, NoiseClass][] = [[15, 0.05, 'quiet'], [-15, 0.05, 'quiet'], [12, 0.05, 'quiet'], [-12, 0.05, 'quiet'], [5, 0.02, 'quiet'], [2.5, 0.01, 'quiet'], [3.3, 0.05, 'standard']];

export function generateProject(opts: GenerateOptions): ProjectDocument {
  const n = Math.max(0, Math.floor(opts.loads));
  const rnd = prng(opts.seed ?? 1);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rnd() * xs.length)]!;
  const round = (x: number, step: number) => Math.max(step, Math.round(x / step) * step);
  const iso = opts.isolatedDomains ?? Math.min(4, Math.floor(n / 8));
  const domains: Domain[] = [{ id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 as Volts }];
  for (let i = 1; i <= iso; i++) {
    domains.push({ id: `iso-${i}`, name: `Isolated ${i}`, isolation: i % 2 ? 'basic' : 'functional', workingVoltage: (i % 2 ? 250 : 60) as Volts });
  }
  const modes: OperatingMode[] = [
    { id: 'run', name: 'Run', share: 0.7 as Ratio },
    { id: 'peak', name: 'Peak', share: 0.2 as Ratio },
    { id: 'idle', name: 'Idle', share: 0.1 as Ratio },
  ];
  const loads: Load[] = [];
  for (let i = 0; i < n; i++) {
    const dom = i < n / 2 || domains.length === 1 ? domains[0]! : domains[1 + (i % (domains.length - 1))]!;
    const [v, tol, noise] = pick(dom.isolation === 'none' ? DIGITAL : ANALOG);
    const run = round(0.002 + rnd() * 0.15, 0.001);
    loads.push({
      id: `load-${i + 1}`,
      name: `Generated load ${i + 1}`,
      domainId: dom.id,
      voltage: v as Volts,
      tolerance: tol as Ratio,
      current: { run: run as Amps, peak: round(run * (1 + rnd()), 0.001) as Amps, idle: round(run * 0.1, 0.0001) as Amps },
      rippleLimit: (noise === 'quiet' ? 0.002 : noise === 'standard' ? 0.03 : 0.05) as Volts,
      noiseClass: noise,
    });
  }
  const requirements: Requirements = {
    meta: { name: `Generated project (${n} loads)`, description: `Synthetic project generated for tests and benchmarks (seed ${opts.seed ?? 1}); not a real design.`, revision: 1 },
    sources: [{ id: 'in', name: 'DC input', vNom: 24 as Volts, vMin: 18 as Volts, vMax: 32 as Volts, currentLimit: 10 as Amps }],
    domains,
    modes,
    loads,
    limits: { ...DEFAULT_LIMITS },
    preferences: { ...DEFAULT_PREFERENCES, weights: { ...DEFAULT_PREFERENCES.weights }, allowedKinds: [...DEFAULT_PREFERENCES.allowedKinds] },
  };
  return { requirements, library: [] };
}
