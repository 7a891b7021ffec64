/**
 * Margins in every window (issue 11 item 3, part): a rail whose worst-case window comes within
 * the design limits' window margin (default 10 % of the band half-width) of a band edge is
 * reported as marginal, in the plan's reasons and in the CLI's plan output. Invented numbers.
 */
import { describe, expect, it } from 'vitest';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES, type Requirements } from '../../src-main/engine/model.ts';
import { validateRequirements } from '../../src-main/engine/validate.ts';
import type { StageEvaluator } from '../../src-main/engine/planner/types.ts';
import type { Amps, Ratio, Volts } from '../../src-main/engine/units.ts';
import { renderPlan } from '../../src-main/cli/plan.ts';
import { firstOrderEvaluator } from './helpers/first-order-evaluator.ts';

function oneRail(): Requirements {
  return {
    meta: { name: 'margins', description: 'invented', revision: 1 },
    sources: [{ id: 'in', name: 'Input', vNom: 12 as Volts, vMin: 10 as Volts, vMax: 14 as Volts, currentLimit: 5 as Amps }],
    domains: [{ id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 as Volts }],
    modes: [{ id: 'run', name: 'run', share: 1 as Ratio }],
    loads: [{ id: 'L', name: 'logic', domainId: 'main', voltage: 3.3 as Volts, tolerance: 0.05 as Ratio, current: { run: 0.3 as Amps }, rippleLimit: 0.05 as Volts, noiseClass: 'standard' }],
    limits: { ...DEFAULT_LIMITS },
    preferences: { ...DEFAULT_PREFERENCES, allowedKinds: ['buck'] },
  };
}

/** First-order stages whose windows end `gap` volts inside the upper band edge. */
const nearEdge = (gap: number): StageEvaluator => ({
  ...firstOrderEvaluator,
  windows(design, corners) {
    return firstOrderEvaluator.windows(design, corners).map((w) => ({ ...w, max: (w.allowedMax - gap) as Volts, inside: true }));
  },
});

describe('window margins', () => {
  it('reports a rail 1 mV inside its band as marginal, in the reasons and the CLI output', () => {
    const req = oneRail();
    const r = new PlanSolver(req, { evaluator: nearEdge(0.001), budgetMs: 10_000 }).solve();
    expect(r.best).not.toBeNull();
    const m = r.best!.reasons.find((x) => x.code === 'marginal');
    expect(m, r.best!.reasons.map((x) => x.text).join('\n')).toBeDefined();
    // 3.3 V ±5 %: half-width 165 mV; 1 mV from the edge is 0.61 % of it.
    expect(m!.text).toMatch(/within 1 mV of the upper edge/);
    expect(m!.text).toMatch(/0\.61 % of the 165 mV half-width/);
    expect(renderPlan(req, r, r.best!).join('\n')).toMatch(/Marginal \(worst-case window within 10 % .*\): Main 3V3/);
  });

  it('does not flag a window with room to spare, and follows the design limits margin', () => {
    const req = oneRail();
    // 30 mV from the edge: 18 % of the half-width, more than the default 10 %.
    const ok = new PlanSolver(req, { evaluator: nearEdge(0.03), budgetMs: 10_000 }).solve();
    expect(ok.best!.reasons.some((x) => x.code === 'marginal')).toBe(false);
    req.limits.windowMargin = 0.25 as Ratio;
    const strict = new PlanSolver(req, { evaluator: nearEdge(0.03), budgetMs: 10_000 }).solve();
    expect(strict.best!.reasons.some((x) => x.code === 'marginal')).toBe(true);
  });

  it('refuses a window margin outside 0…1 by field', () => {
    const req = oneRail();
    req.limits.windowMargin = 1.5 as Ratio;
    const problems = validateRequirements(req);
    expect(JSON.stringify(problems)).toMatch(/limits\.windowMargin/);
  });
});

describe('turns-ratio and rectifier-voltage limits', () => {
  /** A 1.2 V primary from 10–14 V making an isolated 15 V rail: a turns ratio above 1:10. */
  function highRatio(): Requirements {
    const req = oneRail();
    req.sources[0] = { id: 'in', name: 'Input', vNom: 12 as Volts, vMin: 10 as Volts, vMax: 14 as Volts, currentLimit: 5 as Amps };
    req.domains.push({ id: 'iso', name: 'Iso', isolation: 'functional', workingVoltage: 60 as Volts });
    req.loads = [
      { id: 'P', name: 'core', domainId: 'main', voltage: 1.2 as Volts, tolerance: 0.05 as Ratio, current: { run: 0.5 as Amps }, rippleLimit: 0.05 as Volts, noiseClass: 'standard' },
      { id: 'S', name: 'iso supply', domainId: 'iso', voltage: 15 as Volts, tolerance: 0.1 as Ratio, current: { run: 0.05 as Amps }, rippleLimit: 0.1 as Volts, noiseClass: 'standard' },
    ];
    req.preferences = { ...req.preferences, allowedKinds: ['buck', 'cwbuck'], maxSecondaries: 1 };
    return req;
  }

  it('rejects a winding above the turns-ratio limit with its numbers, and allows it when the limit is raised', async () => {
    const { BlockFactory } = await import('../../src-main/engine/planner/candidates.ts');
    const { engineEvaluator } = await import('../../src-main/engine/planner/evaluator.ts');
    const { inventedCostModel } = await import('../../src-main/engine/planner/cost-model.ts');
    const { groupRails } = await import('../../src-main/engine/rails.ts');
    const req = highRatio();
    const rails = groupRails(req);
    const p = rails.findIndex((r) => r.voltage === 1.2), s = rails.findIndex((r) => r.voltage === 15);
    const shape = { kind: 'cwbuck' as const, input: { kind: 'source' as const, id: 'in' }, primary: p, secondaries: [s] };
    const limited = new BlockFactory(req, rails, engineEvaluator(), inventedCostModel()).evaluate(shape);
    expect(limited.ok).toBe(false);
    const rj = !limited.ok ? limited.rejections[0]! : null;
    expect(rj?.constraint).toMatch(/turns-ratio|rectifier-voltage/);
    expect(rj?.text).toMatch(/above the .* limit of the design limits/);
    req.limits.maxTurnsRatio = 100;
    req.limits.maxRectifierVoltage = 1000 as Volts;
    expect(new BlockFactory(req, rails, engineEvaluator(), inventedCostModel()).evaluate(shape).ok).toBe(true);
  });
});
