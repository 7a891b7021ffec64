/** `npm run bench [filter]`: runs every metric in bench/metrics, one JSON line each. */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { summarise, type Metric } from './harness.ts';

const filter = process.argv[2];
const dir = join(import.meta.dirname, 'metrics');
for (const f of readdirSync(dir).filter((n) => n.endsWith('.ts')).sort()) {
  const mod = (await import(pathToFileURL(join(dir, f)).href)) as { metrics: Metric[] };
  for (const m of mod.metrics) {
    if (filter && !m.name.includes(filter)) continue;
    try {
      const xs = await m.sample();
      console.log(JSON.stringify({ ...summarise(m.name, m.unit, xs), ...(m.details?.() ?? {}) }));
    } catch (e) {
      console.log(JSON.stringify({ metric: m.name, unit: m.unit, error: String((e as Error).message ?? e) }));
    }
  }
}
