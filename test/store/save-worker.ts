/**
 * Child process for the killed-save test: two large projects held in memory are saved
 * alternately over the same file in a tight loop (nearly all the time is spent inside
 * save), printing a line after each completed save, until the parent kills it.
 */
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { generateProject } from '../../src-main/store/generate.ts';

const [path, loads = '1500'] = process.argv.slice(2);
if (!path) throw new Error('usage: save-worker <file> [loads]');
const a = generateProject({ loads: Number(loads), seed: 1 });
const b = generateProject({ loads: Number(loads), seed: 2 });
a.requirements.meta.name = 'A';
b.requirements.meta.name = 'B';
const stores = [ProjectStore.fromDocument(a), ProjectStore.fromDocument(b)];
for (let i = 0; ; i++) {
  // Two documents replacing each other on purpose: overwrite (as after a confirmation).
  stores[i % 2]!.save(path, { overwrite: true });
  process.stdout.write(`saved ${i}\n`);
}
