/**
 * One tap winding feeding several LDOs, and the magnetics-per-isolated-domain design limit
 * (issue 11, items 2 and 3), with the real stage engine on small invented projects.
 *
 * Outside sources: an LDO's input current is its output current plus its ground (quiescent)
 * current, and its pass element dissipates (Vin − Vout)·Iout [common practice; any linear
 * regulator data sheet]. The tap-voltage rule is the stated space of docs/planner.md.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES, type Load, type Requirements } from '../../src-main/engine/model.ts';
import type { Amps, Hertz, Ratio, Volts } from '../../src-main/engine/units.ts';
import { groupRails } from '../../src-main/engine/rails.ts';
import { BlockFactory, enumerateShapes, MAX_SHARED_TAP_RAILS, sharedTapGroups, spaceSize } from '../../src-main/engine/planner/candidates.ts';
import { generationOptions } from '../../src-main/engine/planner/remedies.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { inventedCostModel } from '../../src-main/engine/planner/cost-model.ts';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { randomRequirements } from '../../src-main/engine/planner/instances.ts';
import { validateRequirements } from '../../src-main/engine/validate.ts';
import type { BlockShape } from '../../src-main/engine/planner/types.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';
import { IndependentOracle } from './helpers/independent-oracle.ts';

const load = (id: string, name: string, domainId: string, v: number, tol: number, i: number, ripple: number, noise: Load['noiseClass'] = 'standard'): Load => ({
  id, name, domainId, voltage: v as Volts, tolerance: tol as Ratio, current: { run: i as Amps }, rippleLimit: ripple as Volts, noiseClass: noise,
});

/**
 * Invented: a 12 V board with a 5 V logic rail and a small isolated sensor domain holding a
 * quiet 5 V (±2 %) and a 3.3 V (±2 %) rail. The quiet rail must sit behind an LDO and may not
 * feed the standard 3.3 V rail, and the 3.3 V winding misses ±2 % directly, so both need an
 * LDO behind a tap: two tap windings, or one tap winding shared by both LDOs.
 */
function sensorBoard(): Requirements {
  return {
    meta: { name: 'shared tap board (invented)', description: 'Invented example for the shared tap winding', revision: 1 },
    sources: [{ id: 'in', name: 'Input 12V', vNom: 12 as Volts, vMin: 10 as Volts, vMax: 14 as Volts, currentLimit: 5 as Amps }],
    domains: [
      { id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 as Volts },
      { id: 'iso', name: 'Sensor', isolation: 'functional', workingVoltage: 60 as Volts },
    ],
    modes: [{ id: 'run', name: 'run', share: 1 as Ratio }],
    loads: [
      load('P', 'Logic 5V', 'main', 5, 0.05, 0.3, 0.05),
      load('A', 'Sensor 5V', 'iso', 5, 0.02, 0.04, 0.005, 'quiet'),
      load('B', 'Sensor 3V3', 'iso', 3.3, 0.02, 0.03, 0.01),
    ],
    limits: { ...DEFAULT_LIMITS },
    preferences: { ...DEFAULT_PREFERENCES, maxSecondaries: 2, allowedKinds: ['buck', 'cwbuck', 'ldo'], switchingFrequency: 400e3 as Hertz },
  };
}

const plan = (req: Requirements, objective: 'balanced' | 'loss' | 'parts' = 'balanced'): PlanResult =>
  new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 60_000, objective, singleObjective: true }).solve();

/** Coupled-winding stages of a plan and the LDOs fed from each internal tap node. */
function taps(r: PlanResult): { windings: number[]; ldosPerTap: number[] } {
  const best = r.best!;
  const cw = best.stages.filter((s) => s.kind === 'cwbuck');
  const tapIds = best.internalNodes.filter((n) => n.kind === 'tap').map((n) => n.id);
  return {
    windings: cw.map((s) => (s.design as { secondaries: unknown[] }).secondaries.length),
    ldosPerTap: tapIds.map((id) => best.stages.filter((s) => s.kind === 'ldo' && s.inputNodeId === id).length),
  };
}

