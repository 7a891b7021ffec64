/** The planning worker: same answer as in-process planning, progress events, cancel. */
import { describe, expect, it } from 'vitest';
import { runPlanInWorker, PlanAbortError } from '../../src-main/worker/run-plan.ts';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { randomRequirements } from '../../src-main/engine/planner/instances.ts';
import type { PlanProgress } from '../../src-main/engine/planner/solver.ts';

describe('runPlanInWorker', () => {
  it('returns the same plan as planning in process, with progress events', async () => {
    const req = randomRequirements({ rails: 4, seed: 3, maxSecondaries: 2, quietShare: 0 });
    const progress: PlanProgress[] = [];
    const viaWorker = await runPlanInWorker(req, { budgetMs: 120_000 }, (p) => progress.push(p));
    const direct = new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 120_000 }).solve();
    const strip = (r: typeof direct) => JSON.stringify({ ...r, stats: { ...r.stats, elapsedMs: 0, firstFeasibleMs: 0, bestFoundMs: 0 } });
    expect(strip(viaWorker)).toBe(strip(direct));
    expect(viaWorker.revision).toBe(req.meta.revision);
    for (const p of progress) expect(['rails', 'candidates', 'search', 'done']).toContain(p.phase);
  }, 180_000);

  it('stops on abort: resolves with the incumbent marked cancelled, or rejects with AbortError', async () => {
    const req = randomRequirements({ rails: 12, seed: 8 });
    const ac = new AbortController();
    const p = runPlanInWorker(req, { budgetMs: 120_000 }, undefined, ac.signal);
    setTimeout(() => ac.abort(), 400);
    const out = await p.then((r) => ({ r, e: null as unknown }), (e: unknown) => ({ r: null, e }));
    if (out.r) expect(out.r.stats.cancelled).toBe(true);
    else expect(out.e).toBeInstanceOf(PlanAbortError);
  }, 60_000);

  it('rejects at once when the signal is already aborted', async () => {
    const ac = new AbortController();
    ac.abort();
    await expect(runPlanInWorker(randomRequirements({ rails: 3, seed: 1 }), {}, undefined, ac.signal)).rejects.toBeInstanceOf(PlanAbortError);
  });
});
