// Issue 10 item 3: no CLI writer replaces an existing file unless --force, and a refusal
// writes nothing at all (every target is checked before the first is written). Run through
// a child process (`node bin/railwright.mjs ...`) as a user runs it, on a project holding
// the hand-made (invented) plan so no planning is needed.
import { beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { handRequirements } from '../export/hand-plan.ts';
import { designedHandPlan } from '../export/hand-designs.ts';
import { tempDir } from '../store/tmp.ts';

const ROOT = join(import.meta.dirname, '../..');
const BIN = join(ROOT, 'bin/railwright.mjs');

function rw(args: string[], cwd: string) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

let dir: string;
beforeAll(() => {
  dir = tempDir();
  const store = ProjectStore.fromDocument({ requirements: handRequirements() });
  store.setPlanResult(designedHandPlan(store.getRequirements()));
  store.save(join(dir, 'p.rwproj'));
  store.close();
});

describe('railwright export and library never overwrite silently', () => {
  it('export refuses an existing file, names it and --force, and writes none of the other targets', { timeout: 120_000 }, () => {
    writeFileSync(join(dir, 'bom.csv'), 'mine');
    const r = rw(['export', 'p.rwproj', '--tree', 'tree.svg', '--bom', 'bom.csv'], dir);
    expect(r.code).toBe(1);
    expect(r.err).toContain('bom.csv already exists');
    expect(r.err).toContain('--force');
    expect(readFileSync(join(dir, 'bom.csv'), 'utf8')).toBe('mine');
    expect(existsSync(join(dir, 'tree.svg'))).toBe(false);
    const f = rw(['export', 'p.rwproj', '--tree', 'tree.svg', '--bom', 'bom.csv', '--force'], dir);
    expect(f.code, f.err).toBe(0);
    expect(readFileSync(join(dir, 'bom.csv'), 'utf8')).not.toBe('mine');
    expect(readFileSync(join(dir, 'tree.svg'), 'utf8')).toMatch(/<svg/);
  });

  it('export refuses when a file inside a --netlists folder exists, before writing anything', { timeout: 120_000 }, () => {
    const first = rw(['export', 'p.rwproj', '--netlists', 'nets'], dir);
    expect(first.code, first.err).toBe(0);
    const names = readdirSync(join(dir, 'nets'));
    expect(names.length).toBeGreaterThan(0);
    const kept = join(dir, 'nets', names[0]!);
    writeFileSync(kept, '* my own edits\n');
    const r = rw(['export', 'p.rwproj', '--report', 'report.pdf', '--netlists', 'nets'], dir);
    expect(r.code).toBe(1);
    expect(r.err).toContain(`${join('nets', names[0]!)} already exists`);
    expect(r.err).toContain('--force');
    expect(readFileSync(kept, 'utf8')).toBe('* my own edits\n');
    expect(existsSync(join(dir, 'report.pdf'))).toBe(false);
  });

  it('export --library-csv and library --export refuse an existing CSV unless --force', { timeout: 120_000 }, () => {
    writeFileSync(join(dir, 'lib.csv'), 'mine');
    const e = rw(['export', 'p.rwproj', '--library-csv', 'lib.csv'], dir);
    expect(e.code).toBe(1);
    expect(e.err).toMatch(/--library-csv lib\.csv already exists.*--force/);
    const l = rw(['library', 'p.rwproj', '--export', 'lib.csv'], dir);
    expect(l.code).toBe(1);
    expect(l.err).toMatch(/--export lib\.csv already exists.*--force/);
    expect(readFileSync(join(dir, 'lib.csv'), 'utf8')).toBe('mine');
    const f = rw(['library', 'p.rwproj', '--export', 'lib.csv', '--force'], dir);
    expect(f.code, f.err).toBe(0);
    expect(readFileSync(join(dir, 'lib.csv'), 'utf8')).toMatch(/^id,class,name/);
    mkdirSync(join(dir, 'fresh'), { recursive: true });
    const n = rw(['library', 'p.rwproj', '--export', join('fresh', 'lib.csv')], dir);
    expect(n.code, n.err).toBe(0); // a new file needs no --force
  });
});
