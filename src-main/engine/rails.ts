/**
 * Group loads into rails. Loads share a rail when they are in the same domain, at the same
 * signed voltage (to 1 mV), and of the same noise class; a manual `railKey` overrides the
 * automatic grouping (loads with the same key share a rail whatever their class, provided
 * domain and voltage agree, which validation checks).
 */
import type { Amps, Ratio, Volts } from './units.ts';
import type { Id, Load, NoiseClass, Rail, Requirements } from './model.ts';

const NOISE_RANK: Record<NoiseClass, number> = { rugged: 0, standard: 1, quiet: 2 };

export function strictestNoise(a: NoiseClass, b: NoiseClass): NoiseClass {
  return NOISE_RANK[a] >= NOISE_RANK[b] ? a : b;
}

function groupKey(l: Load): string {
  if (l.railKey && l.railKey.trim() !== '') return `manual:${l.domainId}:${l.railKey.trim()}`;
  return `auto:${l.domainId}:${Math.round(l.voltage * 1000)}:${l.noiseClass}`;
}

/** Human name of a voltage for rail names: 3.3 → "3V3", -12 → "-12V", 1.8 → "1V8". */
export function voltageLabel(v: number): string {
  const sign = v < 0 ? '-' : '';
  const a = Math.abs(v);
  const whole = Math.trunc(a + 1e-9);
  const frac = Math.round((a - whole) * 1000);
  if (frac === 0) return `${sign}${whole}V`;
  return `${sign}${whole}V${String(frac).padStart(3, '0').replace(/0+$/, '')}`;
}

/**
 * Most rails a project may have: `validate` refuses more (naming the count), and the planner
 * (planner/search.ts MAX_RAILS) plans up to exactly this many, so the two never disagree.
 */
export const MAX_PLANNED_RAILS = 60;

export function groupRails(req: Requirements): Rail[] {
  const groups = new Map<string, Load[]>();
  for (const l of req.loads) {
    const k = groupKey(l);
    const g = groups.get(k);
    if (g) g.push(l); else groups.set(k, [l]);
  }
  const rails: Rail[] = [];
  const usedNames = new Map<string, number>();
  for (const [key, loads] of groups) {
    const first = loads[0]!;
    const domain = req.domains.find((d) => d.id === first.domainId);
    let noise: NoiseClass = 'rugged';
    let tol = Infinity;
    let ripple = Infinity;
    const current: Record<Id, Amps> = {};
    for (const m of req.modes) current[m.id] = 0 as Amps;
    for (const l of loads) {
      noise = strictestNoise(noise, l.noiseClass);
      tol = Math.min(tol, l.tolerance);
      ripple = Math.min(ripple, l.rippleLimit);
      for (const m of req.modes) current[m.id] = (current[m.id]! + (l.current[m.id] ?? 0)) as Amps;
    }
    const manual = key.startsWith('manual:');
    const base = manual
      ? first.railKey!.trim()
      : `${domain?.name ?? first.domainId} ${voltageLabel(first.voltage)}${noise === 'quiet' ? ' quiet' : ''}`;
    const n = (usedNames.get(base) ?? 0) + 1;
    usedNames.set(base, n);
    rails.push({
      id: `rail:${key}`,
      name: n === 1 ? base : `${base} (${n})`,
      domainId: first.domainId,
      voltage: first.voltage as Volts,
      tolerance: tol as Ratio,
      rippleLimit: ripple as Volts,
      noiseClass: noise,
      loadIds: loads.map((l) => l.id),
      current,
    });
  }
  // Stable order: by domain order in the project, then by descending |V|, then name.
  const domOrder = new Map(req.domains.map((d, i) => [d.id, i]));
  rails.sort((a, b) =>
    (domOrder.get(a.domainId) ?? 0) - (domOrder.get(b.domainId) ?? 0) ||
    Math.abs(b.voltage) - Math.abs(a.voltage) || b.voltage - a.voltage || a.name.localeCompare(b.name));
  return rails;
}

/** Peak current of a rail over all modes. */
export function railPeakCurrent(r: Rail): Amps {
  let m = 0;
  for (const k in r.current) m = Math.max(m, r.current[k]!);
  return m as Amps;
}
