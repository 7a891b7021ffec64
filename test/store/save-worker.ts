/**
 * Child process for the killed-save test: saves two different large projects over the same
 * file in a loop, printing a line after each completed save, until the parent kills it.
 */
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { generateProject } from '../../src-main/store/generate.ts';

const [path, loads = '1500'] = process.argv.slice(2);
if (!path) throw new Error('usage: save-worker <file> [loads]');
const a = generateProject({ loads: Number(loads), seed: 1 }).requirements;
const b = generateProject({ loads: Number(loads), seed: 2 }).requirements;
a.meta.name = 'A';
b.meta.name = 'B';
const store = ProjectStore.open(path);
for (let i = 0; ; i++) {
  store.setRequirements(i % 2 ? a : b, { keepRevision: true });
  store.save();
  process.stdout.write(`saved ${i}\n`);
}
