/**
 * The invented demo project (db/demo-project.json) planned with the real stage engine.
 * Checks what a power engineer expects of the tree, not a hard-coded tree.
 */
import { describe, expect, it } from 'vitest';
import { existsSync } from 'node:fs';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { GENERIC_DEFAULTS } from '../../src-main/engine/stages/index.ts';
import { demoDocument, demoPath } from '../../src-main/store/demo.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';
import { checkPlan } from './helpers/check-plan.ts';

const hasDemo = existsSync(demoPath());
const ldoAccuracy = GENERIC_DEFAULTS.ldo.accuracy;

function planDemo(mutate?: (r: Requirements) => void): { req: Requirements; result: PlanResult } {
  const req = demoDocument().requirements;
  mutate?.(req);
  const result = new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 60_000 }).solve();
  return { req, result };
}

describe.skipIf(!hasDemo)('demo project plan', () => {
  it('reports a reference rail tighter than any LDO can hold, with the tolerance that would work', () => {
    const req = demoDocument().requirements;
    const tight = req.loads.filter((l) => l.noiseClass === 'quiet' && l.tolerance < ldoAccuracy);
    if (!tight.length) return; // the demo no longer asks for it: the next test covers the plan
    const { result } = planDemo();
    expect(result.best).toBeNull();
    for (const l of tight) {
      const rail = result.rails.find((r) => r.loadIds.includes(l.id))!;
      const inf = result.infeasible.find((i) => i.railId === rail.id)!;
      expect(inf, rail.name).toBeDefined();
      expect(inf.constraint).toBe('window');
      // The LDO's own accuracy (generic default) exceeds the rail's tolerance.
      const m = /to ±([0-9.]+) %/.exec(inf.remedies.join(' '));
      expect(m).not.toBeNull();
      expect(Number(m![1]) / 100).toBeGreaterThanOrEqual(ldoAccuracy);
    }
  }, 300_000);

  it('plans the demo (quiet rails no tighter than an LDO holds) as a power engineer expects', () => {
    const { req, result } = planDemo((r) => {
      for (const l of r.loads) if (l.tolerance < ldoAccuracy) l.tolerance = 0.02 as never;
    });
    expect(result.best, JSON.stringify(result.infeasible)).not.toBeNull();
    // The proof is claimed only when its conditions hold, and otherwise the result says why
    // (docs/planner.md, Pruning). With the shared-tap sets the demo's space holds 3889
    // candidate feeds, more than a 60 s budget designs on the shared machine: then the result
    // is "best found" and names the design share.
    const space = result.stats.space!;
    if (space.designed < space.candidates) {
      expect(result.stats.provedOptimal).toBe(false);
      expect(result.stats.notProved).toMatch(/design share/);
    }
    expect(result.stats.provedOptimal).toBe(result.stats.notProved === undefined);
    const plan = result.best!;
    // Independent re-check with the engine: each rail fed once, barriers, windows, Tj.
    expect(checkPlan(req, result, plan, engineEvaluator())).toEqual([]);
    const feeder = new Map<string, (typeof plan.stages)[number]>();
    for (const st of plan.stages) for (const o of st.outputs) feeder.set(o.nodeId, st);
    for (const r of result.rails) {
      const st = feeder.get(r.id)!;
      // Quiet rails (amplifier supplies, converter supply, reference) end behind an LDO.
      if (r.noiseClass === 'quiet') expect(st.kind, r.name).toBe('ldo');
      const dom = req.domains.find((d) => d.id === r.domainId)!;
      if (dom.isolation !== 'none') {
        // Some stage on the path carries a barrier of the domain's class and working voltage.
        let node = r.id;
        let barrier = false;
        for (let guard = 0; guard < 20 && !req.sources.some((s) => s.id === node); guard++) {
          const s = feeder.get(node)!;
          if (s.barriers.some((b) => b.toDomainId === dom.id && b.isolation === dom.isolation && b.workingVoltage === dom.workingVoltage)) barrier = true;
          node = s.inputNodeId;
        }
        expect(barrier, r.name).toBe(true);
      }
    }
    // Secondaries per magnetic within the preference.
    for (const st of plan.stages.filter((s) => s.kind === 'cwbuck')) {
      expect(st.outputs.filter((o) => o.role === 'secondary').length).toBeLessThanOrEqual(req.preferences.maxSecondaries);
    }
    // A reason for every rail's feed, quoting numbers.
    for (const r of result.rails) {
      const reason = plan.reasons.find((x) => x.code === 'feed-choice' && x.subjectId === r.id);
      expect(reason?.text, r.name).toMatch(/\d/);
    }
    // The alternatives include the four labels.
    const labels = result.alternatives.flatMap((p) => p.labels);
    for (const l of ['lowest-loss', 'lowest-cost', 'fewest-parts', 'balanced']) expect(labels).toContain(l);
  }, 300_000);
});
