/**
 * Window metrics: start of the local web host until Chromium shows the loaded project;
 * one load edit until the recomputed roll-up is back (60-load project, through the same
 * request the window sends); ELK layout of a 150-node tree; a 500-row load list imported
 * from CSV (read, preview and apply through the same requests the import dialog sends).
 */
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import ELK from 'elkjs/lib/elk.bundled.js';
import { timeRuns, type Metric } from '../harness.ts';
import { createApi } from '../../src-main/api/index.ts';
import { generateProject } from '../../src-main/store/generate.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { groupRails } from '../../src-main/engine/rails.ts';
import { buildTreeView, layoutTree } from '../../src-main/engine/layout.ts';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import type { Plan } from '../../src-main/engine/plan-types.ts';
import type { Snapshot } from '../../src-main/api/contract.ts';
import { defaultLibrary } from '../../src-main/api/default-library.ts';

const ROOT = resolve(import.meta.dirname, '../..');

export const metrics: Metric[] = [
  {
    name: 'window_ready_ms',
    unit: 'ms',
    async sample() {
      const renderer = join(ROOT, 'out', 'renderer');
      if (!existsSync(join(renderer, 'index.html'))) throw new Error('build the window first (npm run build)');
      if (!existsSync('/usr/bin/chromium')) throw new Error('chromium not installed');
      const { chromium } = await import('playwright-core');
      const { startWebMain } = await import('../../src-main/host/web-main.ts');
      const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu', '--no-first-run'] });
      try {
        return await timeRuns(5, async () => {
          const dir = mkdtempSync(join(tmpdir(), 'rw-bench-'));
          const ctx = await browser.newContext();
          const page = await ctx.newPage();
          const t0 = performance.now();
          const h = await startWebMain({ userDataDir: dir, rendererDir: renderer, autosaveMs: 0 });
          await page.goto(h.host.entryUrl);
          await page.waitForSelector('[data-grid=loads] [data-row]');
          const ms = performance.now() - t0;
          await ctx.close();
          await h.stop();
          rmSync(dir, { recursive: true, force: true });
          return ms;
        }, 1).then((xs) => xs);
      } finally {
        await browser.close();
      }
    },
  },
  {
    name: 'edit_to_rollup_ms_60_loads',
    unit: 'ms',
    async sample() {
      // The invented demo, grown to 60 loads: each load split into equal parts (same rails,
      // same totals), with the two changes a user makes to get a feasible plan (see e2e).
      const doc = demoDocument();
      doc.library = defaultLibrary();
      const r0 = doc.requirements;
      r0.sources[0]!.vMin = 16 as never;
      for (const l of r0.loads) if (Math.abs(l.voltage - 4.096) < 1e-6) l.tolerance = 0.02 as never;
      const orig = r0.loads;
      const k = Math.ceil(60 / orig.length);
      r0.loads = [];
      for (const l of orig) {
        for (let j = 0; j < k && r0.loads.length < 60; j++) {
          const cur: Record<string, number> = {};
          for (const [m, a] of Object.entries(l.current)) cur[m] = a / k;
          r0.loads.push({ ...l, id: `${l.id}-${j}`, name: `${l.name} ${j + 1}`, current: cur as never });
        }
      }
      if (r0.loads.length !== 60) throw new Error(`built ${r0.loads.length} loads, not 60`);
      const api = createApi({ host: 'test', userDataDir: null });
      const s = api.session;
      const store = ProjectStore.fromDocument(doc);
      s.replace({ requirements: store.getRequirements(), library: store.getLibrary(), planResult: null, path: null, store });
      const result = new PlanSolver(s.requirements, { evaluator: engineEvaluator(), budgetMs: 5000 }).solve();
      if (!result.best) throw new Error(`the 60-load project has no plan: ${result.infeasible[0]?.text ?? ''}`);
      s.planResult = { ...result, revision: s.requirements.meta.revision };
      s.plannedFrom = structuredClone(s.requirements);
      s.selectedId = result.best.id;
      const load = s.requirements.loads[0]!;
      const mode = s.requirements.modes[0]!;
      return timeRuns(15, async (i) => {
        const r = await api.request('requirements.editCell', { table: 'loads', rowId: load.id, field: `current:${mode.id}`, text: `${100 + (i & 7)}m` });
        if (!r.ok || !(r.value as Snapshot).plan?.rollup) throw new Error(r.ok ? 'no roll-up' : r.error.message);
      }, 2);
    },
  },
  {
    name: 'layout_ms_150_nodes',
    unit: 'ms',
    async sample() {
      const doc = generateProject({ loads: 200, seed: 3 });
      const req = doc.requirements;
      const base = groupRails(req);
      // Enough distinct rails for 150 nodes: copies of the generated rails with their own ids.
      const rails = Array.from({ length: 74 }, (_, i) => ({ ...base[i % base.length]!, id: `r${i}`, name: `Rail ${i}` }));
      const src = req.sources[0]!;
      // One stage per rail from the source: 1 + 74 + 74 = 149 nodes, plus one internal = 150.
      const plan: Plan = {
        id: 'bench', labels: ['best'], internalNodes: [{ id: 'bus', name: 'Bus', domainId: req.domains[0]!.id, voltage: 5 as never, kind: 'bus' }],
        stages: rails.map((r, i) => ({ id: `st${i}`, kind: 'buck', name: `Stage ${i}`, inputNodeId: i % 10 === 0 ? src.id : (i % 2 ? src.id : 'bus'), outputs: [{ nodeId: r.id, role: 'output' }], barriers: [], design: null })),
        score: { loss: 0 as never, cost: 0, parts: 0, weighted: 0 }, reasons: [],
      };
      const view = buildTreeView(req, rails, plan);
      if (view.nodes.length < 150) throw new Error(`only ${view.nodes.length} nodes`);
      const elk = new ELK();
      return timeRuns(7, () => layoutTree(view, elk), 1);
    },
  },
  {
    name: 'load_import_ms_500_rows',
    unit: 'ms',
    async sample() {
      // An invented 500-row load list in CSV with header units, on the demo project.
      const doc = demoDocument();
      doc.library = defaultLibrary();
      const req = doc.requirements;
      const lines = [`Name,Domain,Voltage (V),${req.modes.map((m) => `${m.name} current (mA)`).join(',')},Tolerance,Ripple (mV)`];
      for (let i = 0; i < 500; i++) {
        lines.push([`Bench load ${i + 1}`, req.domains[i % req.domains.length]!.name, ['3.3', '5', '1V8', '12'][i % 4], ...req.modes.map((_, j) => String(10 + ((i * 7 + j) % 90))), '±5%', '50'].join(','));
      }
      const base64 = Buffer.from(lines.join('\r\n')).toString('base64');
      return timeRuns(7, async () => {
        const api = createApi({ host: 'test', userDataDir: null });
        const store = ProjectStore.fromDocument(doc);
        api.session.replace({ requirements: store.getRequirements(), library: store.getLibrary(), planResult: null, path: null, store });
        const read = await api.request('loads.importRead', { fileName: 'bench.csv', base64 });
        if (!read.ok) throw new Error(read.error.message);
        const f = read.value as { rows: string[][]; preview: { mapping: never; bad: unknown[] } };
        if (f.preview.bad.length) throw new Error('the bench list has bad cells');
        const r = await api.request('loads.importApply', { rows: f.rows, mapping: f.preview.mapping });
        if (!r.ok || (r.value as { imported: number }).imported !== 500) throw new Error(r.ok ? 'not 500 imported' : r.error.message);
      }, 1);
    },
  },
];
