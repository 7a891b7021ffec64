/**
 * The planner's search against independent solvers on seeded random (invented) instances:
 * an exhaustive oracle (no shared search code) and a MILP solved by the `highs` npm package.
 * The cost surface comes from the first-order evaluator (helpers/first-order-evaluator.ts)
 * so hundreds of instances stay fast; the engineering of the stages is tested elsewhere.
 */
import { describe, expect, it } from 'vitest';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { randomRequirements } from '../../src-main/engine/planner/instances.ts';
import { oracleBest } from '../../src-main/engine/planner/oracle.ts';
import { setPartitionLp } from '../../src-main/engine/planner/milp.ts';
import { makeScorer } from '../../src-main/engine/planner/score.ts';
import { inventedCostModel } from '../../src-main/engine/planner/cost-model.ts';
import { firstOrderEvaluator } from './helpers/first-order-evaluator.ts';
import { checkPlan } from './helpers/check-plan.ts';

const REL = 1e-9;

function solveInstance(rails: number, seed: number, extra: { allowRailFeeds?: boolean; maxSecondaries?: number } = {}) {
  const req = randomRequirements({ rails, seed, maxSecondaries: extra.maxSecondaries ?? 2 });
  const solver = new PlanSolver(req, { evaluator: firstOrderEvaluator, budgetMs: 60_000, singleObjective: true, allowRailFeeds: extra.allowRailFeeds ?? true });
  const result = solver.solve();
  return { req, solver, result };
}

describe('planner vs exhaustive oracle (200 seeded instances, 3–7 rails)', () => {
  it('finds the same best weighted score as the oracle on every instance, and proves it', () => {
    let feasible = 0;
    for (let seed = 1; seed <= 200; seed++) {
      const rails = 3 + (seed % 5);
      const { req, solver, result } = solveInstance(rails, seed);
      const { factory, blocks } = solver.candidates();
      const scorer = makeScorer('balanced', req, factory!.ctx, inventedCostModel());
      const o = oracleBest(factory!, blocks, scorer);
      if (o.bestScore === Infinity) {
        expect(result.best, `seed ${seed}: oracle finds no tree`).toBeNull();
        expect(result.infeasible.length).toBeGreaterThan(0);
        continue;
      }
      feasible++;
      expect(result.best, `seed ${seed}`).not.toBeNull();
      // The planner's best equals the oracle's best (relative 1e-9).
      expect(Math.abs(result.best!.score.weighted - o.bestScore) / o.bestScore, `seed ${seed}`).toBeLessThan(REL);
      expect(result.stats.provedOptimal).toBe(true);
    }
    // The generator must give mostly feasible instances or the property says little.
    expect(feasible).toBeGreaterThan(120);
  }, 240_000);
});

describe('independent feasibility check of returned plans', () => {
  it('every plan (best and alternatives) feeds each rail once, crosses barriers and keeps windows and Tj', () => {
    let checked = 0;
    for (let seed = 1; seed <= 40; seed++) {
      const req = randomRequirements({ rails: 4 + (seed % 6), seed, maxSecondaries: 3 });
      const result = new PlanSolver(req, { evaluator: firstOrderEvaluator, budgetMs: 60_000 }).solve();
      for (const p of result.alternatives) {
        expect(checkPlan(req, result, p, firstOrderEvaluator), `seed ${seed} ${p.labels.join('+')}`).toEqual([]);
        checked++;
      }
      if (result.best) {
        expect(result.best.labels).toContain('best');
        // Every rail has a feed-choice reason with text.
        for (const r of result.rails) expect(result.best.reasons.some((x) => x.code === 'feed-choice' && x.subjectId === r.id && x.text.length > 20)).toBe(true);
      }
    }
    expect(checked).toBeGreaterThan(40);
  }, 240_000);
});

describe('planner vs a MILP solved by highs (additive instances: no rail-fed stages)', () => {
  it('reaches the MILP optimum on every feasible one of 40 instances (at least 20)', async () => {
    const highs = await (await import('highs')).default();
    let compared = 0;
    for (let seed = 1; seed <= 40; seed++) {
      const { req, solver, result } = solveInstance(5 + (seed % 6), 1000 + seed, { allowRailFeeds: false, maxSecondaries: 3 });
      const { factory, blocks } = solver.candidates();
      const scorer = makeScorer('balanced', req, factory!.ctx, inventedCostModel());
      const lp = setPartitionLp(req, factory!.ctx.rails.length, blocks, scorer);
      const sol = highs.solve(lp);
      if (sol.Status !== 'Optimal') {
        expect(result.best, `seed ${seed}: MILP ${sol.Status}`).toBeNull();
        continue;
      }
      compared++;
      expect(result.best, `seed ${seed}`).not.toBeNull();
      // Same optimum as the MILP (relative 1e-7: the LP file carries 15 significant digits).
      expect(Math.abs(result.best!.score.weighted - sol.ObjectiveValue) / sol.ObjectiveValue, `seed ${seed}`).toBeLessThan(1e-7);
    }
    expect(compared).toBeGreaterThanOrEqual(20);
  }, 240_000);
});

