// The Charts view's requests through the handlers the window calls (demo, invented scenario):
// the system sweep and the per-mode windows are the roll-up's own figures, and a plot the
// window drew is saved through the export path: checked, themed colours resolved, never
// written over an existing file without the confirmation.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { createApi, type Api } from '../../src-main/api/index.ts';
import { openDemo } from '../../src-main/api/files.ts';
import { makePathPolicy } from '../../src-main/host/paths.ts';
import type { ApiError, ModeWindowsView, RollupView, Snapshot, SystemSweepView } from '../../src-main/api/contract.ts';
import { plotSvg } from '../../src-renderer/lib/plot-svg.ts';
import { demoHandPlan } from '../export/demo-plan.ts';

let dir: string;
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'rw-plot-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function api(planned = true): Api {
  const a = createApi({ host: 'test', userDataDir: join(dir, 'data'), pathPolicy: makePathPolicy({ allowedRoots: [dir], baseDir: dir }) });
  openDemo(a.session);
  if (planned) {
    const r = demoHandPlan(a.session.requirements);
    r.revision = a.session.requirements.meta.revision;
    a.session.planResult = r;
  }
  return a;
}

async function ok<T>(p: Promise<{ ok: boolean; value?: unknown; error?: ApiError }>): Promise<T> {
  const r = await p;
  if (!r.ok) throw new Error(r.error!.message);
  return r.value as T;
}

async function refused(p: Promise<{ ok: boolean; error?: ApiError }>): Promise<ApiError> {
  const r = await p;
  expect(r.ok, 'the request was not refused').toBe(false);
  return r.error!;
}

const hostile = '<rail & "name">';
const svg = plotSvg({
  title: `Windows — ${hostile}`, xLabel: 'Source voltage', yLabel: 'Efficiency', xKind: 'voltage', yKind: 'percent',
  series: [{ label: hostile, points: [{ x: 9, y: 0.8 }, { x: 36, y: 0.85 }] }],
});

describe('plot requests', () => {
  it('the system sweep at V min, nom and max is the Budget view\'s system figure', async () => {
    const a = api();
    const sw = await ok<SystemSweepView>(a.request('plot.systemSweep', {}));
    const snap = await ok<Snapshot>(a.request('project.snapshot', {}));
    const roll = snap.plan!.rollup as RollupView;
    expect(sw.modes.length).toBe(a.session.requirements.modes.length);
    for (const m of sw.modes) {
      const sys = roll.system.find((x) => x.modeId === m.modeId)!;
      for (const [v, k] of [[sw.range.min, 'vMin'], [sw.range.nom, 'vNom'], [sw.range.max, 'vMax']] as const) {
        const p = m.points.find((x) => x.v === v)!;
        expect(p.efficiency).toBeCloseTo(sys.efficiency[k], 12);
        expect(p.sourceCurrent).toBeCloseTo(sys.sourceCurrent[k], 12);
      }
    }
    const e = await refused(a.request('plot.systemSweep', { sourceId: 'nope' }));
    expect(e.field).toBe('sourceId');
  });

  it('the windows over every mode are the inspector\'s; one window per mode and rail', async () => {
    const a = api();
    const w = await ok<ModeWindowsView>(a.request('plot.modeWindows', {}));
    const snap = await ok<Snapshot>(a.request('project.snapshot', {}));
    const roll = snap.plan!.rollup as RollupView;
    expect(w.rails.length).toBeGreaterThan(3);
    for (const r of w.rails) {
      const insp = roll.windows.find((x) => x.nodeId === r.nodeId)!;
      expect(r.all).toEqual({ min: insp.min, max: insp.max, inside: insp.inside, proved: insp.proved });
      expect(r.modes.map((m) => m.modeId)).toEqual(w.modes.map((m) => m.id));
    }
  });

  it('refuses without a plan, naming the field', async () => {
    const a = api(false);
    expect((await refused(a.request('plot.modeWindows', {}))).message).toMatch(/no plan/);
    expect((await refused(a.request('plot.systemSweep', {}))).field).toBe('sourceId');
  });

  it('saves a drawn plot: well-formed (fast-xml-parser), user text escaped, fallback colours, never over a file silently', async () => {
    const a = api();
    const out = join(dir, 'windows.svg');
    writeFileSync(out, 'keep me');
    const e = await refused(a.request('export.file', { kind: 'plot-svg', path: out, svg, plotName: 'rail-windows' }));
    expect(e.code).toBe('exists');
    expect(readFileSync(out, 'utf8')).toBe('keep me');
    const f = await ok<{ writtenTo: string }>(a.request('export.file', { kind: 'plot-svg', path: out, svg, plotName: 'rail-windows', overwrite: true }));
    expect(f.writtenTo).toBe(out);
    const text = readFileSync(out, 'utf8');
    expect(XMLValidator.validate(text)).toBe(true);
    const doc = new XMLParser({ ignoreAttributes: false }).parse(text);
    expect(String(doc.svg.title)).toBe(`Windows — ${hostile}`);
    expect(text).not.toContain(hostile);
    expect(text).not.toMatch(/var\(/);
    // A download names the file after the project and the plot.
    const d = await ok<{ fileName: string; base64: string }>(a.request('export.file', { kind: 'plot-svg', svg, plotName: 'rail windows' }));
    expect(d.fileName).toMatch(/-rail-windows\.svg$/);
    expect(Buffer.from(d.base64, 'base64').toString('utf8')).toBe(text);
  });

  it('refuses markup that is not a plot, and writes nothing', async () => {
    const a = api();
    const out = join(dir, 'bad.svg');
    for (const bad of [
      '<html></html>',
      svg.replace('</svg>', '<script>alert(1)</script></svg>'),
      svg.replace('<title>', '<a href="http://example.invalid/"><title>').replace('</title>', '</title></a>'),
      svg.replace('<rect ', '<rect onclick="x()" '),
      `<!DOCTYPE svg [<!ENTITY e "x">]>${svg}`,
    ]) {
      const e = await refused(a.request('export.file', { kind: 'plot-svg', path: out, svg: bad }));
      expect(e.field).toBe('svg');
    }
    expect(() => readFileSync(out)).toThrow();
    expect((await refused(a.request('export.file', { kind: 'json', svg }))).field).toBe('svg');
    // A name that merely reads like markup (escaped by the builder) is saved.
    const odd = plotSvg({ title: 'onload="x()" url(http://x) javascript:y', xLabel: 'a', yLabel: 'b', xKind: 'voltage', yKind: 'percent',
      series: [{ label: 'href="z" <script>', points: [{ x: 1, y: 0.5 }, { x: 2, y: 0.6 }] }] });
    const d = await ok<{ base64: string }>(a.request('export.file', { kind: 'plot-svg', svg: odd, plotName: 'odd' }));
    const back = Buffer.from(d.base64, 'base64').toString('utf8');
    expect(XMLValidator.validate(back)).toBe(true);
    expect(String(new XMLParser().parse(back).svg.title)).toBe('onload="x()" url(http://x) javascript:y');
  });
});
