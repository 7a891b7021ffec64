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