describe('determinism, alternatives, cancel', () => {
  it('gives the same result for the same input', () => {
    const a = solveInstance(9, 77).result;
    const b = solveInstance(9, 77).result;
    const strip = (r: typeof a) => JSON.stringify({ ...r, stats: { ...r.stats, elapsedMs: 0, firstFeasibleMs: 0, bestFoundMs: 0 } });
    expect(strip(a)).toBe(strip(b));
  });
  it('labels lowest-loss, lowest-cost, fewest-parts and balanced plans, each no worse than the others on its own objective', () => {
    let seed = 5;
    let r = new PlanSolver(randomRequirements({ rails: 7, seed }), { evaluator: firstOrderEvaluator, budgetMs: 60_000 }).solve();
    while (!r.best && seed < 30) r = new PlanSolver(randomRequirements({ rails: 7, seed: ++seed }), { evaluator: firstOrderEvaluator, budgetMs: 60_000 }).solve();
    const by = (l: string) => r.alternatives.find((p) => p.labels.includes(l as never))!;
    for (const l of ['lowest-loss', 'lowest-cost', 'fewest-parts', 'balanced', 'best']) expect(by(l), l).toBeDefined();
    for (const p of r.alternatives) {
      expect(by('lowest-loss').score.loss).toBeLessThanOrEqual(p.score.loss + 1e-9);
      expect(by('lowest-cost').score.cost).toBeLessThanOrEqual(p.score.cost + 1e-9);
      expect(by('fewest-parts').score.parts).toBeLessThanOrEqual(p.score.parts);
    }
  });
  it('stops at cancel and says so; step() reports progress', () => {
    const req = randomRequirements({ rails: 14, seed: 3 });
    const s = new PlanSolver(req, { evaluator: firstOrderEvaluator, budgetMs: 60_000 });
    s.step(50);
    expect(s.progress.phase).toBe('candidates');
    s.cancel();
    expect(s.step(1)).toBe(true);
    const r = s.getResult()!;
    expect(r.stats.cancelled).toBe(true);
    expect(r.stats.provedOptimal).toBe(false);
  });
  it('returns a feasible plan within a tiny budget on 24 rails (anytime)', () => {
    const req = randomRequirements({ rails: 24, seed: 11, maxSecondaries: 2, quietShare: 0, negativeShare: 0, isolatedShare: 0.2 });
    // The anytime search is under test, not the magnetics-per-domain limit (shared-tap.test.ts).
    req.limits.maxMagneticsPerIsolatedDomain = 8;
    const r = new PlanSolver(req, { evaluator: firstOrderEvaluator, budgetMs: 1000, singleObjective: true }).solve();
    expect(r.best).not.toBeNull();
    expect(checkPlan(req, r, r.best!, firstOrderEvaluator)).toEqual([]);
  }, 60_000);
});

describe('infeasibility explanations', () => {
  it('names the rail, the constraint, the shortfall and a remedy when a rail cannot be met', () => {
    let seed = 1;
    while (!new PlanSolver(randomRequirements({ rails: 4, seed, maxSecondaries: 2 }), { evaluator: firstOrderEvaluator }).solve().best) seed++;
    const req = randomRequirements({ rails: 4, seed, maxSecondaries: 2 });
    // ±0.1 % on the first load: no first-order stage holds it (their windows are ±1 % or wider).
    req.loads[0]!.tolerance = 0.001 as never;
    const r = new PlanSolver(req, { evaluator: firstOrderEvaluator, budgetMs: 60_000 }).solve();
    expect(r.best).toBeNull();
    const railId = r.rails.find((x) => x.loadIds.includes(req.loads[0]!.id))!.id;
    const inf = r.infeasible.find((i) => i.railId === railId)!;
    expect(inf).toBeDefined();
    expect(inf.constraint).toBe('window');
    expect(inf.shortfall).toBeGreaterThan(0);
    expect(inf.unit).toBe('V');
    expect(inf.remedies.some((x) => /relax the tolerance/.test(x))).toBe(true);
  });
  it('explains an isolated rail when no stage kind may cross the barrier', () => {
    const req = randomRequirements({ rails: 6, seed: 4, isolatedShare: 0.5 });
    req.preferences.allowedKinds = ['buck', 'ldo'];
    const r = new PlanSolver(req, { evaluator: firstOrderEvaluator, budgetMs: 60_000 }).solve();
    expect(r.best).toBeNull();
    const inf = r.infeasible.find((i) => i.constraint === 'barrier')!;
    expect(inf).toBeDefined();
    expect(inf.remedies.join(' ')).toMatch(/coupled-winding buck/);
  });
  it('reports bad input by field without throwing', () => {
    const req = randomRequirements({ rails: 3, seed: 1 });
    req.sources[0]!.vMin = 40 as never;
    const r = new PlanSolver(req, { evaluator: firstOrderEvaluator }).solve();
    expect(r.best).toBeNull();
    expect(r.infeasible[0]!.text).toMatch(/source .*vMin/);
  });
});

describe('bad input never crashes the planner', () => {
  it('reports no loads, negative or non-finite currents and a missing domain by field', () => {
    const base = () => randomRequirements({ rails: 3, seed: 1 });
    const cases: [string, (r: ReturnType<typeof base>) => void, RegExp][] = [
      ['no loads', (r) => { r.loads = []; }, /loads: the project has no loads/],
      ['negative current', (r) => { r.loads[0]!.current.run = -1 as never; }, /current in mode run must be a finite number/],
      ['NaN current', (r) => { r.loads[0]!.current.run = NaN as never; }, /current in mode run must be a finite number/],
      ['unknown domain', (r) => { r.loads[0]!.domainId = 'nowhere'; }, /domain nowhere does not exist/],
      ['no source', (r) => { r.sources = []; }, /sources: the project has no input source/],
    ];
    for (const [name, mutate, re] of cases) {
      const req = base();
      mutate(req);
      const r = new PlanSolver(req, { evaluator: firstOrderEvaluator }).solve();
      expect(r.best, name).toBeNull();
      expect(r.infeasible.map((i) => i.text).join(' | '), name).toMatch(re);
    }
  });
});
