// Stage curves swept with the real stage engine on the demo's hand plan (invented scenario).
import { describe, expect, it } from 'vitest';
import { stageCurves, CurveError } from '../../src-main/engine/curves.ts';
import { rollupPlan } from '../../src-main/engine/rollup.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { demoHandPlan } from '../export/demo-plan.ts';

const req = demoDocument().requirements;
const pr = demoHandPlan(req);
const plan = pr.best!;
const r = rollupPlan(req, pr.rails, plan);

describe('stage curves (real evaluateStage)', () => {
  for (const st of plan.stages) {
    it(`${st.id} (${st.kind}): efficiency = pout/pin, sweep passes through the roll-up figure, Vin axis monotone`, () => {
      const c = stageCurves(plan, r, st.id, req.limits.ambient);
      expect(c.load.length).toBeGreaterThanOrEqual(1);
      const all = [...c.load.flatMap((s) => s.points), ...c.input.points];
      expect(all.length).toBeGreaterThan(10);
      for (const p of all) {
        // Definition of efficiency (common practice): eta = Pout / Pin; loss = Pin - Pout.
        expect(p.efficiency).toBeCloseTo(p.pout / p.pin, 9);
        expect(p.loss).toBeCloseTo(p.pin - p.pout, 9);
      }
      // One number per quantity: the Vin sweep at the nominal input equals the roll-up's figure.
      const at = c.input.points.find((p) => p.vin === c.operating.vin)!;
      expect(at).toBeDefined();
      const mode = r.modes.find((m) => m.modeId === c.operating.modeId)!;
      const fig = mode.cases.nom.stages.find((f) => f.stageId === st.id)!;
      expect(at.loss).toBe(fig.loss);
      expect(at.efficiency).toBe(fig.efficiency);
      // Vin axis strictly increasing, from the case minimum to the case maximum.
      const v = c.input.points.map((p) => p.vin);
      for (let k = 1; k < v.length; k++) expect(v[k]!).toBeGreaterThan(v[k - 1]!);
      expect(v[0]).toBe(c.vinRange.min);
      expect(v[v.length - 1]).toBe(c.vinRange.max);
      // Load axis: 5 % … 100 % of the largest load, increasing.
      for (const s of c.load) {
        expect(s.points[0]!.fraction).toBeCloseTo(0.05, 12);
        expect(s.points[s.points.length - 1]!.fraction).toBe(1);
        for (let k = 1; k < s.points.length; k++) expect(s.points[k]!.iout).toBeGreaterThan(s.points[k - 1]!.iout);
      }
    });
  }

  it('loss grows with load on a buck (conduction losses rise with current, common practice)', () => {
    const buck = plan.stages.find((s) => s.kind === 'buck')!;
    const c = stageCurves(plan, r, buck.id, req.limits.ambient);
    const pts = c.load[0]!.points;
    expect(pts[pts.length - 1]!.loss).toBeGreaterThan(pts[0]!.loss);
  });

  it('names the field when the stage does not exist', () => {
    expect(() => stageCurves(plan, r, 'no-such-stage', 25)).toThrow(CurveError);
    expect(() => stageCurves(plan, r, 'no-such-stage', 25)).toThrow(/stageId/);
  });
});
