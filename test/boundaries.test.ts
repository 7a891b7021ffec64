// The folder boundaries as checks (ARCHITECTURE.md, "Boundaries"; DEVELOPERS.md):
// 1. the window (src-renderer) imports from src-main only the contract: api/contract.ts and
//    the pure module it owns, api/window-shared.ts;
// 2. the engine (src-main/engine) imports nothing outside its own folder: no other top-level
//    folder of src-main (api, store, export, host, cli, worker, cli.ts), no src-renderer, no
//    db/ or test/ file. Its package imports (no node:, electron, sqlite, svelte, exceljs,
//    pdfkit) are checked by test/engine/purity.test.ts with the same scanner;
// 3. the CLI (src-main/cli.ts and src-main/cli/) imports nothing of the engine and nothing of
//    the exports: it reaches them only through src-main/api, the handlers and shared modules
//    the window's requests use (api/cli-shared.ts re-exports the text rules and types it
//    prints with; api/export-files.ts writes the exports to files).
// Every import form counts: `import … from`, `export … from`, `import '…'`, `import('…')`.
import { describe, expect, it } from 'vitest';
import { join, relative, sep } from 'node:path';
import { hasComputedImport, importSpecifiers, readSource, resolveSpecifier, sourceFiles } from './helpers/import-scan.ts';

const ROOT = join(import.meta.dirname, '..');
const MAIN = join(ROOT, 'src-main');
const ENGINE = join(MAIN, 'engine');
const RENDERER = join(ROOT, 'src-renderer');
const CLI_DIR = join(MAIN, 'cli');
const CLI_ENTRY = join(MAIN, 'cli.ts');
const API = join(MAIN, 'api');
const EXPORT = join(MAIN, 'export');
/** The only src-main modules the window may import. */
const WINDOW_ALLOWED = ['api/contract.ts', 'api/window-shared.ts'].map((p) => join(MAIN, p));

const inside = (path: string, dir: string): boolean => path === dir || path.startsWith(dir + sep);
const rel = (p: string): string => relative(ROOT, p).split(sep).join('/');

/** For each file: the resolved targets of its relative imports that `bad` rejects. */
function violations(files: string[], bad: (target: string) => boolean): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const f of files) {
    const targets = importSpecifiers(readSource(f))
      .filter((s) => s.startsWith('.'))
      .map((s) => resolveSpecifier(f, s))
      .filter(bad)
      .map(rel);
    if (targets.length > 0) out[rel(f)] = targets;
  }
  return out;
}

describe('import scanner (the checks below rely on it)', () => {
  it('reads every import form, across line breaks', () => {
    const src = [
      "import type { A } from '../x/a.ts';",
      "import {\n  b,\n  type C,\n} from \"../x/b.ts\";",
      "export { d } from '../x/d.ts';",
      "export * from '../x/e.ts';",
      "import '../x/f.css';",
      "const g = await import('../x/g.ts');",
      "import h from 'svelte';",
      "const s = 'not an import from here';",
    ].join('\n');
    expect(importSpecifiers(src)).toEqual(['../x/a.ts', '../x/b.ts', '../x/d.ts', '../x/e.ts', '../x/f.css', '../x/g.ts', 'svelte']);
  });
  it('flags a dynamic import with a computed name', () => {
    expect(hasComputedImport('await import(name)')).toBe(true);
    expect(hasComputedImport("await import('./a.ts')")).toBe(false);
  });
});

describe('the window imports only the contract', () => {
  const files = sourceFiles(RENDERER);
  it('has window sources to check', () => {
    expect(files.some((f) => f.endsWith('.svelte'))).toBe(true);
    expect(files.some((f) => f.endsWith('.ts'))).toBe(true);
  });
  it('reaches src-main only through api/contract.ts and api/window-shared.ts', () => {
    expect(violations(files, (t) => inside(t, MAIN) && !WINDOW_ALLOWED.includes(t))).toEqual({});
  });
  it('does import the contract (the check above sees the window\'s imports)', () => {
    expect(Object.keys(violations(files, (t) => WINDOW_ALLOWED.includes(t))).length).toBeGreaterThan(3);
  });
  it('names every dynamically imported module literally', () => {
    expect(files.filter((f) => hasComputedImport(readSource(f))).map(rel)).toEqual([]);
  });
});

describe('the engine imports nothing outside itself', () => {
  const files = sourceFiles(ENGINE);
  it('has engine sources to check', () => {
    expect(files.length).toBeGreaterThan(10);
  });
  it('imports no other folder of src-main, no src-renderer, nothing else of the repository', () => {
    expect(violations(files, (t) => !inside(t, ENGINE))).toEqual({});
  });
  it('names every dynamically imported module literally', () => {
    expect(files.filter((f) => hasComputedImport(readSource(f))).map(rel)).toEqual([]);
  });
});

describe('the CLI reaches the engine and the exports only through src-main/api', () => {
  const files = [CLI_ENTRY, ...sourceFiles(CLI_DIR)];
  it('has CLI sources to check', () => {
    expect(files.length).toBeGreaterThan(5);
  });
  it('imports nothing from src-main/engine', () => {
    expect(violations(files, (t) => inside(t, ENGINE))).toEqual({});
  });
  it('imports nothing from src-main/export (the exports are written through api/export-files.ts)', () => {
    expect(violations(files, (t) => inside(t, EXPORT))).toEqual({});
  });
  it('does import src-main/api (the check above sees the CLI\'s imports)', () => {
    expect(Object.keys(violations(files, (t) => inside(t, API))).length).toBeGreaterThan(3);
  });
  it('names every dynamically imported module literally', () => {
    expect(files.filter((f) => hasComputedImport(readSource(f))).map(rel)).toEqual([]);
  });
});

// 4. What the window's bundle takes from src-main through api/window-shared.ts is plain data
//    and formatting: the modules it reaches at run time (type-only imports are erased by the
//    compiler, so they do not count) never include the stage engine, the planner or the
//    library's pick rules. A kind's names and the part classes live in data modules
//    (stages/kind-names.ts, part-classes.ts) for that reason.
describe('the window bundle reaches no engine code through api/window-shared.ts', () => {
  /** Relative run-time imports of a file: its source without type-only import/export statements. */
  const runtimeImports = (f: string): string[] =>
    importSpecifiers(readSource(f).replace(/\b(import|export)\s+type\s[^;]*?\bfrom\s*['"][^'"]+['"]/gs, ''))
      .filter((s) => s.startsWith('.'))
      .map((s) => resolveSpecifier(f, s));
  const reach = (start: string): string[] => {
    const seen = new Set<string>([start]);
    const todo = [start];
    while (todo.length) for (const t of runtimeImports(todo.pop()!)) if (!seen.has(t)) { seen.add(t); todo.push(t); }
    return [...seen].map(rel).sort();
  };
  const forbidden = (p: string): boolean =>
    /^src-main\/engine\/(stages\/(registry|index)\.ts|planner\/|library\.ts|rollup\.ts)/.test(p);
  it('follows run-time imports (the scan sees window-shared.ts reach the engine notation module)', () => {
    expect(reach(join(API, 'window-shared.ts'))).toContain('src-main/engine/notation.ts');
  });
  it('reaches none of the stage registry, the stage kinds\' entry point, the planner, the library checks or the roll-up', () => {
    expect(reach(join(API, 'window-shared.ts')).filter(forbidden)).toEqual([]);
  });
  it('would see a module that reaches the registry (the library checks do)', () => {
    expect(reach(join(ENGINE, 'library.ts')).filter(forbidden).length).toBeGreaterThan(0);
  });
});
