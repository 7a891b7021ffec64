// Issue 10 item 1: hostile text in names. A project file is mailed around, so every name in
// it is untrusted. These tests build projects whose names carry netlist commands, terminal
// escapes, bidi overrides, Markdown and XML, the way an attacker's file would (written
// straight into the store, which accepts a design in progress), and check that
//  - nothing an export writes can run a command in ngspice (the exported netlists are
//    simulated in `ngspice -b` in an empty folder and no marker file may appear);
//  - every writer's output is well formed (SVG and the XLSX parts read back with
//    fast-xml-parser, the XLSX with exceljs, the BOM CSV with csv-parse, Markdown scanned
//    for raw HTML and line breaks);
//  - the terminal never sees a raw control or bidi character (the CLI run as a child);
//  - validation, JSON import, the window's edit requests and the library CSV import refuse
//    each hostile name with the field's path and change nothing.
// Facts used: ngspice treats a line starting with "." as a dot-command, ".control … .endc"
// as a script block whose `shell` command runs a program, a line starting with "+" as a
// continuation of the previous line and a comment line starting "*#" as a command (the last
// one checked on ngspice 39 while writing this test); XML 1.0 forbids C0 controls other than
// tab, CR, LF (W3C XML 1.0, section 2.2 "Characters"). Both from memory.
import { describe, expect, it } from 'vitest';
import { execFile, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import ExcelJS from 'exceljs';
import { parse as parseCsv } from 'csv-parse/sync';
import JSZip from 'jszip';
import type { Requirements } from '../../src-main/engine/model.ts';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES } from '../../src-main/engine/model.ts';
import type { Amps, Ratio, Volts } from '../../src-main/engine/units.ts';
import { validateRequirements } from '../../src-main/engine/validate.ts';
import { plan as planProject } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { fromStoreRows, libraryCostModel, tableToRows } from '../../src-main/engine/library.ts';
import type { ElkLike } from '../../src-main/engine/layout.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { exportProjectJson, exportProjectValue, importProjectJson } from '../../src-main/store/json-format.ts';
import { defaultLibrary } from '../../src-main/api/default-library.ts';
import { exportBomCsv, exportBomXlsx, exportReportPdf, exportTreePdf, exportMagneticSpecs, exportNetlists, exportTreeSvg, prepareExport } from '../../src-main/export/bundle.ts';
import { createApi } from '../../src-main/api/index.ts';
import { makePathPolicy } from '../../src-main/host/paths.ts';
import { ngspice } from '../helpers/tools.ts';
import { ROOT, scratchDir } from './bundle.ts';

const spice = ngspice();

/**
 * A script block that would touch `marker`, its lines joined by `br`; whatever the writer
 * appends after the name lands in a comment line (an attacker would do the same).
 */
function payload(marker: string, br: string): string {
  return `Main${br}.control${br}shell touch ${marker}${br}.endc${br}* `;
}

const v = (x: number) => x as Volts;
const a = (x: number) => x as Amps;

/** An invented, clean project (tests only): 24 V in, a main and an isolated domain. */
function baseRequirements(): Requirements {
  return {
    meta: { name: 'Invented clean project', description: 'line one\nline two\twith a tab', revision: 1 },
    sources: [{ id: 'src', name: 'Input', vNom: v(24), vMin: v(18), vMax: v(30), currentLimit: a(3) }],
    domains: [
      { id: 'main', name: 'Main', isolation: 'none', workingVoltage: v(0) },
      { id: 'iso', name: 'Isolated «front end» — ±12 V, µA, 日本', isolation: 'basic', workingVoltage: v(60) },
    ],
    modes: [{ id: 'run', name: 'Run', share: 1 as Ratio }],
    loads: [
      { id: 'core', name: 'Load 0', domainId: 'main', voltage: v(3.3), tolerance: 0.05 as Ratio, current: { run: a(1.5) }, rippleLimit: v(0.05), noiseClass: 'rugged' },
      { id: 'io', name: 'Load 1', domainId: 'main', voltage: v(5), tolerance: 0.05 as Ratio, current: { run: a(1) }, rippleLimit: v(0.1), noiseClass: 'rugged' },
      { id: 'afe', name: 'Load 2', domainId: 'iso', voltage: v(12), tolerance: 0.1 as Ratio, current: { run: a(0.05) }, rippleLimit: v(0.1), noiseClass: 'standard' },
      { id: 'afen', name: 'Load 3', domainId: 'iso', voltage: v(-12), tolerance: 0.1 as Ratio, current: { run: a(0.03) }, rippleLimit: v(0.1), noiseClass: 'standard' },
    ],
    limits: { ...DEFAULT_LIMITS },
    preferences: { ...DEFAULT_PREFERENCES, budgetMs: 3000 },
  };
}

