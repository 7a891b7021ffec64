/**
 * Child processes for the hardening tests start many times (a kill test starts one per
 * kill), so they run as one plain ES module bundled once per test file instead of through
 * the TypeScript loader on every start (about ten times faster to start). The bundler is
 * the one the TypeScript loader already ships with. The native SQLite binding stays
 * outside the bundle and is imported from the project's own dependencies by absolute path.
 */
import { buildSync } from 'esbuild';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll } from 'vitest';

export const ROOT = join(import.meta.dirname, '../..');
const made: string[] = [];

afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

/** A temporary folder removed after the test file. */
export function scratchDir(prefix = 'rw-hard-'): string {
  const d = mkdtempSync(join(tmpdir(), prefix));
  made.push(d);
  return d;
}

/** Bundle `entry` (a .ts file under test/hardening) into one .mjs; returns its path. */
export function bundleChild(entry: string): string {
  const out = join(scratchDir('rw-hard-bundle-'), entry.replace(/\.ts$/, '.mjs'));
  buildSync({
    entryPoints: [join(import.meta.dirname, entry)],
    outfile: out,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    logLevel: 'error',
    minify: true,
    keepNames: true,
    // The binding loads a native file relative to its own package: keep it outside.
    external: ['better-sqlite3'],
    // Some bundled CommonJS code calls require(); give the module one, resolving from the project.
    banner: { js: `import { createRequire as __rwRequire } from 'node:module'; const require = __rwRequire(${JSON.stringify(join(ROOT, 'package.json'))});` },
  });
  const sqlite = pathToFileURL(createRequire(join(ROOT, 'package.json')).resolve('better-sqlite3')).href;
  const text = readFileSync(out, 'utf8');
  if (!text.includes('"better-sqlite3"')) throw new Error(`bundle of ${entry} does not import the SQLite binding`);
  writeFileSync(out, text.replaceAll('"better-sqlite3"', JSON.stringify(sqlite)));
  return out;
}
