// The engine must stay free of IO and UI: it imports only other engine modules and
// pure libraries. This scan keeps it so (STYLE.md: "a pure engine that imports no IO").
// Its relative imports staying inside src-main/engine is checked in test/boundaries.test.ts,
// with the same scanner (test/helpers/import-scan.ts).
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { importSpecifiers, readSource, sourceFiles } from '../helpers/import-scan.ts';

const ENGINE = join(import.meta.dirname, '../../src-main/engine');
const FORBIDDEN = [/^node:/, /^(fs|path|os|child_process|worker_threads|http|net)$/, /^electron/, /^better-sqlite3/, /^svelte/, /^exceljs/, /^pdfkit/];

describe('engine purity', () => {
  const all = sourceFiles(ENGINE);
  it('has engine sources to check', () => {
    expect(all.length).toBeGreaterThan(2);
  });
  for (const f of all) {
    it(`${f.slice(ENGINE.length + 1)} imports no IO or UI`, () => {
      const bad = importSpecifiers(readSource(f)).filter((s) => FORBIDDEN.some((re) => re.test(s)));
      expect(bad).toEqual([]);
    });
  }
});