/** Give domain `main` a new id everywhere it is used. */
function renameMainDomain(r: Requirements, id: string): void {
  r.domains[0]!.id = id;
  for (const l of r.loads) if (l.domainId === 'main') l.domainId = id;
}

/**
 * One hostile field per project, so that one broken line cannot mask another: each would
 * touch marker `m` in ngspice's working folder if its text reached a netlist line start.
 * LF, CR, CRLF, U+2028, U+0085, a '+' continuation, a leading '.', a '*#' command.
 */
const NETLIST_VARIANTS: Array<[string, (r: Requirements) => void]> = [
  ['project name, LF', (r) => { r.meta.name = payload('m', '\n'); }],
  ['project name, CR', (r) => { r.meta.name = payload('m', '\r'); }],
  ['project name, CRLF', (r) => { r.meta.name = payload('m', '\r\n'); }],
  ['project name, *# command', (r) => { r.meta.name = 'x\n*#shell touch m #'; }],
  ['project name, indented *# command', (r) => { r.meta.name = 'x\n  *#shell touch m #'; }],
  ['project name, + continuation', (r) => { r.meta.name = 'x\n+ y\n.control\nshell touch m\n.endc\n* '; }],
  ['domain name, LF', (r) => { r.domains[0]!.name = payload('m', '\n'); }],
  ['domain id, LF', (r) => { renameMainDomain(r, `main${payload('m', '\n')}`); }],
  ['mode name, LF', (r) => { r.modes[0]!.name = payload('m', '\n'); }],
  ['mode name, U+2028', (r) => { r.modes[0]!.name = payload('m', '\u2028'); }],
  ['mode name, U+0085', (r) => { r.modes[0]!.name = payload('m', '\u0085'); }],
  ['source name, LF', (r) => { r.sources[0]!.name = payload('m', '\n'); }],
  ['load name, LF', (r) => { r.loads[0]!.name = payload('m', '\n'); }],
  ['rail key, LF', (r) => { r.loads[0]!.railKey = payload('m', '\n'); }],
  ['rail key, leading dot', (r) => { r.loads[0]!.railKey = '.include x\n.control\nshell touch m\n.endc\n* '; }],
];

/**
 * An invented project (tests only) whose every name is hostile at once: line breaks of
 * every kind, terminal escapes, bidi overrides, XML-forbidden characters, Markdown and HTML.
 */
function hostileRequirements(): Requirements {
  const r = baseRequirements();
  r.meta = { name: payload('m', '\n') + '\u001b]0;owned\u0007\u001b[2J', description: 'desc\u001b[31m\u202e', revision: 1 };
  r.sources[0]!.name = payload('m', '\r\n') + '<script>alert(1)</script>';
  r.domains[0]!.name = payload('m', '\r') + '\u202egnp.exe';
  renameMainDomain(r, `main${payload('m', '\n')}`);
  r.domains[1]!.name = 'Iso\u2028.control\u2028shell touch m\u2028.endc & <b>|x|</b> **bold** [l](http://x) # `code`';
  r.modes[0]!.name = payload('m', '\u0085') + '\u009b2J';
  r.loads[0]!.name = payload('m', '\n') + '\u0000\u0008\u000b\u000c\ufffe';
  r.loads[0]!.railKey = `${payload('m', '\n')}\n+ .control\n*#shell touch m\n  *#shell touch m\n.include /etc/passwd`;
  r.loads[2]!.railKey = '.control\nshell touch m\n.endc';
  return r;
}

