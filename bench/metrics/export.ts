/**
 * Export and roll-up timings. `export_all_ms_*`: from a plan to every export (roll-up, BOM,
 * ELK layout, BOM CSV and XLSX, tree SVG and PDF, report PDF, magnetic specs, netlists),
 * in memory, no file writing. `rollup_ms_60_loads_cold`: a full roll-up with fresh design
 * objects (nothing cached); `rollup_ms_60_loads_edit`: the roll-up after one load's current
 * changed (the edit → recompute path, stage results cached by their inputs).
 * The demo metric exports the demonstration project with the hand-made plan of
 * test/export/demo-plan.ts (usual-practice tree, every stage designed by the stage engine),
 * so it measures the exports alone, not the planner (bench/metrics/planner.ts does that).
 */
import ELK from 'elkjs/lib/elk.bundled.js';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { timeRuns, type Metric } from '../harness.ts';
import type { ElkLike } from '../../src-main/engine/layout.ts';
import { tableToRows } from '../../src-main/engine/library.ts';
import { rollupPlan } from '../../src-main/engine/rollup.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';
import { groupRails } from '../../src-main/engine/rails.ts';
import { readCsv } from '../../src-main/export/csv.ts';
import {
  prepareExport, exportBomCsv, exportBomXlsx, exportTreeSvg, exportTreePdf, exportReportPdf, exportMagneticSpecs, exportNetlists,
} from '../../src-main/export/bundle.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { bigPlan, bigRequirements } from '../../test/export/big-plan.ts';
import { demoHandPlan } from '../../test/export/demo-plan.ts';

function defaultRows() {
  const r = tableToRows(readCsv(readFileSync(join(import.meta.dirname, '../../db/default-library.csv'), 'utf8')));
  if (!r.ok) throw new Error('default library invalid');
  return r.rows;
}
const elk = new ELK() as unknown as ElkLike;

async function exportAll(req: Requirements, result: PlanResult): Promise<void> {
  const b = await prepareExport({ req, result, library: defaultRows(), elk });
  exportBomCsv(b);
  await exportBomXlsx(b);
  exportTreeSvg(b);
  await exportTreePdf(b);
  await exportReportPdf(b);
  exportMagneticSpecs(b);
  exportNetlists(b);
}

// Built inside each metric so a failure reports on that metric instead of stopping the run.
function demoPlan(): { req: Requirements; result: PlanResult } {
  const req = demoDocument().requirements;
  return { req, result: demoHandPlan(req) };
}

export const metrics: Metric[] = [
  {
    name: 'export_all_ms_demo',
    unit: 'ms',
    // Fresh designs each run (structuredClone) so no stage result is reused.
    sample: () => {
      const demo = demoPlan();
      return timeRuns(5, () => { const r = structuredClone(demo.result); return exportAll(demo.req, r); });
    },
  },
  {
    name: 'export_all_ms_60_loads',
    unit: 'ms',
    sample: () => {
      const req = bigRequirements(60);
      const result = bigPlan(req);
      return timeRuns(3, () => exportAll(req, structuredClone(result)));
    },
  },
  {
    name: 'rollup_ms_60_loads_cold',
    unit: 'ms',
    sample: () => {
      const req = bigRequirements(60);
      const result = bigPlan(req);
      return timeRuns(5, () => { const r = structuredClone(result); rollupPlan(req, r.rails, r.best!); });
    },
  },
  {
    name: 'rollup_ms_60_loads_edit',
    unit: 'ms',
    sample: () => {
      const req = bigRequirements(60);
      const result = bigPlan(req);
      rollupPlan(req, result.rails, result.best!);
      // Each run changes one load's current by a small step, regroups the rails and rolls up.
      return timeRuns(10, (i) => {
        const l = req.loads[Math.abs(i) % req.loads.length]!;
        for (const k of Object.keys(l.current)) l.current[k] = (l.current[k]! * 1.01) as never;
        rollupPlan(req, groupRails(req), result.best!);
      });
    },
  },
];
