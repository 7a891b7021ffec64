/**
 * Prints the engine against the independent grid's stored ngspice results:
 * `npx tsx test/reference/independent-table.ts` (reads test/fixtures/cw-independent-grid.json;
 * no simulator needed).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { compareGrid, formatGridTable } from './independent-compare.ts';
import type { GridPoint, GridSimulated } from './independent-grid.ts';

const file = fileURLToPath(new URL('../fixtures/cw-independent-grid.json', import.meta.url));
const fx = JSON.parse(readFileSync(file, 'utf8')) as { madeBy: Record<string, string>; points: { params: GridPoint; sim: GridSimulated }[] };
const rows = fx.points.map((x) => compareGrid(x.params, x.sim));
console.log(formatGridTable(rows));
const errs = rows.flatMap((r) => r.outputs.map((o) => Math.abs(o.errorPct)));
console.log(`\n${rows.length} points, ${errs.length} secondaries; worst output error ${Math.max(...errs).toFixed(2)} %, worst efficiency gap ${Math.max(...rows.map((r) => Math.abs(r.etaEngine - r.etaSim) * 100)).toFixed(1)} pt`);
console.log(`fixture: ${Object.entries(fx.madeBy).map(([k, v]) => `${k}: ${v}`).join('; ')}`);