/** Characters no output may carry raw: C0 except tab/LF/CR, DEL, C1, line separators, bidi. */
const RAW_BAD = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f\u2028\u2029\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069\ufffe\uffff]/;

async function elk(): Promise<ElkLike> {
  const mod = await import('elkjs/lib/elk.bundled.js');
  return new mod.default() as unknown as ElkLike;
}

/**
 * A project saved as an attacker would ship it (written through the store, which accepts a
 * design in progress), reopened, planned without validation (as a file carrying a saved
 * plan would be exported) and prepared for export; and the same with a crafted saved plan
 * whose stage and rail names are hostile too.
 */
async function exportBundles(dir: string, req0: Requirements) {
  const path = join(dir, 'hostile.rwproj');
  const s = ProjectStore.create();
  s.setRequirements(req0);
  s.setLibrary(defaultLibrary());
  s.save(path);
  s.close();
  const store = ProjectStore.open(path);
  const req = store.getRequirements();
  const lib = fromStoreRows(store.getLibrary());
  store.close();
  if (!lib.ok) throw new Error('library');
  const result = planProject(req, { evaluator: engineEvaluator(), costModel: libraryCostModel(lib.rows) });
  expect(result.best, JSON.stringify(result.infeasible)).toBeTruthy();
  const crafted = structuredClone(result);
  for (const st of crafted.best!.stages) st.name = `${st.name}\n.control\nshell touch m\n.endc`;
  crafted.rails.forEach((r) => { r.name = `${r.name}\r\n*#shell touch m`; });
  const bundle = await prepareExport({ req, result, library: lib.rows, elk: await elk() });
  const craftedBundle = await prepareExport({ req, result: crafted, library: lib.rows, elk: await elk() });
  return { path, req, bundle, craftedBundle };
}

const hostileBundle = (dir: string) => exportBundles(dir, hostileRequirements());

function runSpice(file: string, cwd: string): Promise<{ code: number | null; stdout: string }> {
  return new Promise((resolve) => {
    execFile(spice.path!, ['-b', file], { cwd, timeout: 60_000, maxBuffer: 16 << 20 }, (err, stdout) => {
      resolve({ code: err ? ((err as { code?: number }).code ?? null) : 0, stdout });
    });
  });
}

/**
 * Simulate the netlists of a bundle, each in its own empty folder; nothing may appear there.
 * With `firstOnly`, only the first netlist that carries the hostile text (ngspice runs take
 * seconds each on a loaded machine); every netlist is still checked line by line.
 */
