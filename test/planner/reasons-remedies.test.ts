/**
 * Numbers in infeasibility reasons and remedies that work (issue 11 item 4 and the "by 0 mV"
 * report): misses print with three significant digits, a rail without any feed says the
 * headroom it lacks, and each remedy is offered only when re-planning with it applied makes
 * the rail feasible. Invented numbers.
 */
import { describe, expect, it } from 'vitest';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES, type Requirements, type StageKind } from '../../src-main/engine/model.ts';
import type { StageEvaluator } from '../../src-main/engine/planner/types.ts';
import type { Amps, Ratio, Volts } from '../../src-main/engine/units.ts';
import { firstOrderEvaluator } from './helpers/first-order-evaluator.ts';

function project(source: { vMin: number; vNom: number; vMax: number }, loads: { v: number; tol: number; i: number; domain?: string }[], kinds: StageKind[]): Requirements {
  return {
    meta: { name: 'reasons', description: 'invented', revision: 1 },
    sources: [{ id: 'in', name: 'Input', vNom: source.vNom as Volts, vMin: source.vMin as Volts, vMax: source.vMax as Volts, currentLimit: 5 as Amps }],
    domains: [
      { id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 as Volts },
      { id: 'iso', name: 'Iso', isolation: 'functional', workingVoltage: 60 as Volts },
    ],
    modes: [{ id: 'run', name: 'run', share: 1 as Ratio }],
    loads: loads.map((l, k) => ({
      id: `L${k}`, name: `load ${k}`, domainId: l.domain ?? 'main', voltage: l.v as Volts, tolerance: l.tol as Ratio,
      current: { run: l.i as Amps }, rippleLimit: 0.05 as Volts, noiseClass: 'standard' as const,
    })),
    limits: { ...DEFAULT_LIMITS },
    preferences: { ...DEFAULT_PREFERENCES, allowedKinds: kinds },
  };
}

describe('numbers in reasons', () => {
  it('prints a 0.39 mV window miss with its digits, not as "0 mV"', () => {
    // The first-order stages with every window pushed 0.39 mV past its upper limit.
    const shifted: StageEvaluator = {
      ...firstOrderEvaluator,
      windows(design, corners) {
        return firstOrderEvaluator.windows(design, corners).map((w) => ({ ...w, max: (w.allowedMax + 0.00039) as Volts, inside: false }));
      },
    };
    const req = project({ vMin: 10, vNom: 12, vMax: 14 }, [{ v: 3.3, tol: 0.05, i: 0.3 }], ['buck']);
    const r = new PlanSolver(req, { evaluator: shifted, budgetMs: 20_000 }).solve();
    expect(r.best).toBeNull();
    const text = r.infeasible.map((i) => i.text).join('\n');
    expect(text).toMatch(/by 390 µV/);
    expect(text).not.toMatch(/by 0 mV/);
  });

  it('says the headroom a 3.3 V ±1 % rail lacks on a 3.3 V source, with numbers', () => {
    const req = project({ vMin: 3.3, vNom: 3.3, vMax: 3.3 }, [{ v: 3.3, tol: 0.01, i: 0.2 }], ['buck', 'ldo']);
    const r = new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 20_000 }).solve();
    expect(r.best).toBeNull();
    const inf = r.infeasible[0]!;
    expect(inf.constraint).toBe('headroom');
    expect(inf.unit).toBe('V');
    expect(inf.text).toMatch(/3\.3 V ±1 %/);
    expect(inf.text).toMatch(/lowest 3\.3 V, headroom 0 V/);
  });
});

describe('remedies are verified', () => {
  it('offers "allow the coupled-winding buck" only where it makes the rail feasible', () => {
    // An isolated 5 V rail with only bucks and LDOs allowed: a coupled-winding buck can reach it.
    const iso = project({ vMin: 18, vNom: 24, vMax: 30 }, [{ v: 3.3, tol: 0.05, i: 0.3 }, { v: 5, tol: 0.1, i: 0.1, domain: 'iso' }], ['buck', 'ldo']);
    const a = new PlanSolver(iso, { evaluator: engineEvaluator(), budgetMs: 20_000 }).solve();
    expect(a.best).toBeNull();
    const isoRail = a.rails.find((x) => x.domainId === 'iso')!;
    const ia = a.infeasible.find((i) => i.railId === isoRail.id)!;
    expect(ia.remedies.join(' | ')).toMatch(/allow the coupled-winding buck/);
    // The remedy works: applied, the plan exists.
    iso.preferences.allowedKinds = ['buck', 'ldo', 'cwbuck'];
    expect(new PlanSolver(iso, { evaluator: engineEvaluator(), budgetMs: 20_000 }).solve().best).not.toBeNull();

    // A 3.3 V rail from a 3.3 V source: no coupled-winding buck can make it (its primary must
    // be below the input, and no bus fits under 0.6 × 3.3 V), so the remedy is not offered.
    const flat = project({ vMin: 3.3, vNom: 3.3, vMax: 3.3 }, [{ v: 3.3, tol: 0.01, i: 0.2 }], ['buck', 'ldo']);
    const b = new PlanSolver(flat, { evaluator: engineEvaluator(), budgetMs: 20_000 }).solve();
    const ib = b.infeasible[0]!;
    expect(ib.remedies.join(' | ')).not.toMatch(/coupled-winding/);
    expect(ib.remedies.join(' | ')).not.toMatch(/allow the LDO/);
  });

  it('carries target numbers on the tolerance remedy, and it works', () => {
    // ±0.2 % on a 1.8 V buck rail: the feedback network cannot hold it; relaxing to the
    // offered tolerance gives a plan.
    const req = project({ vMin: 10, vNom: 12, vMax: 14 }, [{ v: 1.8, tol: 0.002, i: 0.3 }], ['buck', 'ldo', 'cwbuck']);
    const r = new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 20_000 }).solve();
    expect(r.best).toBeNull();
    const rem = r.infeasible[0]!.remedies.find((x) => /relax the tolerance/.test(x));
    expect(rem, r.infeasible[0]!.remedies.join(' | ')).toBeDefined();
    const m = /to ±([0-9.]+) %/.exec(rem!)!;
    req.loads[0]!.tolerance = (Number(m[1]) / 100) as never;
    expect(new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 20_000 }).solve().best).not.toBeNull();
  });
});
