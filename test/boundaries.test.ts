// Folder boundaries as checks (ARCHITECTURE.md, common practice): every relative import is
// resolved to its file and its top-level folder compared with the rule of the importer.
import { describe, expect, it } from 'vitest';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';

const ROOT = resolve(import.meta.dirname, '..');

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((n) => {
    const p = join(dir, n);
    return statSync(p).isDirectory() ? files(p) : /\.(ts|svelte)$/.test(p) ? [p] : [];
  });
}

/** Repository-relative paths of the relative imports of one file. */
function importsOf(file: string): string[] {
  const src = readFileSync(file, 'utf8');
  const specs = [...src.matchAll(/(?:import|export)[^'"]*?from\s*['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)/g)].map((m) => m[1] ?? m[2]!);
  return specs.filter((s) => s.startsWith('.')).map((s) => relative(ROOT, resolve(dirname(file), s)).split('\\').join('/'));
}

describe('boundaries', () => {
  it('the engine imports no other top-level folder', () => {
    const bad: string[] = [];
    for (const f of files(join(ROOT, 'src-main/engine'))) {
      for (const t of importsOf(f)) if (!t.startsWith('src-main/engine/')) bad.push(`${relative(ROOT, f)} -> ${t}`);
    }
    expect(bad).toEqual([]);
  });

  // The window reaches main only through the contract. The imports below are the ones not yet
  // routed through it (issue 14 part 1, open): each is pure code with no IO, listed so that no
  // new one can appear unnoticed.
  const WINDOW_ALLOWED = new Set(['src-main/api/contract.ts']);
  const WINDOW_PENDING = new Set([
    'src-main/api/tables.ts', // column rules shared with the handlers' editCell
    'src-main/engine/library.ts', // library row type and classes for the library editor
    'src-main/engine/model.ts', // requirements model types
    'src-main/engine/notation.ts', // quantity formatting
    'src-main/engine/units.ts', // branded unit types
  ]);
  it('the window imports only the contract (and the listed pending exceptions)', () => {
    const bad: string[] = [];
    for (const f of files(join(ROOT, 'src-renderer'))) {
      for (const t of importsOf(f)) {
        if (t.startsWith('src-renderer/') || WINDOW_ALLOWED.has(t) || WINDOW_PENDING.has(t)) continue;
        bad.push(`${relative(ROOT, f)} -> ${t}`);
      }
    }
    expect(bad).toEqual([]);
  });

  it('every pending window exception still exists (remove it from the list once routed)', () => {
    for (const t of WINDOW_PENDING) expect(existsSync(join(ROOT, t)), t).toBe(true);
  });

  it('the CLI and the handlers never import the window or the hosts', () => {
    const bad: string[] = [];
    const dirs = ['src-main/cli', 'src-main/api'];
    const all = [...dirs.flatMap((d) => files(join(ROOT, d))), join(ROOT, 'src-main/cli.ts')];
    for (const f of all) {
      for (const t of importsOf(f)) if (t.startsWith('src-renderer/') || t.startsWith('src-main/host/')) bad.push(`${relative(ROOT, f)} -> ${t}`);
    }
    expect(bad).toEqual([]);
  });
});