async function simulateAll(dir: string, tag: string, b: Awaited<ReturnType<typeof exportBundles>>['bundle'], firstOnly = false): Promise<number> {
  const n = exportNetlists(b);
  expect(n.files.length, `${tag}: ${n.skipped.join('; ')}`).toBeGreaterThan(0);
  const carrying = n.files.filter((f) => f.text.includes('touch m'));
  const chosen = firstOnly ? [carrying[0] ?? n.files[0]!] : n.files;
  for (const f of chosen) {
    const cwd = join(dir, `${tag.replace(/[^A-Za-z0-9]+/g, '-')}-${f.stageId.replace(/[^A-Za-z0-9]+/g, '_')}`);
    mkdirSync(cwd);
    writeFileSync(join(cwd, f.file), f.text);
    // First the side effect: the simulation in an empty folder leaves nothing behind.
    const r = await runSpice(f.file, cwd);
    expect(readdirSync(cwd).filter((x) => x !== f.file), `${tag}, ${f.file}: files made by the simulation`).toEqual([]);
    // The netlist still simulates: the measurements are printed.
    expect(r.stdout, `${tag}, ${f.file}`).toMatch(/v_out0\s*=/i);
    // No line starts with user text.
    expect(f.text).not.toMatch(/^\s*\*#/m);
    expect(f.text).not.toMatch(/^\s*\.(control|endc|include|lib)\b/im);
    expect(f.text).not.toMatch(/^\+/m);
    expect(f.text).not.toMatch(/\r|\u2028|\u2029|\u0085/);
  }
  // Every netlist: the title and the header are comments.
  for (const f of n.files) {
    const lines = f.text.split('\n');
    expect(lines[0]).toMatch(/^\* Stage /);
    expect(lines[1]).toMatch(/^\* Railwright open-loop netlist/);
  }
  return chosen.length;
}

describe('netlists from a hostile project', () => {
  it.skipIf(spice.skip)('run in ngspice without any side effect; user text only in comment lines', async () => {
    const dir = scratchDir('rw-hostile-');
    let simulated = 0;
    for (const [tag, set] of NETLIST_VARIANTS) {
      const req = baseRequirements();
      set(req);
      const sub = join(dir, tag.replace(/[^A-Za-z0-9]+/g, '-'));
      mkdirSync(sub);
      const { bundle, craftedBundle } = await exportBundles(sub, req);
      simulated += await simulateAll(sub, tag, bundle, true);
      if (tag === 'project name, LF') simulated += await simulateAll(sub, `${tag}, crafted plan`, craftedBundle, true);
    }
    const all = join(dir, 'all');
    mkdirSync(all);
    const { bundle, craftedBundle } = await hostileBundle(all);
    simulated += await simulateAll(all, 'all at once', bundle);
    simulated += await simulateAll(all, 'all at once, crafted plan', craftedBundle);
    expect(simulated).toBeGreaterThanOrEqual(NETLIST_VARIANTS.length);
  }, 400_000);

  it('one SPICE comment line for any text', async () => {
    // Imported here so that the other tests of this file also run on code without it.
    const { spiceComment } = await import('../../src-main/export/spice.ts');
    for (const t of ['a\nb', 'a\rb', 'a\u2028b', 'a\u0085b', '\n.control', '*#shell x', 'x\\', '\u0000\u001b']) {
      const c = spiceComment(t);
      expect(c.startsWith('* ')).toBe(true);
      expect(c).not.toMatch(/[\n\r\u2028\u2029\u0085\u0000\u001b]/);
    }
  });
});

describe('other writers on a hostile project', () => {
  it('SVG, XLSX, BOM CSV and the magnetic specification are well formed and carry no raw control character; the PDFs are written', async () => {
    const dir = scratchDir('rw-hostile-w-');
    const { bundle, craftedBundle } = await hostileBundle(dir);
    for (const b of [bundle, craftedBundle]) {
      // SVG: well-formed XML 1.0 (fast-xml-parser's validator), no forbidden characters.
      const svg = exportTreeSvg(b);
      expect(XMLValidator.validate(svg)).toBe(true);
      expect(svg).not.toMatch(RAW_BAD);
      expect(svg).not.toContain('<script');
      expect(svg).not.toContain('<b>');
      new XMLParser().parse(svg, true);

      // PDF report and tree: keep their own character handling; they must still be written.
      for (const pdf of [await exportReportPdf(b), await exportTreePdf(b)]) expect(Buffer.from(pdf.subarray(0, 5)).toString('latin1')).toBe('%PDF-');

      // BOM CSV: RFC 4180 (read back with csv-parse), no raw control character in any cell.
      const csvText = exportBomCsv(b);
      expect(csvText).not.toMatch(RAW_BAD);
      const csvRows = parseCsv(csvText, { relax_column_count: true }) as string[][];
      expect(csvRows.find((r) => r[0] === 'Project')![1]).toContain('\\u{1B}]0;owned');

      // XLSX: every XML part well formed, read back by exceljs.
      const xlsx = await exportBomXlsx(b);
      const zip = await JSZip.loadAsync(xlsx);
      for (const name of Object.keys(zip.files).filter((n) => n.endsWith('.xml'))) {
        const xml = await zip.file(name)!.async('string');
        expect(XMLValidator.validate(xml), name).toBe(true);
        expect(xml, name).not.toMatch(RAW_BAD);
      }
      const wb = new ExcelJS.Workbook();
      await wb.xlsx.load(xlsx as unknown as ArrayBuffer);
      const cells: string[] = [];
      wb.getWorksheet('BOM')!.eachRow((row) => row.eachCell((c) => { cells.push(String(c.value)); }));
      expect(cells.join('\n')).toContain('Project');
      expect(cells.some((c) => c.includes('\\u{1B}'))).toBe(true);

      // Markdown: no raw HTML, no line break inside a heading or table row, no raw control.
      const specs = exportMagneticSpecs(b);
      expect(specs.length).toBeGreaterThan(0);
      for (const s of specs) {
        expect(s.text).not.toMatch(RAW_BAD);
        expect(s.text).not.toMatch(/\r/);
        expect(s.text).not.toMatch(/<(script|b)\b/i);
        expect(s.text).not.toMatch(/^\s*\.control/m);
        const headings = s.text.split('\n').filter((l) => l.startsWith('#'));
        expect(headings.map((h) => h.replace(/^#+ /, '').split(' ')[0])).toEqual(['Magnetic', 'Electrical', 'Windings', 'Isolation', 'Cautions']);
        // Every row of a table has as many unescaped pipes (cell separators) as its header.
        let header = -1;
        for (const line of s.text.split('\n')) {
          if (!line.startsWith('|')) { header = -1; continue; }
          const pipes = line.replace(/\\\|/g, '').split('|').length;
          if (header < 0) header = pipes;
          else expect(pipes, line).toBe(header);
        }
        expect(s.text).toContain('&lt;b&gt;');
      }
    }
  }, 120_000);

  it('project JSON holds no raw bidi, C1 or separator characters and reads back the same', () => {
    const req = hostileRequirements();
    const text = exportProjectJson({ requirements: req });
    expect(text).not.toMatch(RAW_BAD);
    expect(JSON.parse(text)).toEqual(JSON.parse(JSON.stringify(exportProjectValue({ requirements: req }))));
  });
});

describe('the terminal never sees a raw control character', () => {
  it('summary, validate and export-json of a hostile file, run as a child process', async () => {
    const dir = scratchDir('rw-hostile-cli-');
    const path = join(dir, 'hostile.rwproj');
    const s = ProjectStore.create();
    s.setRequirements(hostileRequirements());
    s.save(path);
    s.close();
    for (const args of [['summary', path], ['validate', path], ['export-json', path], ['plan', path]]) {
      const r = spawnSync(process.execPath, [join(ROOT, 'bin/railwright.mjs'), ...args], { cwd: dir, encoding: 'utf8', timeout: 60_000 });
      expect(r.status, `${args[0]}: ${r.stderr}`).not.toBeNull();
      expect(r.stdout + r.stderr, args[0]).not.toMatch(RAW_BAD);
      expect(r.stdout + r.stderr, args[0]).not.toMatch(/\r/);
      if (args[0] === 'summary') {
        expect(r.status).toBe(0);
        expect(r.stdout).toContain('\\u{1B}]0;owned\\u{7}');
        expect(r.stdout).toContain('\\u{202E}gnp.exe');
        // A name's line breaks do not break the summary's lines.
        expect(r.stdout.split('\n').filter((l) => /^\.control/.test(l))).toEqual([]);
      }
      if (args[0] === 'validate' || args[0] === 'plan') {
        expect(r.status).toBe(1);
        expect(r.stdout + r.stderr).toMatch(/meta\.name: contains a line break \(U\+000A\)/);
      }
    }
    // `new --name` applies the same rule and writes nothing.
    const nn = spawnSync(process.execPath, [join(ROOT, 'bin/railwright.mjs'), 'new', 'x.rwproj', '--name', 'a\u001b[2Jb'], { cwd: dir, encoding: 'utf8', timeout: 60_000 });
    expect(nn.status).toBe(2);
    expect(nn.stderr).toMatch(/--name: contains a control character \(U\+001B\)/);
    expect(nn.stderr).not.toMatch(RAW_BAD);
    expect(readdirSync(dir).sort()).toEqual(['hostile.rwproj']);
  }, 200_000);
});

/** Each hostile string and the kind of character named in the refusal. */
const HOSTILE: Array<[string, RegExp]> = [
  ['Main\n.control', /line break \(U\+000A\)/],
  ['Main\r.control', /line break \(U\+000D\)/],
  ['Main\u2028x', /line break \(U\+2028\)/],
  ['Main\u0085x', /line break \(U\+0085\)/],
  ['a\u001b[2J', /control character \(U\+001B\)/],
  ['bell\u0007', /control character \(U\+0007\)/],
  ['tab\there', /control character \(U\+0009\)/],
  ['csi\u009b2J', /control character \(U\+009B\)/],
  ['del\u007f', /control character \(U\+007F\)/],
  ['abc\u202egnp.exe', /bidirectional formatting character \(U\+202E\)/],
  ['iso\u2066x\u2069', /bidirectional formatting character \(U\+2066\)/],
  ['mark\u200f', /bidirectional formatting character \(U\+200F\)/],
  ['arabic\u061c', /bidirectional formatting character \(U\+061C\)/],
  ['lone\ud800', /unpaired surrogate \(U\+D800\)/],
  ['non\ufffe', /noncharacter \(U\+FFFE\)/],
  ['x'.repeat(201), /201 characters long; a name may have at most 200/],
];

describe('the one rule for user text', () => {
  it('accepts ordinary text of any script, refuses each hostile character by name', async () => {
    const { checkText, showText } = await import('../../src-main/engine/text-rules.ts');
    expect(validateRequirements(baseRequirements())).toEqual([]);
    expect(checkText('Isolated «front end» — ±12 V, µA, 日本, 👩‍🔬')).toBeNull();
    expect(checkText('two\nlines\tand a tab', 'description')).toBeNull();
    expect(checkText('cr\r', 'description')).toMatch(/U\+000D/);
    for (const [t, why] of HOSTILE) expect(checkText(t), JSON.stringify(t)).toMatch(why);
    expect(showText('a\u001b\u202e\n')).toBe('a\\u{1B}\\u{202E}\\u{A}');
  });

  it('validate names the field of every hostile name', () => {
    const fields: Array<[string, (r: Requirements, t: string) => void]> = [
      ['meta.name', (r, t) => { r.meta.name = t; }],
      ['sources[0].name', (r, t) => { r.sources[0]!.name = t; }],
      ['domains[1].name', (r, t) => { r.domains[1]!.name = t; }],
      ['modes[0].name', (r, t) => { r.modes[0]!.name = t; }],
      ['loads[3].name', (r, t) => { r.loads[3]!.name = t; }],
      ['loads[2].railKey', (r, t) => { r.loads[2]!.railKey = t; }],
      ['sources[0].id', (r, t) => { r.sources[0]!.id = t; }],
    ];
    for (const [path, set] of fields) {
      for (const [t, why] of HOSTILE) {
        const req = baseRequirements();
        set(req, t);
        const p = validateRequirements(req).filter((x) => x.path === path);
        expect(p, `${path} ${JSON.stringify(t)}`).toHaveLength(1);
        expect(p[0]!.message).toMatch(why);
      }
    }
    const req = baseRequirements();
    req.meta.description = 'ok\nbut \u001b[2J';
    expect(validateRequirements(req)).toEqual([{ path: 'meta.description', message: expect.stringMatching(/control character \(U\+001B\)/) }]);
  });

  it('JSON import refuses each hostile name with its path', () => {
    const base = exportProjectValue({ requirements: baseRequirements() }) as Record<string, unknown> & {
      meta: Record<string, unknown>; loads: Array<Record<string, unknown>>; domains: Array<Record<string, unknown>>;
    };
    expect(importProjectJson(JSON.stringify(base)).ok).toBe(true);
    for (const [t, why] of HOSTILE) {
      for (const [path, doc] of [
        ['meta.name', { ...base, meta: { ...base.meta, name: t } }],
        ['loads[3].name', { ...base, loads: base.loads.map((l, i) => (i === 3 ? { ...l, name: t } : l)) }],
        ['loads[1].railKey', { ...base, loads: base.loads.map((l, i) => (i === 1 ? { ...l, railKey: t } : l)) }],
        ['domains[1].name', { ...base, domains: base.domains.map((d, i) => (i === 1 ? { ...d, name: t } : d)) }],
      ] as const) {
        const r = importProjectJson(JSON.stringify(doc));
        expect(r.ok, `${path} ${JSON.stringify(t)}`).toBe(false);
        // Over-long ids and rail keys meet the schema's own 200-character limit first.
        const reason = t.length > 200 ? /(at most|longer than) 200/.source : why.source;
        expect(r.problems.map((p) => `${p.path}: ${p.message}`).join('\n')).toMatch(new RegExp(`${path.replace(/[[\].]/g, '\\$&')}: .*${reason}`));
      }
    }
  });

  it('the window edit requests refuse a hostile name and change nothing', async () => {
    const api = createApi({ host: 'test', userDataDir: null });
    const session = api.session;
    session.replace({ requirements: baseRequirements(), library: defaultLibrary(), planResult: null, path: null, dirty: false });
    const before = JSON.stringify({ r: session.requirements, l: session.library });
    const libId = String((session.library as Array<{ id: string }>)[0]!.id);
    for (const [t, why] of HOSTILE.filter(([x]) => x.trim() === x)) {
      for (const edit of [
        { table: 'loads', rowId: 'core', field: 'name', text: t },
        { table: 'sources', rowId: 'src', field: 'name', text: t },
        { table: 'domains', rowId: 'iso', field: 'name', text: t },
        { table: 'modes', rowId: 'run', field: 'name', text: t },
        { table: 'loads', rowId: 'io', field: 'railKey', text: t },
        { table: 'library', rowId: libId, field: 'name', text: t },
      ]) {
        const r = await api.request('requirements.editCell', edit as never);
        expect(r.ok, `${edit.table}.${edit.field} ${JSON.stringify(t)}`).toBe(false);
        if (!r.ok) expect(r.error.message).toMatch(why);
      }
      const rn = await api.request('project.rename', { name: t });
      expect(rn.ok).toBe(false);
      if (!rn.ok) expect(rn.error.message).toMatch(new RegExp(`project name: .*${why.source}`));
    }
    expect(JSON.stringify({ r: session.requirements, l: session.library })).toBe(before);
    expect(session.dirty).toBe(false);
  });

  it('the window opens a hostile file, lists each breach beside the grids, and refuses to plan it', async () => {
    const dir = scratchDir('rw-hostile-open-');
    const path = join(dir, 'hostile.rwproj');
    const st = ProjectStore.create();
    st.setRequirements(hostileRequirements());
    st.save(path);
    st.close();
    const api = createApi({ host: 'test', userDataDir: null, pathPolicy: makePathPolicy({ allowedRoots: [dir], baseDir: dir }) });
    const opened = await api.request('project.open', { path });
    expect(opened.ok, opened.ok ? '' : opened.error.message).toBe(true);
    if (!opened.ok) return;
    const problems = (opened.value as { problems: Array<{ field?: string; message: string }> }).problems;
    const text = problems.map((p) => `${p.field}: ${p.message}`).join('\n');
    expect(text).toMatch(/^meta\.name: project name: contains a line break \(U\+000A\)/m);
    expect(text).toMatch(/loads\.core\.railKey: .*contains a line break/);
    expect(text).toMatch(/modes\.run\.name: .*contains a line break \(U\+0085\)/);
    expect(text).not.toMatch(RAW_BAD);
    const planned = await api.request('plan.start', {});
    expect(planned.ok).toBe(false);
    if (!planned.ok) expect(planned.error.message).toMatch(/cannot plan yet: meta\.name: contains a line break/);
  });

  it('the library CSV import refuses a hostile part name or package', () => {
    const header = ['id', 'class', 'name', 'cost_estimate', 'cost_note', 'params'];
    const ok = ['r1', 'resistor', 'Resistor 0603', '0.01', 'invented estimate', 'package=0603; power=0.1; tolerance=0.01'];
    const good = tableToRows([header, ok]);
    expect(good.ok, JSON.stringify(good)).toBe(true);
    for (const [t, why] of HOSTILE.filter(([x]) => x.trim() === x)) {
      const byName = tableToRows([header, [ok[0]!, ok[1]!, t, ok[3]!, ok[4]!, ok[5]!]]);
      expect(byName.ok).toBe(false);
      if (!byName.ok && t.length <= 200) expect(byName.problems.find((p) => p.field === 'name')?.message).toMatch(why);
      const byNote = tableToRows([header, [...ok.slice(0, 4), t, ok[5]!]]);
      expect(byNote.ok, JSON.stringify(t)).toBe(false);
    }
  });
});