describe('shared tap winding: candidate generation', () => {
  it('lists every 2…4-rail group of one isolated domain and sign, each shape within maxSecondaries windings, and spaceSize counts them', () => {
    const req = sensorBoard();
    req.loads.push(load('C', 'Sensor 12V', 'iso', 12, 0.05, 0.02, 0.05), load('N', 'Sensor -12V', 'iso', -12, 0.05, 0.02, 0.05), load('Q', 'Bus 5V', 'main', 5.5, 0.05, 0.01, 0.05));
    req.domains.push({ id: 'iso2', name: 'Fieldbus', isolation: 'functional', workingVoltage: 60 as Volts });
    req.loads.push(load('F', 'Fieldbus 5V', 'iso2', 5, 0.05, 0.05, 0.05));
    req.preferences.maxSecondaries = 3;
    const rails = groupRails(req);
    const f = new BlockFactory(req, rails, engineEvaluator(), inventedCostModel());
    const groups = sharedTapGroups(f);
    // Positive Sensor rails: 12 V, 5 V, 3.3 V → C(3,2) + C(3,3) = 4 groups; −12 V and the
    // fieldbus 5 V are alone in their (domain, sign) class; non-isolated rails never share.
    expect(groups).toHaveLength(4);
    for (const g of groups) {
      expect(g.length).toBeGreaterThanOrEqual(2);
      expect(g.length).toBeLessThanOrEqual(MAX_SHARED_TAP_RAILS);
      expect(new Set(g.map((i) => rails[i]!.domainId))).toEqual(new Set(['iso']));
      expect(g.every((i) => rails[i]!.voltage > 0)).toBe(true);
    }
    const opts = generationOptions(req, true);
    const e = enumerateShapes(f, opts);
    const keys = new Set<string>();
    let count = e.singles.length;
    for (let k = 1; k <= opts.maxSecondaries; k++) for (const s of e.coupled(k)) { keys.add(BlockFactory.shapeKey(s)); count++; }
    let shared = 0;
    for (const alone of [true, false]) {
      for (const s of e.shared(alone)) {
        const c = s as BlockShape & { kind: 'cwbuck' };
        expect(c.sharedTap!.every((x) => c.secondaries.includes(x))).toBe(true);
        const windings = c.secondaries.length - c.sharedTap!.length + 1;
        expect(windings).toBeLessThanOrEqual(opts.maxSecondaries);
        if (alone) expect(windings).toBe(1);
        keys.add(BlockFactory.shapeKey(s));
        shared++;
        count++;
      }
    }
    // Per primary and group: 1 + (others) + C(others, 2) shapes with 0, 1, 2 other windings.
    const n = rails.length;
    const perGroup = (others: number) => 1 + others + (others * (others - 1)) / 2;
    const expected = e.primaries.reduce((a, p) => a + groups.reduce((b, g) => b + perGroup(n - (p.primary === null ? 0 : 1) - g.length), 0), 0);
    expect(shared).toBe(expected);
    expect(keys.size).toBe(count - e.singles.length);
    expect(spaceSize(f, opts).candidates).toBe(count);
  });

  it('offers no shared tap without the LDO kind', () => {
    const req = sensorBoard();
    req.preferences.allowedKinds = ['buck', 'cwbuck'];
    const f = new BlockFactory(req, groupRails(req), engineEvaluator(), inventedCostModel());
    expect([...enumerateShapes(f, generationOptions(req, true)).shared(true)]).toEqual([]);
  });
});

