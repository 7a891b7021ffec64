// Roll-up: energy conservation (to 1e-9 relative), leaves-up currents, hand arithmetic for
// one mode, time weighting, thermal table, windows, and clear refusals of broken plans.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { handRequirements } from '../export/hand-plan.ts';
import { designedHandPlan } from '../export/hand-designs.ts';
import { bigPlan, bigRequirements } from '../export/big-plan.ts';
import { clearRollupCache, rollupPlan, RollupError, STAGE_MODELS, VIN_CASES, type Rollup } from '../../src-main/engine/rollup.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';
import type { LdoDesign } from '../../src-main/engine/stages/index.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { demoHandPlan } from '../export/demo-plan.ts';

/**
 * Energy books rebuilt from the pieces: source power (Σ pin of stages fed by a source) must
 * equal Σ over rails of |V delivered|·I load plus Σ stage losses (conservation of energy).
 */
function worstImbalance(req: Requirements, pr: PlanResult, r: Rollup): number {
  let worst = 0;
  for (const m of r.modes) for (const c of VIN_CASES) {
    const k = m.cases[c];
    const src = k.stages.filter((s) => req.sources.some((x) => x.id === pr.best!.stages.find((st) => st.id === s.stageId)!.inputNodeId)).reduce((a, s) => a + s.pin, 0);
    const loads = pr.rails.reduce((a, rail) => a + Math.abs(k.nodes[rail.id]!.v) * (rail.current[m.modeId] ?? 0), 0);
    const losses = k.stages.reduce((a, s) => a + s.loss, 0);
    worst = Math.max(worst, Math.abs(src - (loads + losses)) / src);
  }
  return worst;
}

describe('roll-up energy balance', () => {
  it('conserves energy to 1e-9 relative in every mode and input case (hand plan)', () => {
    const req = handRequirements();
    const pr = designedHandPlan(req);
    const r = rollupPlan(req, pr.rails, pr.best!);
    expect(worstImbalance(req, pr, r)).toBeLessThan(1e-9);
    expect(r.worstBalanceError).toBeLessThan(1e-9);
  });

  it('conserves energy for a 60-load generated project with chained stages', () => {
    const req = bigRequirements(60);
    const pr = bigPlan(req);
    const r = rollupPlan(req, pr.rails, pr.best!);
    expect(pr.best!.stages.length).toBeGreaterThan(20);
    expect(r.unfed).toEqual([]);
    expect(worstImbalance(req, pr, r)).toBeLessThan(1e-9);
  });

  it('conserves energy whatever the load currents (property test)', () => {
    const req0 = handRequirements();
    const pr = designedHandPlan(req0);
    fc.assert(fc.property(fc.array(fc.double({ min: 0.05, max: 1, noNaN: true }), { minLength: 5, maxLength: 5 }), (scale) => {
      const req = structuredClone(req0);
      const rails = structuredClone(pr.rails);
      rails.forEach((rail, i) => { for (const k of Object.keys(rail.current)) rail.current[k] = (rail.current[k]! * scale[i]!) as never; });
      const r = rollupPlan(req, rails, pr.best!);
      expect(worstImbalance(req, { ...pr, rails }, r)).toBeLessThan(1e-9);
    }), { numRuns: 15 });
  });
});

