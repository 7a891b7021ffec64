/**
 * Simulates every four-switch buck-boost reference point in ngspice (two at a time) and
 * writes test/fixtures/fourswitch-ngspice.json: `npx tsx test/reference/fourswitch-table.ts`.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { FS_POINTS, compareFourSwitch, referenceNetlist } from './fourswitch-reference.ts';
import { runAll } from '../helpers/ngspice.ts';

const sims = await runAll(FS_POINTS.map(referenceNetlist), 2);
const fixture = {
  about: 'ngspice batch simulations of the hand-written four-switch buck-boost reference netlists (test/reference/fourswitch-reference.ts), written by test/reference/fourswitch-table.ts',
  points: FS_POINTS.map((p, i) => ({ name: p.name, v_out0: sims[i]!.meas.v_out0!, i_in: sims[i]!.meas.i_in! })),
};
writeFileSync(join(import.meta.dirname, '../fixtures/fourswitch-ngspice.json'), JSON.stringify(fixture, null, 2) + '\n');
console.log('| point | Vin (V) | region | engine (V) | ngspice (V) | error % | η engine | η ngspice |');
console.log('|---|---|---|---|---|---|---|---|');
for (const p of fixture.points) {
  const r = compareFourSwitch(FS_POINTS.find((x) => x.name === p.name)!, p);
  console.log(`| ${r.name} | ${r.vin} | ${r.region} | ${r.vEngine.toFixed(3)} | ${r.vSim.toFixed(3)} | ${r.errorPct.toFixed(2)} | ${(r.etaEngine * 100).toFixed(1)} % | ${(r.etaSim * 100).toFixed(1)} % |`);
}
