// `railwright summary | head -1`: a reader that closes the pipe early used to make the CLI
// die with an EPIPE stack trace (issue 10 item 7). The pipe's read end is closed here before
// the child writes anything, so every write fails with EPIPE, deterministically.
import { describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { tempDir } from '../store/tmp.ts';

const ROOT = join(import.meta.dirname, '../..');
const BIN = join(ROOT, 'bin/railwright.mjs');

function closedStdout(args: string[], cwd: string): Promise<{ code: number | null; err: string }> {
  return new Promise((ok, fail) => {
    const c = spawn(process.execPath, [BIN, ...args], { cwd, stdio: ['ignore', 'pipe', 'pipe'] });
    c.stdout.destroy();
    let err = '';
    c.stderr.on('data', (d) => (err += d));
    const t = setTimeout(() => { c.kill('SIGKILL'); fail(new Error('no exit within 60 s')); }, 60_000);
    c.on('exit', (code) => { clearTimeout(t); ok({ code, err }); });
  });
}

describe('output into a closed pipe', () => {
  const dir = tempDir();
  it('summary, help and export-json end quietly with exit 0', { timeout: 120_000 }, async () => {
    expect(spawnSync(process.execPath, [BIN, 'demo', 'demo.rwproj'], { cwd: dir, timeout: 60_000 }).status).toBe(0);
    for (const args of [['summary', 'demo.rwproj'], ['export-json', 'demo.rwproj'], ['--help']]) {
      const r = await closedStdout(args, dir);
      expect(r.err, args.join(' ')).not.toMatch(/EPIPE|Unhandled 'error' event|at /);
      expect(r.code, args.join(' ')).toBe(0);
    }
  });
});
