/**
 * Benchmark harness. Each file in bench/metrics exports `metrics: Metric[]`; run.ts prints
 * one JSON line per metric: {"metric","unit","median","min","max","runs"}. Metrics that
 * are not timings (ratios, percentages) return their values through `sample` directly.
 */
export interface MetricLine {
  metric: string;
  unit: string;
  median: number;
  min: number;
  max: number;
  runs: number;
}

export interface Metric {
  name: string;
  unit: string;
  /** Returns the samples (e.g. milliseconds per run). */
  sample(): Promise<number[]>;
  /** Further figures of the last sample, printed on the same JSON line. */
  details?(): Record<string, number | boolean | string>;
}

export function summarise(name: string, unit: string, xs: number[]): MetricLine {
  const s = [...xs].sort((a, b) => a - b);
  const mid = s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
  const r = (x: number) => Math.round(x * 1000) / 1000;
  return { metric: name, unit, median: r(mid), min: r(s[0]!), max: r(s[s.length - 1]!), runs: s.length };
}

/** Time `fn` `runs` times (after `warmup` untimed runs) and return milliseconds per run. */
export async function timeRuns(runs: number, fn: (i: number) => unknown | Promise<unknown>, warmup = 1): Promise<number[]> {
  for (let i = 0; i < warmup; i++) await fn(-1 - i);
  const out: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    await fn(i);
    out.push(performance.now() - t0);
  }
  return out;
}
