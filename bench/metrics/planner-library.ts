/**
 * The planner as users run it: the real stage engine designing every stage with the
 * project's part library (the default library here) and pricing trees by the parts the BOM
 * lists (src-main/worker/plan-worker.ts does the same).
 *
 * plan_ms_demo_library: the demo, whole balanced solve within its budget (10 s).
 */
import type { Metric } from '../harness.ts';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { defaultLibrary } from '../../src-main/api/default-library.ts';
import { fromStoreRows, libraryCostModel } from '../../src-main/engine/library.ts';

function library() {
  const r = fromStoreRows(defaultLibrary());
  if (!r.ok) throw new Error('default library has problems');
  return r.rows;
}

export const metrics: Metric[] = [
  {
    name: 'plan_ms_demo_library', unit: 'ms',
    async sample() {
      const req = demoDocument().requirements;
      const lib = library();
      const xs: number[] = [];
      for (let k = 0; k < 3; k++) {
        const t0 = performance.now();
        new PlanSolver(req, {
          evaluator: engineEvaluator({ library: lib, electrolyticDerating: req.limits.electrolyticDerating }),
          costModel: libraryCostModel(lib, { powerDerating: req.limits.powerDerating, electrolyticDerating: req.limits.electrolyticDerating }),
        }).solve();
        xs.push(performance.now() - t0);
      }
      return xs;
    },
  },
];
