/**
 * The planner with the boost, four-switch buck-boost, inverting, isolated-module and
 * load-switch kinds: each is chosen where it is the kind a power engineer uses, with a reason
 * that carries the deciding numbers, and allowing a kind is offered as a remedy only when it
 * gives a plan. Small invented boards (every number invented); real stage engine, generic parts.
 * The reach of a buck is Vin·Dmax (Erickson & Maksimović, *Fundamentals of Power Electronics*,
 * ch. 2: Vout = D·Vin), of a boost Vin/(1 − D) above its input (same chapter).
 */
import { describe, expect, it } from 'vitest';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES, STAGE_KINDS, type Load, type Requirements, type StageKind } from '../../src-main/engine/model.ts';
import { rollupPlan } from '../../src-main/engine/rollup.ts';
import { groupRails } from '../../src-main/engine/rails.ts';
import { GENERIC_DEFAULTS } from '../../src-main/engine/stages/defaults.ts';
import type { PlanResult, PlanStage } from '../../src-main/engine/plan-types.ts';
import { checkPlan } from './helpers/check-plan.ts';

type L = Omit<Partial<Load>, 'voltage' | 'current' | 'tolerance'> & { id: string; voltage: number; tolerance?: number; current: Record<string, number> };

function board(o: {
  source: { vMin: number; vNom: number; vMax: number };
  loads: L[];
  kinds?: readonly StageKind[];
  domains?: Requirements['domains'];
  modes?: Requirements['modes'];
}): Requirements {
  return {
    meta: { name: 'invented board', description: 'invented for a planner test', revision: 1 },
    sources: [{ id: 'in', name: 'Input', vMin: o.source.vMin, vNom: o.source.vNom, vMax: o.source.vMax, currentLimit: 5 }] as Requirements['sources'],
    domains: o.domains ?? [{ id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 }] as Requirements['domains'],
    modes: o.modes ?? [{ id: 'run', name: 'Run', share: 1 }] as Requirements['modes'],
    loads: o.loads.map((l) => ({ name: l.id, domainId: 'main', tolerance: 0.05, rippleLimit: 0.05, noiseClass: 'standard', ...l })) as Requirements['loads'],
    limits: { ...DEFAULT_LIMITS },
    preferences: { ...DEFAULT_PREFERENCES, weights: { ...DEFAULT_PREFERENCES.weights }, allowedKinds: [...(o.kinds ?? STAGE_KINDS)] },
  };
}

function planOf(req: Requirements): PlanResult {
  return new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 60_000 }).solve();
}

function feederOf(res: PlanResult, loadId: string): PlanStage {
  const rail = res.rails.find((r) => r.loadIds.includes(loadId))!;
  return res.best!.stages.find((s) => s.outputs.some((o) => o.nodeId === rail.id))!;
}

const reasonFor = (res: PlanResult, loadId: string, code: string) => {
  const rail = res.rails.find((r) => r.loadIds.includes(loadId))!;
  return res.best!.reasons.find((r) => r.subjectId === rail.id && r.code === code)?.text ?? '';
};

