/**
 * The planner against an independent exhaustive oracle (issue 11 item 5) on 200 seeded small
 * instances with the real stage engine, including pairs of windings that can design only
 * together. The oracle (helpers/independent-oracle.ts) shares no candidate generation, search
 * or tree evaluation with the planner: it enumerates every feed assignment of the stated
 * decision space and designs each tree through the stage engine directly.
 *
 * Checks: the planner's best is never worse than the oracle's (the planner's tree lies in the
 * space, and the oracle saw it); when the planner claims "proved optimal", the two are equal;
 * both agree on whether any tree exists.
 */
import { describe, expect, it } from 'vitest';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { BlockFactory } from '../../src-main/engine/planner/candidates.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { inventedCostModel } from '../../src-main/engine/planner/cost-model.ts';
import { pairedWindingRequirements, randomRequirements } from '../../src-main/engine/planner/instances.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';
import { IndependentOracle } from './helpers/independent-oracle.ts';

interface Tally { instances: number; proved: number; feasible: number; together: number }

function compare(req: Requirements, tally: Tally): PlanResult {
  const result = new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 60_000, singleObjective: true }).solve();
  const oracle = new IndependentOracle(req, inventedCostModel()).best('balanced', { maxMs: 30_000 });
  expect(oracle.complete, req.meta.name).toBe(true);
  const planned = result.best?.score.weighted ?? Infinity;
  const tol = 1e-7 * Math.max(1, Math.abs(oracle.bestScore));
  tally.instances++;
  expect(planned === Infinity, `${req.meta.name}: planner ${planned}, oracle ${oracle.bestScore}`).toBe(oracle.bestScore === Infinity);
  if (planned === Infinity) return result;
  tally.feasible++;
  expect(oracle.bestScore, `${req.meta.name}: the oracle found a worse best than a tree the planner built`).toBeLessThanOrEqual(planned + tol);
  if (result.stats.provedOptimal) {
    tally.proved++;
    expect(Math.abs(planned - oracle.bestScore), `${req.meta.name}: proved ${planned}, oracle ${oracle.bestScore}: ${oracle.bestFeeds?.join('; ')}`).toBeLessThanOrEqual(tol);
  }
  return result;
}

/** True when the paired windings A and B design together on some primary but neither alone. */
function onlyTogether(req: Requirements): boolean {
  const result = new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 60_000, singleObjective: true }).solve();
  const f = result.rails.length ? new BlockFactory(req, result.rails, engineEvaluator(), inventedCostModel()) : null;
  if (!f) return false;
  const a = result.rails.findIndex((r) => r.loadIds.includes('A'));
  const b = result.rails.findIndex((r) => r.loadIds.includes('B'));
  const primaries = result.rails.map((_, i) => i).filter((i) => i !== a && i !== b);
  for (const p of [...primaries, null]) {
    const shape = (secondaries: number[]) => ({ kind: 'cwbuck' as const, input: { kind: 'source' as const, id: 'in' }, primary: p, ...(p === null ? { busVoltage: 5 } : {}), secondaries: secondaries.sort((x, y) => x - y) });
    if (f.evaluate(shape([a, b])).ok && !f.evaluate(shape([a])).ok && !f.evaluate(shape([b])).ok) return true;
  }
  return false;
}

describe('planner against the independent oracle (real engine)', () => {
  const tally: Tally = { instances: 0, proved: 0, feasible: 0, together: 0 };

  it('3-rail random instances (100)', () => {
    for (let seed = 1; seed <= 100; seed++) compare(randomRequirements({ rails: 3, seed, maxSecondaries: 2 }), tally);
  }, 600_000);

  it('4-rail random instances (40)', () => {
    for (let seed = 1; seed <= 40; seed++) compare(randomRequirements({ rails: 4, seed: 1000 + seed, maxSecondaries: 2 }), tally);
  }, 600_000);

  it('paired-winding instances (60), some feasible only together', () => {
    for (let seed = 1; seed <= 60; seed++) {
      const req = pairedWindingRequirements(seed, seed % 2);
      compare(req, tally);
      if (onlyTogether(req)) tally.together++;
    }
    expect(tally.together, 'instances whose ±V pair designs only together').toBeGreaterThanOrEqual(3);
  }, 600_000);

  // The boost, four-switch buck-boost and inverting feeds (docs/planner.md table): a one-cell
  // input (3.0–4.2 V) puts 3.3 V inside the input range and 5 V, 6 V, 9 V, 12 V above it.
  const STEP_KINDS = ['buck', 'cwbuck', 'ldo', 'boost', 'buck-boost-4s', 'inverting'] as const;
  it('3-rail instances on a 3.0–4.2 V input with the step-up kinds (30)', () => {
    const step: Tally = { instances: 0, proved: 0, feasible: 0, together: 0 };
    const used = new Set<string>();
    for (let seed = 1; seed <= 30; seed++) {
      const res = compare(randomRequirements({ rails: 3, seed: 5000 + seed, maxSecondaries: 2, isolatedShare: 0, allowedKinds: [...STEP_KINDS], source: { vMin: 3, vNom: 3.7, vMax: 4.2 } }), step);
      for (const st of res.best?.stages ?? []) used.add(st.kind);
    }
    expect(step.feasible).toBeGreaterThanOrEqual(10);
    // The instances exercise the new kinds: best trees use the boost and the four-switch stage.
    expect(used.has('boost') && used.has('buck-boost-4s'), [...used].join(', ')).toBe(true);
    console.log(`independent oracle, step kinds on 3.0–4.2 V: ${step.instances} instances, ${step.feasible} with a tree, ${step.proved} proved`);
  }, 600_000);

  it('covered at least 200 instances, most with a tree', () => {
    expect(tally.instances).toBeGreaterThanOrEqual(200);
    expect(tally.feasible).toBeGreaterThanOrEqual(80);
    // Reported in the test output for the issue note.
    console.log(`independent oracle: ${tally.instances} instances, ${tally.feasible} with a tree, ${tally.proved} proved by the planner (all equal to the oracle), ${tally.together} with a pair feasible only together`);
  });
});
