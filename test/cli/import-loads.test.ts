// `railwright import-loads` through a child process: bad cells by row and column with nothing
// written, --only-good-rows, --map; the project file read back with the store.
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { sha256, tempDir } from '../store/tmp.ts';

const BIN = join(import.meta.dirname, '../../bin/railwright.mjs');
const rw = (args: string[], cwd: string) => {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
};

describe('railwright import-loads', () => {
  const dir = tempDir();
  it('refuses a list with a bad cell, writing nothing; imports the good rows when asked', () => {
    expect(rw(['demo', 'p.rwproj'], dir).code).toBe(0);
    const loads = () => { const s = ProjectStore.open(join(dir, 'p.rwproj')); const l = s.getRequirements().loads; s.close(); return l; };
    const before = loads().length;
    // Invented load list; a control character in a name is shown escaped on the terminal.
    writeFileSync(join(dir, 'l.csv'), 'Name;Domain;Voltage (V);Current (mA)\r\nPump;Main;24;1200\r\nBad\u001b[2J;Main;x;1\r\n');
    const hash = sha256(join(dir, 'p.rwproj'));
    const a = rw(['import-loads', 'p.rwproj', 'l.csv'], dir);
    expect(a.code).toBe(1);
    expect(a.err).toMatch(/row 3, column A \("Name"\)/);
    expect(a.err).toMatch(/row 3, column C \("Voltage \(V\)"\): Voltage: "x" is not a voltage/);
    expect(a.err + a.out).not.toContain('\u001b');
    expect(sha256(join(dir, 'p.rwproj'))).toBe(hash);
    const b = rw(['import-loads', 'p.rwproj', 'l.csv', '--only-good-rows'], dir);
    expect(b.code, b.err).toBe(0);
    expect(b.out).toMatch(/imported 1 load\(s\), left out 1 row/);
    const pump = loads().find((l) => l.name === 'Pump')!;
    expect(loads().length).toBe(before + 1);
    expect(pump.voltage).toBe(24);
    expect(Object.values(pump.current).every((c) => c === 1.2)).toBe(true);
  });
  it('--map names columns and modes; --dry-run writes nothing', () => {
    writeFileSync(join(dir, 'm.csv'), 'x,y,z\nFan,12,250m\n');
    const hash = sha256(join(dir, 'p.rwproj'));
    const r = rw(['import-loads', 'p.rwproj', 'm.csv', '--map', 'A=name,B=voltage,C=current:Standby', '--dry-run'], dir);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/column C "z" → Current in Standby/);
    expect(r.out).toMatch(/dry run: nothing written/);
    expect(sha256(join(dir, 'p.rwproj'))).toBe(hash);
    const bad = rw(['import-loads', 'p.rwproj', 'm.csv', '--map', 'A=name,B=voltage,C=current:Nope'], dir);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/no operating mode "Nope"/);
  });
});
