// CSV writer/reader and the part library table, checked with an independent parser (csv-parse).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import fc from 'fast-check';
import { neutraliseCell, readCsv, writeCsv, unneutraliseCell } from '../../src-main/export/csv.ts';
import { fromStoreRows, rowsToTable, tableToRows, validateLibrary, describeProblem, CLASS_PARAMS, PART_CLASSES, costNote, INVENTED } from '../../src-main/engine/library.ts';

const ROOT = join(import.meta.dirname, '../..');

describe('CSV (RFC 4180)', () => {
  it('round-trips awkward cells through csv-parse (independent RFC 4180 reader)', () => {
    const rows = [['a,b', 'say "hi"', 'two\r\nlines', 'plain', '', 'µF Ω ±']];
    const text = writeCsv(rows);
    expect(text.endsWith('\r\n')).toBe(true); // RFC 4180 §2.1: records end with CRLF
    const back = parse(text, { relax_column_count: false }) as string[][];
    expect(back).toEqual(rows);
    expect(readCsv(text)).toEqual(rows);
  });

  it('agrees with csv-parse on arbitrary text (property test)', () => {
    fc.assert(fc.property(fc.array(fc.array(fc.string({ maxLength: 12 }), { minLength: 1, maxLength: 5 }), { minLength: 1, maxLength: 6 }), (rows) => {
      const width = rows[0]!.length;
      const rect = rows.map((r) => Array.from({ length: width }, (_, i) => r[i] ?? 'x'));
      // Rows made only of one empty cell are blank lines, which both readers skip.
      const kept = rect.filter((r) => !(r.length === 1 && r[0] === ''));
      const text = writeCsv(kept, { neutralise: false });
      const theirs = parse(text, { relax_column_count: true, skip_empty_lines: true }) as string[][];
      expect(readCsv(text)).toEqual(theirs);
    }), { numRuns: 200 });
  });

  it('neutralises formula starts but keeps signed numbers with units readable', () => {
    // OWASP "CSV injection" guidance lists = + - @ TAB CR as dangerous first characters (from memory).
    expect(neutraliseCell('=1+2')).toBe("'=1+2");
    expect(neutraliseCell('@SUM(A1)')).toBe("'@SUM(A1)");
    expect(neutraliseCell('+cmd|x')).toBe("'+cmd|x");
    expect(neutraliseCell('-2+3+cmd')).toBe("'-2+3+cmd");
    expect(neutraliseCell('\tx')).toBe("'\tx");
    expect(neutraliseCell('\rx')).toBe("'\rx");
    expect(neutraliseCell('-12')).toBe('-12');
    expect(neutraliseCell('-12 V')).toBe('-12 V');
    expect(neutraliseCell('+5.0 %')).toBe('+5.0 %');
    expect(neutraliseCell('-1.5e-3 A')).toBe('-1.5e-3 A');
    expect(neutraliseCell('Main 3V3')).toBe('Main 3V3');
    expect(unneutraliseCell(neutraliseCell('=HYPERLINK(1)'))).toBe('=HYPERLINK(1)');
    expect(unneutraliseCell("'plain")).toBe("'plain"); // an apostrophe the writer would not add stays
    expect(readCsv(writeCsv([['=A1', '-3 V', "'x"]]), { unneutralise: true })).toEqual([['=A1', '-3 V', "'x"]]);
    const text = writeCsv([['=1+2', '-12 V']]);
    expect(parse(text)).toEqual([["'=1+2", '-12 V']]);
  });

  it('names the line of a malformed quote', () => {
    expect(() => readCsv('a,b\r\n"open,c\r\n')).toThrow(/line 2/);
    expect(() => readCsv('a,"b"x\r\n')).toThrow(/closing quote/);
  });
});

describe('part library', () => {
  const text = readFileSync(join(ROOT, 'db/default-library.csv'), 'utf8');

  it('loads the default library; every row valid, generic, and its cost labelled an invented estimate', () => {
    const table = parse(text) as string[][];
    const res = tableToRows(table);
    if (!res.ok) throw new Error(res.problems.map(describeProblem).join('\n'));
    expect(res.rows.length).toBeGreaterThan(40);
    for (const c of PART_CLASSES) expect(res.rows.some((r) => r.partClass === c), c).toBe(true);
    for (const r of res.rows) {
      expect(costNote(r)).toBe(INVENTED);
      expect(r.cost).toBeGreaterThan(0);
    }
    expect(validateLibrary(res.rows)).toEqual([]);
  });

  it('keeps every default row generic: descriptive names, no part-number-like codes', () => {
    const res = tableToRows(parse(text) as string[][]);
    if (!res.ok) throw new Error('invalid');
    for (const r of res.rows) {
      // A part number typically runs two or more capitals into two or more digits (common practice).
      expect(r.name, r.id).not.toMatch(/\b[A-Z]{2,}\d{2,}/);
      expect(r.name, r.id).toMatch(/^(Buck|Synchronous|N-channel|LDO|Low-noise|Negative|Schottky|Ultrafast|Ceramic|Aluminium|Polymer|Thick-film|Thin-film|Shielded|Custom|Load switch|Isolated module|Boost|Four-switch|Inverting)[ ,]/);
    }
  });

  it('round-trips table → rows → table → rows unchanged', () => {
    const a = tableToRows(readCsv(text));
    expect(a.ok).toBe(true);
    if (!a.ok) return;
    const again = tableToRows(parse(writeCsv(rowsToTable(a.rows))) as string[][]);
    expect(again.ok && again.rows).toEqual(a.rows);
    const store = fromStoreRows(a.rows.map((r) => ({ ...r, params: { ...r.params } })));
    expect(store.ok && store.rows).toEqual(a.rows);
  });

  it('refuses a bad table with every problem named by row and field, and returns no rows', () => {
    const bad = [
      ['id', 'class', 'name', 'cost_estimate', 'params'],
      ['x1', 'ldo', 'LDO', '0.1', 'package=SOT-23-5; iMax=-1; vinMax=16; dropout=0.2; iq=5e-5; psrrDb=40; thetaJA=200'],
      ['x2', 'flux-capacitor', 'odd', '1', ''],
      ['x1', 'resistor', 'R', 'cheap', 'package=0603; power=0.1; tolerance=0.01; colour=blue'],
    ];
    const res = tableToRows(bad);
    expect(res.ok).toBe(false);
    if (res.ok) return;
    const msgs = res.problems.map(describeProblem);
    expect(msgs).toContain('row 1, iMax: must be at least 0.001 A');
    expect(msgs.some((m) => m.startsWith('row 2, class: unknown part class "flux-capacitor"'))).toBe(true);
    expect(msgs).toContain('row 3, cost: must be a number from 0 to 1e6');
    expect(msgs).toContain('row 3, colour: is not a parameter of class resistor');
    expect(msgs).toContain('row 3, id: duplicates the id of row 1');
    expect(tableToRows([['id', 'name']]).ok).toBe(false);
  });

  it('documents every parameter of every class', () => {
    for (const c of PART_CLASSES) for (const p of CLASS_PARAMS[c]) expect(p.doc.length).toBeGreaterThan(5);
  });
});
