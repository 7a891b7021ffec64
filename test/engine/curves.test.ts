// Efficiency and loss curves (engine/curves.ts) from the real engine: the sweep's 100 % point
// at V nom is the roll-up's own evaluation of the stage (one number per quantity); every
// point keeps the energy balance and efficiency = pout / pin (definition, common practice);
// the input-voltage axis rises monotonically and carries the roll-up's own input voltages;
// the system sweep at the source's V min, nom and max equals the roll-up's three cases.
import { describe, expect, it } from 'vitest';
import { plan } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { randomRequirements } from '../../src-main/engine/planner/instances.ts';
import { groupRails } from '../../src-main/engine/rails.ts';
import { designOutputOrder, rollupPlan } from '../../src-main/engine/rollup.ts';
import { loadFractions, stageLoadSweep, stageReference, stageVinSweep, sweepAxis, systemVinSweep } from '../../src-main/engine/curves.ts';

const planned = [1, 2, 3].map((seed) => {
  const req = randomRequirements({ rails: 3, seed, isolatedShare: 0 });
  const result = plan(req, { evaluator: engineEvaluator(), budgetMs: 3000, singleObjective: true });
  return { req, best: result.best };
}).filter((x) => x.best);

describe('stage and system curves from the engine', () => {
  it('has planned trees to sweep', () => { expect(planned.length).toBeGreaterThan(0); });

  it('load sweep: 5–100 % in 20 points; at 100 % and V nom it is the roll-up\'s evaluation', () => {
    let checked = 0;
    for (const { req, best } of planned) {
      const rails = groupRails(req);
      const r = rollupPlan(req, rails, best!);
      for (const st of best!.stages) {
        const ids = designOutputOrder(st);
        const ref = stageReference(r, best!, rails, st.id, ids)!;
        expect(ref).not.toBeNull();
        const sweeps = stageLoadSweep(st.design, { iout: [ref.ioutByCase.min, ref.ioutByCase.nom, ref.ioutByCase.max], vin: [ref.vin.min, ref.vin.nom, ref.vin.max], ambient: req.limits.ambient, mode: ref.modeId });
        expect(sweeps).toHaveLength(3);
        const own = r.modes.find((m) => m.modeId === ref.modeId)!;
        (['min', 'nom', 'max'] as const).forEach((c, k) => {
          const pts = sweeps[k]!.points;
          expect(pts).toHaveLength(20);
          expect(pts[0]!.fraction).toBeCloseTo(0.05, 12);
          const full = pts[pts.length - 1]!;
          expect(full.fraction).toBe(1);
          const f = own.cases[c].stages.find((x) => x.stageId === st.id)!;
          // One number per quantity: the very same evaluation, not a near one.
          expect(full.loss).toBe(f.loss);
          expect(full.pin).toBe(f.pin);
          expect(full.efficiency).toBe(f.efficiency);
          for (const p of pts) {
            expect(p.efficiency).toBeCloseTo(p.pout / p.pin, 12);
            expect(Math.abs(p.pin - (p.pout + p.loss))).toBeLessThan(1e-9 * Math.max(1, p.pin));
            expect(p.efficiency).toBeGreaterThan(0);
            expect(p.efficiency).toBeLessThanOrEqual(1);
          }
          // Load rises along the sweep (the first output's current).
          for (let i = 1; i < pts.length; i++) expect(pts[i]!.iout[0]!).toBeGreaterThanOrEqual(pts[i - 1]!.iout[0]!);
        });
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(0);
  });

  it('input sweep: Vin rises monotonically over the range and holds the roll-up\'s own points', () => {
    for (const { req, best } of planned) {
      const rails = groupRails(req);
      const r = rollupPlan(req, rails, best!);
      for (const st of best!.stages) {
        const ref = stageReference(r, best!, rails, st.id, designOutputOrder(st))!;
        const d = st.design as { vinMin: number; vinMax: number };
        const lo = Math.min(d.vinMin, ref.vin.min);
        const hi = Math.max(d.vinMax, ref.vin.max);
        const pts = stageVinSweep(st.design, { iout: ref.iout, vinMin: lo, vinMax: hi, include: [ref.vin.min, ref.vin.nom, ref.vin.max], ambient: req.limits.ambient, mode: ref.modeId });
        expect(pts[0]!.vin).toBeCloseTo(lo, 12);
        expect(pts[pts.length - 1]!.vin).toBeCloseTo(hi, 12);
        for (let i = 1; i < pts.length; i++) expect(pts[i]!.vin).toBeGreaterThan(pts[i - 1]!.vin);
        const own = r.modes.find((m) => m.modeId === ref.modeId)!.cases.nom.stages.find((x) => x.stageId === st.id)!;
        const at = pts.find((p) => p.vin === ref.vin.nom)!;
        expect(at, 'the V nom input is a sweep point').toBeDefined();
        expect(at.loss).toBe(own.loss);
        for (const p of pts) expect(p.efficiency).toBeCloseTo(p.pout / p.pin, 12);
      }
    }
  });

  it('system sweep: at the source\'s min, nom and max it equals the roll-up\'s cases', () => {
    for (const { req, best } of planned) {
      const rails = groupRails(req);
      const r = rollupPlan(req, rails, best!);
      const src = req.sources.find((s) => best!.stages.some((st) => st.inputNodeId === s.id))!;
      for (const m of r.modes) {
        const pts = systemVinSweep(req, rails, best!, m.modeId, src.id);
        for (let i = 1; i < pts.length; i++) expect(pts[i]!.sourceVoltage).toBeGreaterThan(pts[i - 1]!.sourceVoltage);
        for (const [c, v] of [['min', src.vMin], ['nom', src.vNom], ['max', src.vMax]] as const) {
          const p = pts.find((x) => x.sourceVoltage === v)!;
          if (req.sources.length > 1 && c !== 'nom') continue; // other sources stay at nominal in the sweep
          expect(p.loss).toBeCloseTo(m.cases[c].loss, 12);
          expect(p.efficiency).toBeCloseTo(m.cases[c].efficiency, 12);
        }
        for (const p of pts) {
          expect(p.efficiency).toBeCloseTo(p.loadPower / p.sourcePower, 12);
          expect(Math.abs(p.sourcePower - (p.loadPower + p.loss))).toBeLessThan(1e-6 * p.sourcePower);
        }
      }
    }
  });

  it('axis helpers: fractions and a merged, sorted axis', () => {
    const f = loadFractions();
    expect(f).toHaveLength(20);
    expect(f[0]).toBeCloseTo(0.05, 12);
    expect(f[19]).toBe(1);
    expect(sweepAxis(10, 14, 5, [12, 11.5, 14])).toEqual([10, 11, 11.5, 12, 13, 14]);
    expect(sweepAxis(5, 5, 5)).toEqual([5]);
  });
});