describe('planner with the new stage kinds', () => {
  it('makes 12 V on a 9–36 V board with a four-switch buck-boost, saying why a buck cannot', () => {
    const req = board({ source: { vMin: 9, vNom: 24, vMax: 36 }, loads: [{ id: 'v12', voltage: 12, current: { run: 0.2 } }] });
    const res = planOf(req);
    expect(res.best, JSON.stringify(res.infeasible)).not.toBeNull();
    expect(checkPlan(req, res, res.best!, engineEvaluator())).toEqual([]);
    expect(feederOf(res, 'v12').kind).toBe('buck-boost-4s');
    // A buck's output stays below Dmax·Vin: 12 V needs 12/Dmax at least, above the 9 V minimum.
    const reach = 12 / GENERIC_DEFAULTS.controller.maxDuty;
    expect(reach).toBeGreaterThan(9);
    const why = reasonFor(res, 'v12', 'feed-buck-boost-4s');
    expect(why).toContain('four-switch buck-boost, because a buck cannot reach 12 V below');
    expect(why).toContain(`${Math.round(reach * 1000) / 1000} V input`);
    expect(why).toContain('the input falls to 9 V');
  }, 120_000);

  it('makes 12 V from a 5 V source with a boost, and offers "allow boost" only because it verified-ly plans', () => {
    const loads: L[] = [{ id: 'v12', voltage: 12, current: { run: 0.15 } }];
    const src = { vMin: 4.75, vNom: 5, vMax: 5.25 };
    const res = planOf(board({ source: src, loads }));
    expect(res.best, JSON.stringify(res.infeasible)).not.toBeNull();
    expect(feederOf(res, 'v12').kind).toBe('boost');
    // The rail's lowest value 12 V × 0.95 = 11.4 V is above the input's highest 5.25 V.
    expect(reasonFor(res, 'v12', 'feed-boost')).toContain("boost, because the rail's lowest 11.4 V is above the input's highest 5.25 V");
    // Without the new kinds there is no plan; the remedies name the boost (checked by re-planning).
    const old = planOf(board({ source: src, loads, kinds: ['buck', 'cwbuck', 'ldo'] }));
    expect(old.best).toBeNull();
    const remedies = old.infeasible.flatMap((i) => i.remedies);
    expect(remedies).toContain('allow the boost stage kind');
    // An inverting stage cannot make a positive rail: allowing it would not help, so it is not offered.
    expect(remedies.some((r) => r.includes('inverting'))).toBe(false);
  }, 120_000);

  it('makes a negative non-isolated rail with an inverting buck-boost when no coupled winding is allowed', () => {
    const req = board({
      source: { vMin: 10.8, vNom: 12, vMax: 13.2 }, kinds: ['buck', 'ldo', 'inverting'],
      loads: [{ id: 'v5', voltage: 5, current: { run: 0.3 } }, { id: 'n5', voltage: -5, current: { run: 0.05 } }],
    });
    const res = planOf(req);
    expect(res.best, JSON.stringify(res.infeasible)).not.toBeNull();
    expect(checkPlan(req, res, res.best!, engineEvaluator())).toEqual([]);
    expect(feederOf(res, 'n5').kind).toBe('inverting');
    expect(reasonFor(res, 'n5', 'feed-inverting')).toMatch(/is a negative rail without isolation: inverting buck-boost from .*duty [0-9.]+ % at Vin min/);
  }, 120_000);

  it('feeds a small isolated domain from a fixed-ratio isolated module, with the barrier on the stage', () => {
    const domains = [
      { id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 },
      { id: 'bus', name: 'Fieldbus', isolation: 'functional', workingVoltage: 50 },
    ] as Requirements['domains'];
    const iso5: L = { id: 'iso5', voltage: 5, tolerance: 0.15, domainId: 'bus', current: { run: 0.05 } };
    // From a 5 V input no coupled-winding stage can run (no primary bus below 0.6 × 4.75 V):
    // the module is the feed.
    const req = board({ source: { vMin: 4.75, vNom: 5, vMax: 5.25 }, domains, loads: [iso5] });
    const res = planOf(req);
    expect(res.best, JSON.stringify(res.infeasible)).not.toBeNull();
    expect(checkPlan(req, res, res.best!, engineEvaluator())).toEqual([]);
    const st = feederOf(res, 'iso5');
    expect(st.kind).toBe('iso-module');
    expect(st.barriers).toEqual([{ fromDomainId: 'main', toDomainId: 'bus', isolation: 'functional', workingVoltage: 50 }]);
    expect(reasonFor(res, 'iso5', 'feed-iso-module')).toMatch(/fixed-ratio isolated module .* rated 1 W, ratio 1, functional isolation for 60 V working \(the domain asks functional, 50 V\)/);
    // With a 3.3 V main rail a coupled-winding stage (3.3 V primary, 5 V secondary) also
    // serves it; the module is then a scored alternative, named with its figures.
    const both = planOf(board({ source: { vMin: 4.75, vNom: 5, vMax: 5.25 }, domains, loads: [{ id: 'v33', voltage: 3.3, current: { run: 0.2 } }, iso5] }));
    expect(both.best).not.toBeNull();
    const choice = reasonFor(both, 'iso5', 'feed-choice');
    if (feederOf(both, 'iso5').kind !== 'iso-module') expect(choice).toMatch(/an isolated module from Input was feasible but scores [0-9.]+ per rail/);
  }, 120_000);

  it('passes a rail gated off in sleep through a load switch from the always-on rail of the same voltage', () => {
    const req = board({
      source: { vMin: 10.8, vNom: 12, vMax: 13.2 },
      modes: [{ id: 'run', name: 'Run', share: 0.3 }, { id: 'sleep', name: 'Sleep', share: 0.7 }] as Requirements['modes'],
      loads: [
        { id: 'aon', voltage: 3.3, tolerance: 0.03, current: { run: 0.2, sleep: 0.01 } },
        // A separate rail (own key) of the same voltage that draws nothing in sleep.
        { id: 'gated', voltage: 3.3, tolerance: 0.05, railKey: 'gated', current: { run: 0.3, sleep: 0 } },
      ],
    });
    const res = planOf(req);
    expect(res.best, JSON.stringify(res.infeasible)).not.toBeNull();
    expect(checkPlan(req, res, res.best!, engineEvaluator())).toEqual([]);
    const st = feederOf(res, 'gated');
    expect(st.kind).toBe('load-switch');
    expect((st.design as { offModes: string[] }).offModes).toEqual(['sleep']);
    expect(reasonFor(res, 'gated', 'feed-load-switch')).toContain('a load switch, off in Sleep where the rail draws nothing');
    // Roll-up: in sleep the switch passes nothing and draws only its off-state current.
    const roll = rollupPlan(req, groupRails(req), res.best!);
    const sleep = roll.modes.find((m) => m.modeId === 'sleep')!.cases.nom.stages.find((s) => s.stageId === st.id)!;
    expect(sleep.pout).toBe(0);
    expect(sleep.loss).toBeLessThan(1e-5);
  }, 120_000);
});
