// The system versus source voltage (systemSourceSweep), versus its load (systemLoadSweep), and the rail windows per operating mode
// (modeWindows), on the demo's hand plan (invented scenario), with the real stage engine.
import { describe, expect, it } from 'vitest';
import { CurveError, LOAD_SCALES, systemLoadSweep, systemSourceSweep } from '../../src-main/engine/curves.ts';
import { modeWindows, rollupCaseAt, rollupPlan } from '../../src-main/engine/rollup.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { demoHandPlan } from '../export/demo-plan.ts';

const req = demoDocument().requirements;
const pr = demoHandPlan(req);
const plan = pr.best!;
const r = rollupPlan(req, pr.rails, plan);
const src = req.sources.find((s) => plan.stages.some((st) => st.inputNodeId === s.id))!;

describe('system versus source voltage', () => {
  const sw = systemSourceSweep(req, pr.rails, plan, src.id);

  it('one series per mode over the source range, its min, nominal and max among the points', () => {
    expect(sw.modes.map((m) => m.modeId)).toEqual(req.modes.map((m) => m.id));
    expect(sw.skipped).toEqual([]);
    for (const m of sw.modes) {
      const vs = m.points.map((p) => p.v);
      expect(vs.length).toBeGreaterThanOrEqual(21);
      expect(Math.min(...vs)).toBe(src.vMin);
      expect(Math.max(...vs)).toBe(src.vMax);
      expect(vs).toContain(src.vNom);
      for (let k = 1; k < vs.length; k++) expect(vs[k]!).toBeGreaterThan(vs[k - 1]!);
    }
  });

  it('efficiency = output power / input power from the per-stage figures at each voltage', () => {
    for (const m of sw.modes) {
      for (const p of m.points) {
        const c = rollupCaseAt(req, pr.rails, plan, m.modeId, { [src.id]: p.v });
        // Input power: the stages fed by the source (each stage's own Pin).
        const pin = plan.stages.filter((st) => st.inputNodeId === src.id)
          .reduce((s, st) => s + c.stages.find((f) => f.stageId === st.id)!.pin, 0);
        // Output power: each rail's load current (requirements) at the voltage its stage delivers.
        let pout = 0;
        for (const rail of pr.rails) {
          const o = c.stages.flatMap((f) => f.outputs).find((x) => x.nodeId === rail.id);
          if (o) pout += Math.abs(o.v) * Math.abs(rail.current[m.modeId] ?? 0);
        }
        // Definition of efficiency (common practice): eta = Pout / Pin; I = P / V at the source.
        expect(p.efficiency).toBeCloseTo(pout / pin, 9);
        expect(p.sourceCurrent).toBeCloseTo(pin / p.v, 9);
        // Energy balance (common practice): input = loads + every stage's loss.
        const losses = c.stages.reduce((s, f) => s + f.loss, 0);
        expect(Math.abs(pin - (pout + losses)) / pin).toBeLessThan(1e-6);
      }
    }
  });

  it('at V min, nom and max the points are the roll-up\'s own cases (one number per quantity)', () => {
    for (const m of sw.modes) {
      const mr = r.modes.find((x) => x.modeId === m.modeId)!;
      for (const [v, c] of [[src.vMin, 'min'], [src.vNom, 'nom'], [src.vMax, 'max']] as const) {
        const p = m.points.find((x) => x.v === v)!;
        expect(p.efficiency).toBeCloseTo(mr.cases[c].efficiency, 12);
        expect(p.sourceCurrent).toBeCloseTo(mr.cases[c].sources[src.id]!.i, 12);
      }
    }
  });

  it('refuses an unknown source with a message naming the field', () => {
    expect(() => systemSourceSweep(req, pr.rails, plan, 'no-such-source')).toThrow(CurveError);
    expect(() => systemSourceSweep(req, pr.rails, plan, 'no-such-source')).toThrow(/sourceId/);
  });
});

