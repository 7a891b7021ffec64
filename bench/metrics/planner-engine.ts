/**
 * Headline planner figures with the real stage engine (engine/stages through engineEvaluator),
 * the evaluator users get: the demo (12 rails) and seeded invented projects of 24 and 60 rails
 * (engine/planner/instances.ts), each planned once with a 5 s budget. One JSON line per
 * project: `median` is the elapsed ms, and the line carries whether the result was proved
 * optimal, the search nodes explored, the budget overrun in % (negative: ended early), the
 * peak heap in MB (process.memoryUsage().heapUsed sampled between steps), whether a tree was
 * found, and how many of the candidate feeds were designed. On 2 shared cores the times are
 * noisy: compare runs on a quiet machine.
 */
import type { Metric } from '../harness.ts';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { randomRequirements } from '../../src-main/engine/planner/instances.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import type { Requirements } from '../../src-main/engine/model.ts';

const BUDGET_MS = 5000;

function engineRun(name: string, req: () => Requirements): Metric {
  let details: Record<string, number | boolean | string> = {};
  return {
    name, unit: 'ms',
    async sample() {
      const s = new PlanSolver(req(), { evaluator: engineEvaluator(), budgetMs: BUDGET_MS });
      let peak = process.memoryUsage().heapUsed;
      const t0 = performance.now();
      while (!s.step(20)) peak = Math.max(peak, process.memoryUsage().heapUsed);
      const ms = performance.now() - t0;
      peak = Math.max(peak, process.memoryUsage().heapUsed);
      const r = s.getResult()!;
      const sp = r.stats.space;
      details = {
        budget_ms: BUDGET_MS, proved: r.stats.provedOptimal, nodes: r.stats.explored,
        overrun_pct: Math.round(1000 * (ms - BUDGET_MS) / BUDGET_MS) / 10,
        peak_heap_mb: Math.round(peak / 1e5) / 10, tree: r.best !== null,
        designed: sp?.designed ?? 0, candidates: sp?.candidates ?? 0,
      };
      return [ms];
    },
    details: () => details,
  };
}

export const metrics: Metric[] = [
  engineRun('engine_plan_demo_12', () => demoDocument().requirements),
  engineRun('engine_plan_rails_24', () => randomRequirements({ rails: 24, seed: 1 })),
  engineRun('engine_plan_rails_60', () => randomRequirements({ rails: 60, seed: 1 })),
];