describe('roll-up arithmetic', () => {
  const req = handRequirements();
  const pr = designedHandPlan(req);
  const r = rollupPlan(req, pr.rails, pr.best!);
  const run = r.modes.find((m) => m.modeId === 'run')!;
  const idle = r.modes.find((m) => m.modeId === 'idle')!;
  const stage = (id: string) => run.cases.nom.stages.find((s) => s.stageId === id)!;

  it('evaluates from the leaves up: a stage delivers its rails\' loads plus its downstream stages\' input', () => {
    const buck = stage('st-buck-3v3');
    expect(buck.outputs[0]!.i).toBeCloseTo(0.4, 12); // Controller core, Run: 0.4 A (the invented requirement)
    const cw = stage('st-cw-5v');
    const ldo = stage('st-ldo-5q');
    const tap = cw.outputs.find((o) => o.nodeId === 'tap:sense:6v5')!;
    expect(tap.i).toBeCloseTo(ldo.iin, 12);
    // The LDO runs from the tap voltage the coupled-winding stage delivers.
    expect(ldo.vin).toBeCloseTo(tap.v, 9);
  });

  it('agrees with hand arithmetic for the Run mode', () => {
    // Hand arithmetic, Run mode, nominal 24 V input (invented test plan):
    //   LDO (common practice, DESIGN.md §4): P = (Vin − Vout)·Iout + Vin·Iq, Iin = Iout + Iq.
    //   With Vin = tap voltage Vt, Vout = 5 V target, Iout = 20 mA (Converter reference, Run):
    //   P = (Vt − 5)·0.02 + Vt·Iq.
    const ldo = stage('st-ldo-5q');
    const d = pr.best!.stages.find((s) => s.id === 'st-ldo-5q')!.design as LdoDesign;
    const vt = ldo.vin;
    const vo = ldo.outputs[0]!.v;
    expect(vo).toBeCloseTo(5, 1);
    expect(ldo.loss).toBeCloseTo((vt - vo) * 0.02 + vt * d.iq, 9);
    expect(ldo.iin).toBeCloseTo(0.02 + d.iq, 9);
    //   Loads at their nominal voltages: 3.3·0.4 + 5·0.3 + 12·0.04 + 12·0.03 + 5·0.02
    //   = 1.32 + 1.5 + 0.48 + 0.36 + 0.1 = 3.76 W. Every rail sits inside its tolerance
    //   (±5 %, ±5 %, ±10 %, ±10 %, ±2 %), so the delivered load power lies within
    //   3.76 ∓ (0.066 + 0.075 + 0.048 + 0.036 + 0.002) = 3.76 ∓ 0.227 W.
    expect(run.cases.nom.loadPower).toBeGreaterThan(3.76 - 0.227);
    expect(run.cases.nom.loadPower).toBeLessThan(3.76 + 0.227);
    //   Source current = source power / 24 V; efficiency = load power / source power.
    const s = run.cases.nom.sources.src!;
    expect(s.i).toBeCloseTo(s.p / 24, 12);
    expect(run.cases.nom.efficiency).toBeCloseTo(run.cases.nom.loadPower / run.cases.nom.sourcePower, 12);
    //   At 18 V the source must deliver at least the same power, so at least 24/18 of the current
    //   less the loss difference: I(18 V) > I(24 V) (a falling input raises the current).
    expect(run.cases.min.sources.src!.i).toBeGreaterThan(s.i);
    expect(run.cases.max.sources.src!.i).toBeLessThan(s.i);
  });

  it('weights modes by their share of time (0.7 Run + 0.3 Idle)', () => {
    const w = r.weighted;
    expect(w.loss).toBeCloseTo(0.7 * run.cases.nom.loss + 0.3 * idle.cases.nom.loss, 12);
    expect(w.sourcePower).toBeCloseTo(0.7 * run.cases.nom.sourcePower + 0.3 * idle.cases.nom.sourcePower, 12);
    expect(w.sourceCurrent.src!.min).toBeCloseTo(0.7 * run.cases.min.sources.src!.i + 0.3 * idle.cases.min.sources.src!.i, 12);
    const ws = w.stages.find((x) => x.stageId === 'st-buck-3v3')!;
    expect(ws.efficiency).toBeCloseTo(ws.pout / ws.pin, 12);
  });

  it('lists every dissipating part at its hottest point with Tj = Ta + P·θJA and its margin', () => {
    expect(r.thermal.length).toBeGreaterThanOrEqual(4 + 4 + 3 + 1);
    for (const t of r.thermal) {
      // θJA definition (JEDEC JESD51-2): Tj − Ta = P·θJA.
      expect(t.tj).toBeCloseTo(req.limits.ambient + t.power * t.thetaJA, 9);
      expect(t.margin).toBeCloseTo(req.limits.tjMax - req.limits.tjMargin - t.tj, 9);
      // No mode or input case runs the part hotter than the row says.
      for (const m of r.modes) for (const c of VIN_CASES) {
        const p = m.cases[c].stages.find((s) => s.stageId === t.stageId)!.parts.find((x) => x.role === t.role)!;
        expect(p.tj).toBeLessThanOrEqual(t.tj + 1e-12);
      }
    }
  });

  it('checks each rail\'s worst-case window against the rail tolerance', () => {
    for (const rail of pr.rails) {
      const w = r.windows.find((x) => x.nodeId === rail.id)!;
      expect(w.allowedMin).toBeCloseTo(rail.voltage - rail.tolerance * Math.abs(rail.voltage), 12);
      expect(w.allowedMax).toBeCloseTo(rail.voltage + rail.tolerance * Math.abs(rail.voltage), 12);
      expect(w.inside).toBe(Math.min(w.min, w.max) >= w.allowedMin && Math.max(w.min, w.max) <= w.allowedMax);
      // The nominal operating point lies inside the worst-case window.
      const v = run.cases.nom.nodes[rail.id]!.v;
      expect(v).toBeGreaterThanOrEqual(Math.min(w.min, w.max) - 1e-9);
      expect(v).toBeLessThanOrEqual(Math.max(w.min, w.max) + 1e-9);
    }
  });
});

