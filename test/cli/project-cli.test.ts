// The project CLI end to end, through a child process (`node bin/railwright.mjs ...`), as a
// user runs it. The demo file is checked with better-sqlite3 (an independent SQLite reader)
// and the exported JSON with the platform's JSON.parse.
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { APPLICATION_ID, ProjectStore } from '../../src-main/store/project-store.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { sha256, tempDir } from '../store/tmp.ts';

const ROOT = join(import.meta.dirname, '../..');
const BIN = join(ROOT, 'bin/railwright.mjs');

function rw(args: string[], cwd: string) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe('railwright project commands', () => {
  const dir = tempDir();

  it('demo writes a valid SQLite project that reopens identically', () => {
    const r = rw(['demo', 'demo.rwproj'], dir);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/wrote demo\.rwproj/);
    const db = new Database(join(dir, 'demo.rwproj'), { readonly: true });
    expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
    expect(db.pragma('application_id', { simple: true })).toBe(APPLICATION_ID);
    db.close();
    const s = ProjectStore.open(join(dir, 'demo.rwproj'));
    expect(s.getRequirements()).toEqual(demoDocument().requirements);
    expect(s.getRequirements().meta.description.startsWith('Invented demonstration scenario:')).toBe(true);
    expect(s.getLibrary().length).toBeGreaterThan(0); // the default part library comes along
    s.close();
  });

  it('refuses to overwrite without --force, and overwrites with it', () => {
    const before = sha256(join(dir, 'demo.rwproj'));
    const r = rw(['demo', 'demo.rwproj'], dir);
    expect(r.code).toBe(1);
    expect(r.err.trim()).toBe('railwright demo: demo.rwproj already exists (use --force to overwrite it)');
    expect(sha256(join(dir, 'demo.rwproj'))).toBe(before);
    expect(rw(['demo', 'demo.rwproj', '--force'], dir).code).toBe(0);
  });

  it('validate: exit 0 on the demo, 1 with every problem on a broken document', () => {
    const ok = rw(['validate', 'demo.rwproj'], dir);
    expect(ok.code).toBe(0);
    expect(ok.out).toMatch(/no problems \(16 loads, 12 rails\)/);
    const v = JSON.parse(rw(['export-json', 'demo.rwproj'], dir).out);
    v.modes[0].share = 0.5;
    v.loads[0].domainId = 'nowhere';
    writeFileSync(join(dir, 'broken.json'), JSON.stringify(v));
    const bad = rw(['validate', 'broken.json'], dir);
    expect(bad.code).toBe(1);
    expect(bad.out).toMatch(/2 problem\(s\)/);
    expect(bad.out).toMatch(/loads\[0\]\.domainId: domain "nowhere" does not exist/);
    expect(bad.out).toMatch(/modes: shares of time sum to 0\.7/);
  });

  it('export-json and import round-trip the project losslessly', () => {
    expect(rw(['export-json', 'demo.rwproj', 'demo.json'], dir).code).toBe(0);
    const text = readFileSync(join(dir, 'demo.json'), 'utf8');
    expect(JSON.parse(text).format).toBe('railwright-project');
    const imp = rw(['import', 'demo.json', 'copy.rwproj'], dir);
    expect(imp.code, imp.err).toBe(0);
    // Everything comes back except the modified time, which the save that wrote copy.rwproj set.
    const again = JSON.parse(rw(['export-json', 'copy.rwproj'], dir).out);
    const orig = JSON.parse(text);
    expect(Date.parse(again.meta.modified)).toBeGreaterThanOrEqual(Date.parse(orig.meta.modified));
    delete again.meta.modified;
    delete orig.meta.modified;
    expect(again).toEqual(orig);
    // refuses to overwrite the JSON too
    expect(rw(['export-json', 'demo.rwproj', 'demo.json'], dir).code).toBe(1);
  });

  it('import lists every problem with its path and writes nothing', () => {
    const v = JSON.parse(readFileSync(join(dir, 'demo.json'), 'utf8'));
    v.loads[3].current.transmit = '12x';
    v.sources[0].vMin = '9A';
    writeFileSync(join(dir, 'bad.json'), JSON.stringify(v));
    const r = rw(['import', 'bad.json', 'bad.rwproj'], dir);
    expect(r.code).toBe(1);
    expect(r.err).toContain('loads[3].current.transmit: "12x" is not a current (expected e.g. 250m, 1.2A, 250mA)');
    expect(r.err).toContain('sources[0].vMin: "9A" is not a voltage');
    expect(r.err.trim().split('\n').at(-1)).toBe('railwright import: bad.json was not imported');
    expect(existsSync(join(dir, 'bad.rwproj'))).toBe(false);
  });

  it('summary prints rails with their loads and per-mode currents in engineering notation', () => {
    const r = rw(['summary', 'demo.rwproj'], dir);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Rails \(12\)/);
    expect(r.out).toMatch(/Main 3V3 +3\.3 V ±5 %, ripple ≤ 30 mV, standard, peak 325 mA/);
    expect(r.out).toMatch(/Short-range radio +20 mA +250 mA +500 µA/);
    expect(r.out).toMatch(/Isolated front end 4V096 quiet +4\.096 V ±2 %/);
    expect(r.out).toMatch(/Caution: .*certifies nothing/);
  });

  it('new creates an editable project; bad files get one clear line and a non-zero exit', () => {
    expect(rw(['new', 'empty.rwproj', '--name', 'Bench supply'], dir).code).toBe(0);
    expect(rw(['summary', 'empty.rwproj'], dir).out).toMatch(/^Bench supply \(revision 0\)/);
    writeFileSync(join(dir, 'notes.rwproj'), 'just text');
    const before = sha256(join(dir, 'notes.rwproj'));
    const r = rw(['summary', 'notes.rwproj'], dir);
    expect(r.code).toBe(1);
    expect(r.err.trim().split('\n')).toHaveLength(1);
    expect(r.err).toMatch(/not an SQLite database/);
    expect(sha256(join(dir, 'notes.rwproj'))).toBe(before);
    expect(rw(['new', 'x.txt'], dir).err).toMatch(/must end in \.rwproj/);
    expect(rw(['new'], dir).code).toBe(2);
    expect(rw(['summary', 'missing.rwproj'], dir).err.trim()).toBe('railwright summary: missing.rwproj does not exist');
    expect(rw(['demo', 'a.rwproj', '--colour'], dir).code).toBe(2);
  });

  it('prints help for every project command', () => {
    for (const c of ['demo', 'new', 'validate', 'import', 'export-json', 'summary']) {
      const r = rw([c, '--help'], dir);
      expect(r.code).toBe(0);
      expect(r.out).toMatch(new RegExp(`^Usage: railwright ${c}`));
    }
  });
});
