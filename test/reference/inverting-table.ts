/**
 * Simulates every inverting reference point in ngspice (two at a time) and writes
 * test/fixtures/inverting-ngspice.json: `npx tsx test/reference/inverting-table.ts`.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { INV_POINTS, compareInverting, referenceNetlist } from './inverting-reference.ts';
import { runAll } from '../helpers/ngspice.ts';

const sims = await runAll(INV_POINTS.map(referenceNetlist), 2);
const fixture = {
  about: 'ngspice batch simulations of the hand-written inverting reference netlists (test/reference/inverting-reference.ts), written by test/reference/inverting-table.ts',
  points: INV_POINTS.map((p, i) => ({ name: p.name, v_out0: sims[i]!.meas.v_out0!, i_in: sims[i]!.meas.i_in! })),
};
writeFileSync(join(import.meta.dirname, '../fixtures/inverting-ngspice.json'), JSON.stringify(fixture, null, 2) + '\n');
console.log('| point | Vin (V) | D | engine (V) | ngspice (V) | error % | η engine | η ngspice |');
console.log('|---|---|---|---|---|---|---|---|');
for (const p of fixture.points) {
  const r = compareInverting(INV_POINTS.find((x) => x.name === p.name)!, p);
  console.log(`| ${r.name} | ${r.vin} | ${r.duty.toFixed(3)} | ${r.vEngine.toFixed(3)} | ${r.vSim.toFixed(3)} | ${r.errorPct.toFixed(2)} | ${(r.etaEngine * 100).toFixed(1)} % | ${(r.etaSim * 100).toFixed(1)} % |`);
}
