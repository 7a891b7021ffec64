// The engine must stay free of IO and UI: it imports only other engine modules and
// pure libraries. This scan keeps it so (STYLE.md: "a pure engine that imports no IO").
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';

const ENGINE = join(import.meta.dirname, '../../src-main/engine');
const FORBIDDEN = [/^node:/, /^(fs|path|os|child_process|worker_threads|http|net)$/, /^electron/, /^better-sqlite3/, /^svelte/, /^exceljs/, /^pdfkit/];

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((n) => {
    const p = join(dir, n);
    return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') ? [p] : [];
  });
}

describe('engine purity', () => {
  const all = files(ENGINE);
  it('has engine sources to check', () => {
    expect(all.length).toBeGreaterThan(2);
  });
  for (const f of all) {
    it(`${f.slice(ENGINE.length + 1)} imports no IO or UI`, () => {
      const src = readFileSync(f, 'utf8');
      const specs = [...src.matchAll(/(?:import|export)[^'"]*?from\s*['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)/g)].map((m) => m[1] ?? m[2]!);
      const bad = specs.filter((s) => FORBIDDEN.some((re) => re.test(s)));
      expect(bad).toEqual([]);
    });
  }
});
