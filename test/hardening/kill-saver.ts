/**
 * Child process of the kill test (kill.test.ts).
 * Usage: kill-saver <file> <first-state> <loads> <migrations-dir>.
 * Before the clock starts it builds STORES in-memory projects holding states first,
 * first+1, … and prints "ready"; on a line on stdin it saves them in turn to <file>
 * (Save As: the same atomic write as Save) until it is killed. Before each save it prints
 * "begin <hash>" (hash of the requirements being saved) and after it "end". Writes to a
 * pipe are synchronous on Linux (Node's process.stdout documentation), so a printed line
 * was printed before the kill. Saving is almost all the loop does, so most kills land
 * inside a save.
 */
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { setMigrationsDir } from '../../src-main/store/migrations.ts';
import { killStates, requirementsHash } from './kill-states.ts';

const STORES = 6;
const [file, firstText, loadsText, migrations] = process.argv.slice(2);
if (!file || !firstText || !loadsText || !migrations) throw new Error('usage: kill-saver <file> <first-state> <loads> <migrations-dir>');
setMigrationsDir(migrations);
const state = killStates(Number(loadsText));
const first = Number(firstText);
const stores = Array.from({ length: STORES }, (_, i) => {
  const s = ProjectStore.create();
  s.setRequirements(state(first + i), { keepRevision: true });
  return { store: s, hash: requirementsHash(s.getRequirements()) };
});
const out = (line: string) => process.stdout.write(line + '\n');
out('ready');
process.stdin.once('data', () => {
  for (let k = 0; ; k++) {
    const { store, hash } = stores[k % STORES]!;
    out(`begin ${hash}`);
    store.save(file, { overwrite: true }); // several documents replace each other on purpose
    out('end');
  }
});
