/**
 * Simulates the independent grid in ngspice and stores the results as a fixture:
 * `npx tsx test/reference/independent-generate.ts` (two simulations at a time, ≈ 3 min).
 * The fixture records how it was made; test/reference/independent-grid.test.ts compares the
 * engine with it and re-simulates a few points live. With point names as arguments
 * (`... independent-generate.ts g18 g41`) only those are re-simulated and the rest kept.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { GRID, WINDOW_PERIODS, independentNetlist, readGrid } from './independent-grid.ts';
import { runAll } from '../helpers/ngspice.ts';

const version = execFileSync('ngspice', ['-v'], { encoding: 'utf8' }).split('\n').find((l) => /ngspice-\d+/.test(l))?.match(/ngspice-\d+/)?.[0] ?? 'unknown';
const file = fileURLToPath(new URL('../fixtures/cw-independent-grid.json', import.meta.url));
const only = process.argv.slice(2);
const old = only.length && existsSync(file)
  ? (JSON.parse(readFileSync(file, 'utf8')) as { points: { params: { name: string }; sim: unknown }[] }).points
  : [];
const todo = GRID.filter((p) => !only.length || only.includes(p.name) || !old.some((x) => x.params.name === p.name));
const fresh = await runAll(todo.map(independentNetlist), 2);
const sims = GRID.map((p) => {
  const k = todo.indexOf(p);
  return k >= 0 ? readGrid(p, fresh[k]!) : old.find((x) => x.params.name === p.name)!.sim;
});
const fixture = {
  madeBy: {
    script: 'test/reference/independent-generate.ts',
    netlistWriter: 'test/reference/independent-grid.ts (independentNetlist)',
    simulator: version,
    options: '.options method=gear reltol=1e-4 itl4=100; .tran 10n <tstop> 0 10n uic (max step 10 ns)',
    averaging: `three consecutive windows of ${WINDOW_PERIODS} periods at the end of the run; Aitken extrapolation when they converge geometrically`,
    date: new Date().toISOString().slice(0, 10),
    note: 'invented test circuits; open loop at the given duty',
  },
  points: GRID.map((p, i) => ({ params: p, sim: sims[i] })),
};
writeFileSync(file, JSON.stringify(fixture, null, 1) + '\n');
console.log(`wrote ${file}: ${GRID.length} points`);
