// `railwright export` and `railwright library` end to end on a project file holding the
// hand-made (invented) plan; outputs read back with independent parsers.
import { beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { XMLParser } from 'fast-xml-parser';
import { runCli } from '../../src-main/cli.ts';
import { PROJECT_EXTENSION, ProjectStore } from '../../src-main/store/project-store.ts';
import { handRequirements } from './hand-plan.ts';
import { designedHandPlan } from './hand-designs.ts';
import { pdfPlainText } from './pdf-text.ts';

async function cli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  const out: string[] = [];
  const err: string[] = [];
  const code = await runCli(args, { out: (l) => out.push(l), err: (l) => err.push(l) });
  return { code, out: out.join('\n'), err: err.join('\n') };
}

let dir: string;
let project: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rw-export-'));
  project = join(dir, `hand${PROJECT_EXTENSION}`);
  const req = handRequirements();
  const store = ProjectStore.fromDocument({ requirements: req });
  store.setPlanResult(designedHandPlan(store.getRequirements()));
  store.save(project);
  store.close();
});

describe('railwright export', () => {
  it('writes every export from the saved plan', async () => {
    const o = join(dir, 'out');
    const r = await cli(['export', project, '--bom', join(o, 'bom.csv'), '--tree', join(o, 'tree.svg'), '--report', join(o, 'report.pdf'),
      '--netlists', join(o, 'net'), '--magnetics', join(o, 'mag'), '--library-csv', join(o, 'lib.csv')]);
    expect(r.code, r.err).toBe(0);
    expect(r.err).not.toMatch(/planning/);
    expect(r.err).toMatch(/certifies nothing/);
    const bom = parse(readFileSync(join(o, 'bom.csv'), 'utf8'), { relax_column_count: true }) as string[][];
    expect(bom[0]![1]).toBe('References');
    const svg = new XMLParser().parse(readFileSync(join(o, 'tree.svg'), 'utf8'), true) as { svg: unknown };
    expect(svg.svg).toBeDefined();
    expect(await pdfPlainText(readFileSync(join(o, 'report.pdf')))).toContain('9 Safety cautions');
    expect(readdirSync(join(o, 'net')).sort()).toEqual(['st-buck-3v3.cir', 'st-cw-5v.cir']);
    expect(readdirSync(join(o, 'mag'))).toHaveLength(1);
    expect(readFileSync(join(o, 'lib.csv'), 'utf8')).toMatch(/^id,class,name,cost_estimate,cost_note,params\r\n/);
  });

  it('also writes the XLSX BOM and the tree PDF', async () => {
    const o = join(dir, 'out2');
    const r = await cli(['export', project, '--bom', join(o, 'bom.xlsx'), '--tree', join(o, 'tree.pdf'), '--mode', 'Idle']);
    expect(r.code, r.err).toBe(0);
    expect(readFileSync(join(o, 'bom.xlsx')).subarray(0, 2).toString('latin1')).toBe('PK'); // XLSX is a zip (ECMA-376)
    expect(await pdfPlainText(readFileSync(join(o, 'tree.pdf')))).toContain('Figures for operating mode "Idle"');
  });

  it('refuses a bad target before writing anything', async () => {
    const o = join(dir, 'bad');
    const r = await cli(['export', project, '--bom', join(o, 'bom.csv'), '--tree', join(o, 'tree.png')]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--tree .*tree\.png: the name must end in \.svg or \.pdf/);
    expect(existsSync(join(o, 'bom.csv'))).toBe(false);
    expect((await cli(['export', project])).code).toBe(2);
    expect((await cli(['export', project, '--mode', 'Nope', '--bom', join(o, 'x.csv')])).err).toMatch(/--mode Nope: no such operating mode/);
  });

  it('names the stage when a saved plan cannot be evaluated, and writes nothing', async () => {
    const broken = join(dir, `broken${PROJECT_EXTENSION}`);
    const store = ProjectStore.fromDocument({ requirements: handRequirements() });
    const pr = designedHandPlan(store.getRequirements());
    (pr.best!.stages[1]!.design as { outputs: unknown[] }).outputs = [];
    store.setPlanResult(pr);
    store.save(broken);
    store.close();
    const r = await cli(['export', broken, '--report', join(dir, 'broken.pdf')]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/st-cw-5v \(Coupled-winding 5V\)/);
    expect(existsSync(join(dir, 'broken.pdf'))).toBe(false);
  });

  it('plans first when the saved plan is stale, and says so', async () => {
    const stale = join(dir, `stale${PROJECT_EXTENSION}`);
    const store = ProjectStore.fromDocument({ requirements: handRequirements() });
    store.setPlanResult(designedHandPlan(store.getRequirements()));
    const req = store.getRequirements();
    req.meta.description = 'edited after planning';
    store.setRequirements(req);
    store.save(stale);
    store.close();
    const before = readFileSync(stale);
    const r = await cli(['export', stale, '--bom', join(dir, 'stale-bom.csv'), '--report', join(dir, 'stale.pdf')]);
    expect(r.err).toMatch(/stale.*planning again/);
    // The planner finds a tree for this small invented project; the report says it was re-planned.
    expect(r.code, r.err).toBe(0);
    expect(existsSync(join(dir, 'stale-bom.csv'))).toBe(true);
    expect(await pdfPlainText(readFileSync(join(dir, 'stale.pdf')))).toContain('planned again for this report');
    // The project file itself is left as it was.
    expect(readFileSync(stale).equals(before)).toBe(true);
  }, 120_000);
});

describe('railwright library', () => {
  it('exports, re-imports and refuses a bad file leaving the project unchanged', async () => {
    const csv = join(dir, 'lib.csv');
    expect((await cli(['library', project, '--export', csv])).code).toBe(0);
    const text = readFileSync(csv, 'utf8');
    const edited = text.replace(/^(ldo-sot23-150m,ldo,"[^"]*",)0\.1,/m, '$10.42,');
    expect(edited).not.toBe(text);
    writeFileSync(csv, edited);
    const imp = await cli(['library', project, '--import', csv]);
    expect(imp.code, imp.err).toBe(0);
    const s1 = ProjectStore.open(project);
    expect(s1.getLibrary().find((r) => r.id === 'ldo-sot23-150m')!.cost).toBe(0.42);
    s1.close();
    const before = readFileSync(project);
    const bad = join(dir, 'bad.csv');
    writeFileSync(bad, 'id,class,name,cost_estimate,params\r\nx,ldo,LDO,0.1,package=SOT-23-5; iMax=oops\r\n');
    const r = await cli(['library', project, '--import', bad]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/row 1, iMax: must be a number/);
    expect(r.err).toMatch(/the project is unchanged/);
    expect(readFileSync(project).equals(before)).toBe(true);
    writeFileSync(bad, 'id,class\r\n"unclosed,ldo\r\n');
    expect((await cli(['library', project, '--import', bad])).err).toMatch(/line 2.*not closed/);
    expect(readFileSync(project).equals(before)).toBe(true);
  });
});
