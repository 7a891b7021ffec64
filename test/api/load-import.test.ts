// Load-list import: our RFC 4180 reader against the csv-parse package from npm, XLSX read
// back from workbooks written in the test with exceljs, units from headers and cells, every
// bad cell named by row and column, and the handlers' one undoable step.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parse } from 'csv-parse/sync';
import ExcelJS from 'exceljs';
import { cellText, detectDelimiter, guessMapping, headerUnit, previewImport, readCsv, applyImport, type Delimiter } from '../../src-main/api/load-import.ts';
import { createApi } from '../../src-main/api/index.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import type { LoadImportFile, LoadImportPreview, Snapshot } from '../../src-main/api/contract.ts';

/** csv-parse (npm), the independent reader. */
const reference = (text: string, delimiter: Delimiter) => parse(text, { bom: true, delimiter, relax_column_count: true, relax_quotes: true }) as string[][];

const demoReq = (): Requirements => demoDocument().requirements;

describe('CSV reader against csv-parse', () => {
  const cases: [string, string, Delimiter][] = [
    ['plain, comma', 'Name,Voltage,Current\r\nMCU,3V3,120m\r\nRadio,1.8,"45 mA"\r\n', ','],
    ['quotes doubled and delimiters inside quotes', 'a,b\r\n"say ""hi""","x,y"\r\n"",z\r\n', ','],
    ['line breaks inside quotes (LF inside CRLF file)', 'name,note\r\n"two\nlines","and\r\nthree\r\nlines"\r\n', ','],
    ['byte-order mark', '\uFEFFName;Voltage\r\nADC;5\r\n', ';'],
    ['semicolon with decimal commas', 'Name;Voltage;Current (mA)\nPump;24;1200\nSensor;3,3;"12,5"\n', ';'],
    ['tab separated', 'Name\tV\tI\nA\t5\t1\nB\t12\t"2\t3"\n', '\t'],
    ['empty fields and no final newline', 'a,,c\n,,\nx,y,z', ','],
    ['empty line in the middle', 'a,b\n\nc,d\n', ','],
    ['unicode text', 'Name,V\n"Capteur µ","±5"\nΩ-meter,3V3\n', ','],
  ];
  for (const [what, text, d] of cases) {
    it(what, () => {
      expect(detectDelimiter(text.replace(/^\uFEFF/, ''))).toBe(d);
      expect(readCsv(text)).toEqual(reference(text, d));
    });
  }

  it('random tables written by the RFC 4180 rules read back equal to csv-parse (property)', () => {
    const cell = fc.oneof(fc.string({ maxLength: 8 }), fc.constantFrom('"', '""', ',', ';', '\t', '\r\n', '\n', 'a"b', ' 3V3 ', ''));
    fc.assert(fc.property(fc.array(fc.array(cell, { minLength: 2, maxLength: 5 }), { minLength: 1, maxLength: 6 }), fc.constantFrom<Delimiter>(',', ';', '\t'), (table, d) => {
      const quote = (c: string) => (/[",;\t\r\n]/.test(c) || c === '' ? `"${c.replace(/"/g, '""')}"` : c);
      const text = table.map((r) => r.map(quote).join(d)).join('\r\n') + '\r\n';
      const ours = readCsv(text, d);
      expect(ours).toEqual(reference(text, d));
      expect(ours).toEqual(table);
    }), { numRuns: 300, seed: 15 });
  });

  it('an unterminated quote is refused with its line, not read as half a file', () => {
    expect(() => readCsv('a,b\n1,"open\n2,3\n')).toThrow(/line 2: a quoted cell is never closed/);
    // csv-parse refuses it too (npm library).
    expect(() => parse('a,b\n1,"open\n2,3\n', { relax_column_count: true })).toThrow();
  });
});

describe('units from headers and cells (engineering notation)', () => {
  it('reads the unit a header names', () => {
    expect(headerUnit('Current (mA)')).toBe('mA');
    expect(headerUnit('Ripple [mV]')).toBe('mV');
    expect(headerUnit('Voltage / V')).toBe('V');
    expect(headerUnit('I run (uA)')).toBe('µA');
    expect(headerUnit('Tolerance (%)')).toBe('%');
    expect(headerUnit('Name')).toBeNull();
    expect(headerUnit('Notes (see sheet 2)')).toBeNull();
  });
  it('a bare number takes the header unit; a cell with its own unit or multiplier keeps it', () => {
    expect(cellText('250', 'mA')).toBe('250 mA');
    expect(cellText('±5', '%')).toBe('±5 %');
    expect(cellText('0.25A', 'mA')).toBe('0.25A');
    expect(cellText('1.2 k', null)).toBe('1.2 k');
    expect(cellText('3,3', 'V', true)).toBe('3.3 V');
    expect(cellText('3,3', 'V', false)).toBe('3,3');
  });
  it('maps common headers and parses "250 mA", "3.3V", "1.2 k", header mA and %', () => {
    const req = demoReq();
    const [m1, m2] = req.modes;
    const rows = readCsv([
      `Load name,Supply (V),Tol (%),${m1!.name} current (mA),${m2!.name} current,Ripple [mV],Domain`,
      `Codec,3.3V,5,250,0.1 A,30,${req.domains[0]!.name}`,
      `Heater,12,2,"1,2 k",250 mA,100,`,
    ].join('\n'));
    const map = guessMapping(rows, req);
    expect(map.columns).toEqual(['name', 'voltage', 'tolerance', `current:${m1!.id}`, `current:${m2!.id}`, 'rippleLimit', 'domainId']);
    const p = previewImport(req, rows, map);
    // "1,2 k" in a comma file is text with a comma: a bad cell, row 3 column D.
    expect(p.bad).toEqual([expect.objectContaining({ row: 3, column: 'D', field: `current:${m1!.id}` })]);
    const codec = p.rows[0]!.cells;
    expect(codec.voltage).toBe('3.3 V');
    expect(codec[`current:${m1!.id}`]).toBe('250 mA');
    expect(codec[`current:${m2!.id}`]).toBe('100 mA');
    expect(codec.tolerance).toMatch(/5\s*%/);
    expect(codec.rippleLimit).toBe('30 mV');
    const fixed = readCsv(`Load name,Supply (V),Tol (%),${m1!.name} current (mA),${m2!.name} current\nHeater,12,2,1.2 k,250 mA\n`);
    // "1.2 k" under a header in mA writes its own multiplier: 1.2 kA, refused as above 1000 A.
    expect(() => applyImport(req, fixed, guessMapping(fixed, req))).toThrow(/row 2, column D.*1000 A/);
  });
});

describe('bad cells by row and column; nothing changes', () => {
  const req = demoReq();
  const dom = req.domains[0]!.name;
  const text = [
    'Name,Domain,Voltage,Current (mA)',
    `Good one,${dom},5,100`,
    `Bad volt,${dom},5 A,100`,
    `Bad current,Nowhere,3V3,lots`,
    `Evil\u202Ename,${dom},3.3,10`,
    '',
    `Second good,${dom},1V8,20`,
  ].join('\r\n');
  const rows = readCsv(text);
  const map = guessMapping(rows, req);

  it('names every bad cell with the file row and column letter', () => {
    const p: LoadImportPreview = previewImport(req, rows, map);
    const where = p.bad.map((b) => `${b.row}${b.column}`);
    expect(where).toEqual(['3C', '4B', '4D', '5A']);
    expect(p.bad[0]!.message).toMatch(/5 A.*not a voltage.*current/);
    expect(p.bad[1]!.message).toMatch(/Nowhere.*not a domain/);
    expect(p.bad[3]!.message).toMatch(/bidi|direction|control|character/i);
    expect(p.good).toBe(2);
    expect(p.total).toBe(5);
  });

  it('refuses the whole import while any cell is bad, unless only the good rows are asked for', () => {
    expect(() => applyImport(req, rows, map)).toThrow(/4 bad cells\nrow 3, column C \("Voltage"\)/);
    const r = applyImport(req, rows, map, { onlyGoodRows: true });
    expect(r.imported).toBe(2);
    expect(r.skipped).toBe(3);
    expect(r.requirements.loads.length).toBe(req.loads.length + 2);
    expect(r.requirements.loads.slice(-2).map((l) => [l.name, l.voltage])).toEqual([['Good one', 5], ['Second good', 1.8]]);
    expect(req.loads.some((l) => l.name === 'Good one')).toBe(false);
  });

  it('a required field without a column is a problem of the mapping, not of every cell', () => {
    const p = previewImport(req, rows, { ...map, columns: map.columns.map((c) => (c === 'voltage' ? null : c)) });
    expect(p.problems.join(' ')).toMatch(/Voltage/);
    expect(p.rows).toEqual([]);
  });

  it('an existing load name is a bad cell (names stay unique)', () => {
    const clash = readCsv(`Name,Voltage,Current\n${req.loads[0]!.name},3.3,0.1\n`);
    const p = previewImport(req, clash, guessMapping(clash, req));
    expect(p.bad.map((b) => `${b.row}${b.column}`)).toEqual(['2A']);
    expect(p.bad[0]!.message).toMatch(/already called/);
  });
});

describe('XLSX read back from a workbook written with exceljs', () => {
  async function workbook(): Promise<string> {
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet('Notes').addRow(['this sheet is not the load list']);
    const ws = wb.addWorksheet('Loads');
    ws.addRow(['Invented load list (test data)']);
    ws.addRow(['Name', 'Voltage (V)', 'Current (mA)', 'Tolerance']);
    ws.addRow(['FPGA core', 1, 850, 0.03]);
    ws.addRow([{ richText: [{ text: 'Rich ' }, { text: 'text' }] }, { formula: '2*1.65', result: 3.3 }, 120, 0.05]);
    ws.getCell('D3').numFmt = '0%';
    ws.getCell('D4').numFmt = '0.0%';
    ws.addRow(['Sensor', '5V', '12 mA', '±2%']);
    return Buffer.from(await wb.xlsx.writeBuffer()).toString('base64');
  }

  it('reads the chosen sheet, formulas by their result, percentages as percent, and previews it', async () => {
    const api = createApi({ host: 'test', userDataDir: null }, (s) => { s.requirements = demoReq(); s.library = []; });
    const base64 = await workbook();
    const first = await api.request('loads.importRead', { fileName: 'list.xlsx', base64 });
    expect(first.ok && (first.value as LoadImportFile).sheets).toEqual(['Notes', 'Loads']);
    const r = await api.request('loads.importRead', { fileName: 'list.xlsx', base64, sheet: 'Loads' });
    expect(r.ok).toBe(true);
    const f = (r as { value: LoadImportFile }).value;
    expect(f.format).toBe('xlsx');
    expect(f.rows[2]).toEqual(['FPGA core', '1', '850', '3%']);
    expect(f.rows[3]).toEqual(['Rich text', '3.3', '120', '5%']);
    expect(f.preview.headerRow).toBe(1);
    expect(f.preview.bad).toEqual([]);
    expect(f.preview.rows.map((x) => x.cells.voltage)).toEqual(['1 V', '3.3 V', '5 V']);
    const all = demoReq().modes.map((m) => `current:${m.id}`);
    expect(all.map((k) => f.preview.rows[0]!.cells[k])).toEqual(all.map(() => '850 mA'));
  });

  it('refuses a file named .xlsx that is not a workbook, and an old binary .xls', async () => {
    const api = createApi({ host: 'test', userDataDir: null }, (s) => { s.requirements = demoReq(); s.library = []; });
    const a = await api.request('loads.importRead', { fileName: 'x.xlsx', base64: Buffer.from('Name,V\n').toString('base64') });
    expect(!a.ok && a.error.message).toMatch(/not an XLSX workbook/);
    const b = await api.request('loads.importRead', { fileName: 'x.xls', base64: Buffer.from([0xd0, 0xcf, 0x11, 0xe0]).toString('base64') });
    expect(!b.ok && b.error.message).toMatch(/old binary workbook/);
  });
});

describe('import handlers', () => {
  it('applies as one undoable step; a refused import changes nothing', async () => {
    const api = createApi({ host: 'test', userDataDir: null }, (s) => { s.requirements = demoReq(); s.library = []; });
    const before = structuredClone(api.session.requirements);
    const csv = 'Name;Voltage;Current (mA)\nPump;24;1200\nSensor;3,3;12,5\nBroken;x;1\n';
    const read = await api.request('loads.importRead', { fileName: 'l.csv', base64: Buffer.from(csv).toString('base64') });
    const f = (read as { value: LoadImportFile }).value;
    expect(f.delimiter).toBe(';');
    expect(f.decimalComma).toBe(true);
    expect(f.preview.bad.map((b) => `${b.row}${b.column}`)).toEqual(['4B']);
    const refused = await api.request('loads.importApply', { rows: f.rows, mapping: f.preview.mapping, decimalComma: true });
    expect(!refused.ok && refused.error.message).toMatch(/nothing changed: 1 bad cell\nrow 4, column B/);
    expect(api.session.requirements).toEqual(before);
    const ok = await api.request('loads.importApply', { rows: f.rows, mapping: f.preview.mapping, decimalComma: true, onlyGoodRows: true });
    expect(ok.ok).toBe(true);
    const snap = (ok as { value: Snapshot & { imported: number } }).value;
    expect(snap.imported).toBe(2);
    expect(snap.state.undoLabel).toBe('Import 2 loads');
    const sensor = snap.requirements.loads.find((l) => l.name === 'Sensor')!;
    expect(sensor.voltage).toBe(3.3);
    expect(Object.values(sensor.current)).toEqual(snap.requirements.modes.map(() => 0.0125));
    await api.request('requirements.undo', {});
    expect(api.session.requirements.loads).toEqual(before.loads);
  });

  it('opens a project from bytes unsaved; refuses bytes that are not a project', async () => {
    const api = createApi({ host: 'test', userDataDir: null }, (s) => { s.requirements = demoReq(); s.library = []; });
    const bad = await api.request('project.openBytes', { fileName: 'p.rwproj', base64: Buffer.from('hello').toString('base64'), discard: true });
    expect(!bad.ok && bad.error.message).toMatch(/p\.rwproj/);
    const { ProjectStore } = await import('../../src-main/store/project-store.ts');
    const store = ProjectStore.fromDocument(demoDocument());
    const bytes = store.serialize();
    const ok = await api.request('project.openBytes', { fileName: 'demo.rwproj', base64: Buffer.from(bytes).toString('base64'), discard: true });
    expect(ok.ok).toBe(true);
    const s = (ok as { value: Snapshot }).value;
    expect(s.state.path).toBeNull();
    expect(s.requirements.loads.length).toBe(demoReq().loads.length);
  });
});
