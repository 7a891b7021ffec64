/**
 * Runs our netlists in ngspice batch mode and reads back the `.meas` results. Used by the
 * reference tests and test/reference/ngspice-table.ts; two simulations at a time.
 */
import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export interface SpiceResult {
  /** Every `.meas` value by lower-case name. */
  meas: Record<string, number>;
  stdout: string;
}

export function runNgspice(netlist: string, bin = 'ngspice', timeoutMs = 120_000): Promise<SpiceResult> {
  const dir = mkdtempSync(join(tmpdir(), 'railwright-spice-'));
  const file = join(dir, 'stage.cir');
  writeFileSync(file, netlist);
  return new Promise((resolve, reject) => {
    execFile(bin, ['-b', file], { timeout: timeoutMs, maxBuffer: 16 << 20 }, (err, stdout, stderr) => {
      rmSync(dir, { recursive: true, force: true });
      const meas: Record<string, number> = {};
      for (const m of stdout.matchAll(/^\s*([a-z_][a-z0-9_]*)\s*=\s*([-+0-9.eE]+)/gim)) {
        const v = Number(m[2]);
        if (Number.isFinite(v)) meas[m[1]!.toLowerCase()] = v;
      }
      if (err && Object.keys(meas).length === 0) {
        reject(new Error(`ngspice failed: ${err.message}\n${stderr.slice(0, 2000)}`));
        return;
      }
      resolve({ meas, stdout });
    });
  });
}

/** Run several netlists, `parallel` at a time, keeping the order. */
export async function runAll(netlists: string[], parallel = 2, bin = 'ngspice'): Promise<SpiceResult[]> {
  const out: SpiceResult[] = new Array(netlists.length);
  let next = 0;
  const worker = async () => {
    while (next < netlists.length) {
      const i = next++;
      out[i] = await runNgspice(netlists[i]!, bin);
    }
  };
  await Promise.all(Array.from({ length: Math.min(parallel, netlists.length) }, worker));
  return out;
}