describe('rail windows per operating mode', () => {
  const mw = modeWindows(req, pr.rails, plan, r);

  it('one set per mode, the same nodes as the roll-up windows, every corner evaluated', () => {
    expect(mw.map((m) => m.modeId)).toEqual(r.modes.map((m) => m.modeId));
    for (const m of mw) {
      expect(m.rows.map((w) => w.nodeId)).toEqual(r.windows.map((w) => w.nodeId));
      for (const w of m.rows) expect(w.proved).toBe(true);
    }
  });

  it("each mode's window holds the voltage the roll-up evaluates in that mode at V min, nom and max", () => {
    // A worst-case window over the tolerance corners contains the nominal-tolerance operating
    // point at the same input and load (common practice for corner analysis).
    for (const m of mw) {
      const mr = r.modes.find((x) => x.modeId === m.modeId)!;
      for (const w of m.rows) {
        for (const c of ['min', 'nom', 'max'] as const) {
          const n = mr.cases[c].nodes[w.nodeId];
          if (!n) continue;
          expect(n.v).toBeGreaterThanOrEqual(Math.min(w.min, w.max) - 1e-9);
          expect(n.v).toBeLessThanOrEqual(Math.max(w.min, w.max) + 1e-9);
        }
      }
    }
  });

  it('the roll-up marks a coupled-winding output (default sweep) and what it feeds as not proved', () => {
    const cw = plan.stages.filter((st) => st.kind === 'cwbuck').map((st) => st.id);
    for (const w of r.windows) if (cw.includes(w.stageId)) expect(w.proved).toBe(false);
    expect(cw.length).toBeGreaterThan(0);
    const cwNodes = new Set(r.windows.filter((w) => cw.includes(w.stageId)).map((w) => w.nodeId));
    const fedByCw = r.windows.filter((w) => cwNodes.has(plan.stages.find((st) => st.id === w.stageId)!.inputNodeId));
    expect(fedByCw.length).toBeGreaterThan(0);
    for (const w of fedByCw) expect(w.proved).toBe(false);
    for (const w of r.windows) if (!cw.includes(w.stageId) && plan.stages.find((st) => st.id === w.stageId)!.inputNodeId === src.id) expect(w.proved).toBe(true);
  });
});

describe('system versus its load', () => {
  const sw = systemLoadSweep(req, pr.rails, plan);

  it('one series per mode, 10 % to 150 % of every load, the loads as specified among the points', () => {
    expect(sw.skipped).toEqual([]);
    expect(sw.modes.map((m) => m.modeId)).toEqual(req.modes.map((m) => m.id));
    expect(LOAD_SCALES).toContain(1);
    for (const m of sw.modes) expect(m.points.map((p) => p.scale)).toEqual([...LOAD_SCALES]);
  });

  it('at factor 1 each point is the roll-up\'s V nom case of its mode (the Budget figures)', () => {
    for (const m of sw.modes) {
      const p = m.points.find((x) => x.scale === 1)!;
      const c = r.modes.find((x) => x.modeId === m.modeId)!.cases.nom;
      expect(p.sourcePower).toBe(c.sourcePower);
      expect(p.loadPower).toBe(c.loadPower);
      expect(p.loss).toBe(c.loss);
      expect(p.efficiency).toBe(c.efficiency);
    }
  });

  it('balances the books at every point and grows the load power with the factor', () => {
    for (const m of sw.modes) {
      for (const p of m.points) {
        // Conservation of energy: power in = power to the loads + losses.
        expect(Math.abs(p.sourcePower - (p.loadPower + p.loss)) / p.sourcePower).toBeLessThan(1e-9);
      }
      // Load power is Σ V·I over the rails: with every I scaled up it rises (the rail
      // voltages move by at most their tolerance, far less than 10 % steps).
      for (let k = 1; k < m.points.length; k++) expect(m.points[k]!.loadPower).toBeGreaterThan(m.points[k - 1]!.loadPower);
    }
  });
});
