// A save killed at a random moment never corrupts or loses the last saved state
// (DESIGN.md §7 reliability bar). A child process saves two large projects alternately over
// one file; the test kills it with SIGKILL mid-loop and opens the file: it must open and
// hold exactly one of the two projects. Atomic rename semantics: POSIX rename(2), from memory.
import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { generateProject } from '../../src-main/store/generate.ts';
import { tempDir } from './tmp.ts';

const ROOT = join(import.meta.dirname, '../..');

function runAndKill(path: string, afterSaves: number, extraMs: number): Promise<number> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', join(ROOT, 'test/store/save-worker.ts'), path, '800'], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
    let saves = 0;
    let err = '';
    let killed = false;
    child.stdout.on('data', (d: Buffer) => {
      saves += (d.toString().match(/saved/g) ?? []).length;
      if (saves >= afterSaves && !killed) {
        killed = true;
        setTimeout(() => child.kill('SIGKILL'), extraMs);
      }
    });
    child.stderr.on('data', (d: Buffer) => { err += d.toString(); });
    child.on('exit', (_code, signal) => (signal === 'SIGKILL' ? resolve(saves) : reject(new Error(`worker ended without being killed: ${err}`))));
  });
}

describe('killed save', () => {
  it('leaves a file that opens and holds one complete saved project, every time', { timeout: 120_000 }, async () => {
    const dir = tempDir();
    const path = join(dir, 'k.rwproj');
    const a = generateProject({ loads: 800, seed: 1 }).requirements;
    const b = generateProject({ loads: 800, seed: 2 }).requirements;
    const s = ProjectStore.create();
    s.save(path);
    s.close();
    let midSave = 0;
    for (const extraMs of [0, 2, 4, 6, 8, 10]) {
      const saves = await runAndKill(path, 2, extraMs);
      expect(saves).toBeGreaterThanOrEqual(2);
      // A temp file beside the target means the kill landed inside a save.
      if (readdirSync(dir).some((f) => f.endsWith('.saving'))) midSave++;
      const t = ProjectStore.open(path);
      const req = t.getRequirements();
      t.close();
      const want = req.meta.name === 'A' ? a : b;
      expect(['A', 'B']).toContain(req.meta.name);
      expect(req.loads).toEqual(want.loads);
    }
    // Where the kills land depends on the machine's load; test/hardening/kill.test.ts kills
    // 200 times and asserts that at least half land inside a save. Here six kills are a quick
    // smoke check of the same guarantee, so the count is only reported.
    console.info(`killed-save smoke: ${midSave} of 6 kills landed inside a save`);
  });
});
