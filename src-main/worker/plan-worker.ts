/**
 * Worker-thread entry: runs the pure planner with the stage engine, a slice of work at a
 * time, yielding to the event loop between slices so a `cancel` message is seen promptly.
 */
import { parentPort } from 'node:worker_threads';
import { PlanSolver } from '../engine/planner/solver.ts';
import { engineEvaluator } from '../engine/planner/evaluator.ts';
import { inventedCostModel } from '../engine/planner/cost-model.ts';
import { libraryCostModel } from '../engine/library.ts';
import type { FromWorker, ToWorker } from './protocol.ts';

const port = parentPort;
if (!port) throw new Error('plan-worker.ts must run in a worker thread');

let solver: PlanSolver | null = null;
const post = (m: FromWorker) => port.postMessage(m);

// A message that cannot be read is answered, so the caller ends this worker at once.
port.on('messageerror', (e) => post({ type: 'error', message: `the planning request could not be read (${(e as Error)?.message ?? String(e)})` }));

port.on('message', (m: ToWorker) => {
  if (m.type === 'cancel') { solver?.cancel(); return; }
  if (m.type !== 'plan' || solver) return;
  try {
    solver = new PlanSolver(m.requirements, {
      evaluator: engineEvaluator(m.options.library ? {
        library: m.options.library, electrolyticDerating: m.requirements.limits.electrolyticDerating,
        margins: { controllerInput: m.requirements.limits.inputRatingMargin ?? 0.1 },
      } : {}),
      ...(m.options.library
        ? { costModel: libraryCostModel(m.options.library, { powerDerating: m.requirements.limits.powerDerating, electrolyticDerating: m.requirements.limits.electrolyticDerating }) }
        : m.options.unitCosts ? { costModel: inventedCostModel(m.options.unitCosts) } : {}),
      ...(m.options.objective ? { objective: m.options.objective } : {}),
      ...(m.options.budgetMs !== undefined ? { budgetMs: m.options.budgetMs } : {}),
      ...(m.options.allowRailFeeds !== undefined ? { allowRailFeeds: m.options.allowRailFeeds } : {}),
    });
  } catch (e) {
    post({ type: 'error', message: (e as Error)?.message ?? String(e) });
    return;
  }
  let lastProgress = 0;
  const slice = () => {
    const s = solver!;
    try {
      const t0 = performance.now();
      // A slice of about 20 ms, then back to the event loop.
      while (!s.step(8) && performance.now() - t0 < 20) { /* work */ }
      if (s.done) {
        post({ type: 'result', result: s.getResult()!, trace: s.explain() });
        return;
      }
      if (performance.now() - lastProgress > 100) {
        lastProgress = performance.now();
        post({ type: 'progress', progress: { ...s.progress } });
      }
      setImmediate(slice);
    } catch (e) {
      post({ type: 'error', message: (e as Error)?.message ?? String(e) });
    }
  };
  setImmediate(slice);
});