describe('roll-up cache', () => {
  it('reuses stage results for the same design and point, and forgets them on request', () => {
    const req = handRequirements();
    const pr = designedHandPlan(req);
    let calls = 0;
    const models = {
      evaluate: (d: Parameters<typeof STAGE_MODELS.evaluate>[0], op: Parameters<typeof STAGE_MODELS.evaluate>[1]) => { calls++; return STAGE_MODELS.evaluate(d, op); },
      windows: STAGE_MODELS.windows,
    };
    const a = rollupPlan(req, pr.rails, pr.best!, models);
    const first = calls;
    expect(first).toBeGreaterThan(0);
    const b = rollupPlan(req, pr.rails, pr.best!, models);
    expect(calls).toBe(first);
    expect(b.weighted).toEqual(a.weighted);
    clearRollupCache();
    rollupPlan(req, pr.rails, pr.best!, models);
    expect(calls).toBe(2 * first);
  });
});

describe('source current limit', () => {
  it('flags a source asked for more than its limit, at its worst mode and input case', () => {
    const req = handRequirements();
    const pr = designedHandPlan(req);
    expect(rollupPlan(req, pr.rails, pr.best!).sourceOverloads).toEqual([]);
    req.sources[0]!.currentLimit = 0.15 as never;
    const r = rollupPlan(req, pr.rails, pr.best!);
    expect(r.sourceOverloads).toHaveLength(1);
    const o = r.sourceOverloads[0]!;
    // The worst case is the heaviest mode at the lowest input (most current for the same power).
    expect(o.modeName).toBe('Run');
    expect(o.vinCase).toBe('min');
    expect(o.current).toBeCloseTo(r.modes.find((m) => m.modeId === 'run')!.cases.min.sources.src!.i, 12);
    expect(o.text).toMatch(/24 V input must deliver .* A in mode "Run" at Vin min \(18 V\), above its 0.15 A limit/);
  });
});

describe('roll-up refusals', () => {
  it('names a stage without a design, a loop, and an unknown input node', () => {
    const req = handRequirements();
    const pr = designedHandPlan(req);
    const noDesign = structuredClone(pr.best!);
    noDesign.stages[0]!.design = null;
    expect(() => rollupPlan(req, pr.rails, noDesign)).toThrow(/st-buck-3v3.*no design/);
    // A loop: the coupled-winding stage fed from the LDO's rail, which the LDO makes from its tap.
    const loop = structuredClone(pr.best!);
    loop.stages[1]!.inputNodeId = loop.stages[2]!.outputs[0]!.nodeId;
    expect(() => rollupPlan(req, pr.rails, loop)).toThrow(/loop/);
    const twice = structuredClone(pr.best!);
    twice.stages[2]!.outputs.push({ nodeId: 'tap:sense:6v5', role: 'output' });
    expect(() => rollupPlan(req, pr.rails, twice)).toThrow(RollupError);
    const garbled = structuredClone(pr.best!);
    (garbled.stages[0]!.design as { outputs: unknown[] }).outputs = [];
    expect(() => rollupPlan(req, pr.rails, garbled)).toThrow(/st-buck-3v3 \(Buck 3V3\): iout/);
    const bad = structuredClone(pr.best!);
    bad.stages[0]!.inputNodeId = 'nowhere';
    expect(() => rollupPlan(req, pr.rails, bad)).toThrow(/nowhere/);
  });
});

