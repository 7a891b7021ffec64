/**
 * Prints the engine-vs-ngspice table: `npx tsx test/reference/ngspice-table.ts`.
 * Needs ngspice on the PATH.
 */
import { SPICE_POINTS, compare, formatTable, prepare } from './spice-points.ts';
import { runAll } from '../helpers/ngspice.ts';

const prepared = SPICE_POINTS.map(prepare);
const sims = await runAll(prepared.map((p) => p.netlist), 2);
console.log(formatTable(prepared.map((p, i) => compare(p, sims[i]!))));
