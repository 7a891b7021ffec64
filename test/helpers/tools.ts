/**
 * Locating external tools the tests need. Under CI=true a missing tool is a failure;
 * elsewhere the test skips with a message that says how to install it.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';

function which(cmd: string): string | null {
  try {
    const p = execFileSync('sh', ['-c', `command -v ${cmd}`], { encoding: 'utf8' }).trim();
    return p && existsSync(p) ? p : null;
  } catch {
    return null;
  }
}

export interface ToolCheck {
  path: string | null;
  /** Pass to describe.skipIf / it.skipIf. */
  skip: boolean;
}

function locate(cmd: string, debianPackage: string): ToolCheck {
  const path = which(cmd);
  if (path) return { path, skip: false };
  const msg = `${cmd} not found: install it with "apt-get install ${debianPackage}"`;
  if (process.env.CI === 'true') throw new Error(`${msg} (required under CI=true)`);
  console.warn(`skipping tests that need ${cmd}: ${msg}`);
  return { path: null, skip: true };
}

export const ngspice = (): ToolCheck => locate('ngspice', 'ngspice');
export const chromium = (): ToolCheck => locate('chromium', 'chromium');