describe('roll-up of the demonstration project (hand-made plan, see demo-plan.ts)', () => {
  const req = demoDocument().requirements;
  const pr = demoHandPlan(req);
  const r = rollupPlan(req, pr.rails, pr.best!);
  const measure = r.modes.find((m) => m.modeId === 'measure')!;
  const c = measure.cases.nom;
  const f = (id: string) => c.stages.find((s) => s.stageId === id)!;

  it('agrees with hand arithmetic for the Measure mode at 24 V', () => {
    // Loads at their nominal voltages, Measure mode (demo requirements):
    //   main 12 V·0.080 = 0.960   main 5 V·0.060 = 0.300   main 3.3 V·0.085 = 0.2805
    //   main 1.8 V·0.030 = 0.054  main 1.2 V·0.120 = 0.144
    //   front end 12 V·0.025 = 0.300, 12 V·0.020 = 0.240, 5 V·0.015 = 0.075,
    //             4.096 V·0.003 = 0.012288, 3.3 V·0.014 = 0.0462
    //   fieldbus 5 V·0.060 = 0.300, 3.3 V·0.024 = 0.0792
    //   Σ = 2.791188 W.
    // Each delivered voltage may sit anywhere in its window; allowing every rail its full
    // tolerance gives a band of Σ tol·V·I = 0.0960 + 0.0150 + 0.0140 + 0.0027 + 0.00432
    //   + 0.0150 + 0.0120 + 0.0015 + 0.000123 + 0.00231 + 0.0150 + 0.00396 = 0.18191 W;
    // the 12 V relay winding may fall below its tolerance (its window is outside ±10 %), so
    // the band is checked on the low side with that rail's own delivered voltage.
    const v12 = Math.abs(c.nodes[pr.rails.find((x) => x.name === 'Main 12V')!.id]!.v);
    expect(c.loadPower).toBeLessThan(2.791188 + 0.18191);
    expect(c.loadPower).toBeGreaterThan(2.791188 - 0.18191 - Math.max(0, (12 * 0.9 - v12) * 0.08));
    // The 3.3 V buck carries the 3.3 V loads (0.085 A) plus both LDOs' inputs
    // (0.030 + Iq and 0.120 + Iq): 0.235 A + 2·Iq.
    const iqs = (['ldo-1v8', 'ldo-1v2'] as const).map((id) => (pr.best!.stages.find((s) => s.id === id)!.design as LdoDesign).iq);
    expect(f('buck-3v3').outputs[0]!.i).toBeCloseTo(0.085 + 0.03 + 0.12 + iqs[0]! + iqs[1]!, 12);
    // LDO 1V2 from the 3.3 V rail: P = (Vin − 1.2)·0.12 + Vin·Iq (common practice).
    const l12 = f('ldo-1v2');
    expect(l12.loss).toBeCloseTo((l12.vin - 1.2) * 0.12 + l12.vin * iqs[1]!, 6);
    // Source: current = power / 24 V; efficiency = loads / source.
    expect(c.sources['dc-in']!.i).toBeCloseTo(c.sourcePower / 24, 12);
    expect(c.efficiency).toBeCloseTo(c.loadPower / c.sourcePower, 12);
    // Shares 0.80 / 0.15 / 0.05 weight the modes.
    const [m, t, s] = (['measure', 'transmit', 'standby'] as const).map((id) => r.modes.find((x) => x.modeId === id)!.cases.nom);
    expect(r.weighted.loadPower).toBeCloseTo(0.8 * m!.loadPower + 0.15 * t!.loadPower + 0.05 * s!.loadPower, 12);
  });

  it('conserves energy and reports the windows that miss honestly', () => {
    expect(worstImbalance(req, pr, r)).toBeLessThan(1e-9);
    const ref = r.windows.find((w) => w.name.includes('4V096'))!;
    // 4.096 V ±2 %: allowed 4.01408 … 4.17792 V (hand arithmetic: 4.096 × 0.98, × 1.02).
    expect(ref.allowedMin).toBeCloseTo(4.01408, 9);
    expect(ref.allowedMax).toBeCloseTo(4.17792, 9);
    // The window the roll-up reports is the one the stage engine computes, judged against that band.
    expect(ref.inside).toBe(ref.min >= ref.allowedMin && ref.max <= ref.allowedMax);
  });
});