describe('shared tap winding: design and choice (real engine)', () => {
  it('sets the tap for the highest rail, carries the sum of the LDO input currents and reports each rail through its LDO', () => {
    const req = sensorBoard();
    const rails = groupRails(req);
    const ev = engineEvaluator();
    const f = new BlockFactory(req, rails, ev, inventedCostModel());
    const p = rails.findIndex((r) => r.loadIds.includes('P'));
    const a = rails.findIndex((r) => r.loadIds.includes('A'));
    const b = rails.findIndex((r) => r.loadIds.includes('B'));
    const g = [a, b].sort((x, y) => x - y);
    const res = f.evaluate({ kind: 'cwbuck', input: { kind: 'source', id: 'in' }, primary: p, secondaries: g, sharedTap: g });
    expect(res.ok).toBe(true);
    if (!res.ok) return;
    const e = res.eval;
    const cw = e.stages.find((s) => s.kind === 'cwbuck')!;
    expect((cw.design as { secondaries: unknown[] }).secondaries).toHaveLength(1);
    // The first tap choice (±10 %, 1 V headroom) for the 5 V rail: (5 + 1) / 0.9 = 6.667 → 6.7 V.
    const tap = e.internalNodes.find((n) => n.kind === 'tap')!;
    expect(tap.voltage).toBeCloseTo(6.7, 9);
    const ldos = e.stages.filter((s) => s.kind === 'ldo');
    expect(ldos.map((s) => s.inputNode)).toEqual([tap.id, tap.id]);
    // The winding's current is the sum of the two LDOs' input currents (output + ground current).
    let sum = 0;
    for (const l of ldos) {
      const iout = l.modeCurrents![0]![0]!;
      const x = ev.evaluate(l.design, { vin: 6.7 as Volts, iout: [iout as Amps], ambient: req.limits.ambient });
      expect(Math.abs(x.iin)).toBeGreaterThanOrEqual(iout);
      // Pass-element dissipation (Vin − Vout)·Iout, plus at most the ground current's share.
      const vout = Math.abs((l.design as { outputs: { voltage: number }[] }).outputs[0]!.voltage);
      expect(l.lossPerMode![0]!).toBeGreaterThanOrEqual((6.7 - vout) * iout * (1 - 1e-9));
      expect(l.lossPerMode![0]!).toBeLessThanOrEqual((6.7 - vout) * iout + 6.7 * (Math.abs(x.iin) - iout) + 1e-9);
      sum += Math.abs(x.iin);
    }
    expect(cw.modeCurrents![0]![1]!).toBeCloseTo(sum, 12);
    expect(sum).toBeGreaterThanOrEqual(0.04 + 0.03);
    // Each rail's window is its LDO's, inside its ±2 % band.
    for (const r of [rails[a]!, rails[b]!]) {
      const w = e.windows.find((x) => x.nodeId === r.id)!;
      expect(w.min).toBeGreaterThanOrEqual(r.voltage * 0.98);
      expect(w.max).toBeLessThanOrEqual(r.voltage * 1.02);
    }
    // The 3.3 V LDO's reason states the shared tap, the highest rail it is set for and its own headroom.
    const why = e.reasons.find((x) => x.subjectId === rails[b]!.id && x.code === 'winding-tap-ldo')!;
    expect(why.text).toMatch(/6\.7 V tap winding .* shared with Sensor 5V/);
    expect(why.text).toMatch(/set for Sensor 5V/);
    expect(why.text).toMatch(/this LDO has 2\.73 V headroom/);
  });

  it('chooses one shared tap when parts count most and two taps when loss does; both proved and equal to the independent oracle', () => {
    const req = sensorBoard();
    const parts = plan(req, 'parts');
    const loss = plan(req, 'loss');
    expect(parts.stats.provedOptimal && loss.stats.provedOptimal).toBe(true);
    // Fewest parts: one winding (one rectifier, its capacitors and preload fewer) feeding both LDOs.
    expect(taps(parts)).toEqual({ windings: [1], ldosPerTap: [2] });
    // Lowest loss: each LDO from its own tap (the 3.3 V LDO drops 1.5 V instead of 3.4 V).
    expect(taps(loss)).toEqual({ windings: [2], ldosPerTap: [1, 1] });
    expect(parts.best!.score.parts).toBeLessThan(loss.best!.score.parts);
    expect(loss.best!.score.loss).toBeLessThan(parts.best!.score.loss);
    for (const [objective, r] of [['parts', parts], ['loss', loss]] as const) {
      const o = new IndependentOracle(req, inventedCostModel()).best(objective, { maxMs: 60_000 });
      expect(o.complete).toBe(true);
      expect(Math.abs(o.bestScore - r.best!.score.weighted), `${objective}: oracle ${o.bestFeeds?.join('; ')}`).toBeLessThanOrEqual(1e-7 * Math.max(1, o.bestScore));
    }
  }, 120_000);
});

describe('magnetics per isolated domain (design limit)', () => {
  it('validates the limit by field', () => {
    for (const bad of [0, 1.5, 9, Number.NaN]) {
      const req = sensorBoard();
      req.limits.maxMagneticsPerIsolatedDomain = bad;
      const problems = validateRequirements(req);
      expect(problems.map((p) => p.path), String(bad)).toContain('limits.maxMagneticsPerIsolatedDomain');
    }
    const ok = sensorBoard();
    ok.limits.maxMagneticsPerIsolatedDomain = 2;
    expect(validateRequirements(ok).map((p) => p.path)).not.toContain('limits.maxMagneticsPerIsolatedDomain');
  });

  it('names the domain and the count when the limit leaves no tree, and offers the raised limit only after re-planning with it', () => {
    // Invented random instance (seed 3045): Iso B holds two rails no one magnetic can serve together.
    const req = randomRequirements({ rails: 4, seed: 3045, maxSecondaries: 2, isolatedShare: 0.6 });
    const r = plan(req);
    expect(r.best).toBeNull();
    const inf = r.infeasible.find((x) => x.constraint === 'magnetics-per-domain')!;
    expect(inf.text).toMatch(/Iso B would be reached through 2 magnetics \(Coupled-winding buck .*, Coupled-winding buck .*\), above the limit of 1 per isolated domain in the design limits/);
    expect(inf.shortfall).toBe(1);
    expect(inf.remedies).toContain('allow 2 magnetics into each isolated domain (Iso B needs them) in the design limits (now 1)');
    // The remedy holds: with two allowed, a tree exists and two magnetics cross into Iso B.
    const raised = plan({ ...req, limits: { ...req.limits, maxMagneticsPerIsolatedDomain: 2 } });
    expect(raised.best).not.toBeNull();
    const crossing = raised.best!.stages.filter((s) => s.barriers.some((b) => b.toDomainId === 'isoB'));
    expect(crossing).toHaveLength(2);
    // Within the limit of one, three windings per magnetic give a tree: one magnetic serves
    // both isolated domains (Iso A and Iso B each crossed once).
    const wider = plan({ ...req, preferences: { ...req.preferences, maxSecondaries: 3 } });
    expect(wider.best).not.toBeNull();
    for (const d of ['isoA', 'isoB']) expect(wider.best!.stages.filter((s) => s.barriers.some((b) => b.toDomainId === d)), d).toHaveLength(1);
  }, 120_000);
});
