// The numerical periodic steady state of the coupled-winding buck's switching cycle
// (src-main/engine/stages/cwbuck/pss.ts): its limits against the closed form and a textbook
// ideal-transformer result, its energy balance, and how the evaluation uses it.
import { describe, expect, it } from 'vitest';
import { designStage, evaluateStage, type CoupledBuckDesign } from '../../../src-main/engine/stages/index.ts';
import { coupledPoint, numericPoint, pssCircuit, regionFlags } from '../../../src-main/engine/stages/cwbuck/index.ts';
import { solvePss } from '../../../src-main/engine/stages/cwbuck/pss.ts';
import { diodeVf } from '../../../src-main/engine/stages/defaults.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Ohms, Volts } from '../../../src-main/engine/units.ts';

const o = (nodeId: string, voltage: number, currentMin: number, currentMax: number, tolerance = 0.08, rippleLimit = 0.1) =>
  ({ nodeId, voltage, tolerance, currentMin, currentMax, rippleLimit }) as StageSpec['outputs'][number];
// Invented stage: a 5 V primary at 24–36 V with a 15 V secondary.
const outs = [o('p5', 5, 0.1, 0.5, 0.03, 0.05), o('s15', 15, 0.002, 0.1)];
const base = { kind: 'cwbuck', vinMin: 24, vinNom: 30, vinMax: 36, fsw: 300e3, ambient: 40, tjMax: 125, ceramicDerating: 0.6, outputs: outs } as unknown as StageSpec;
// Schottky with 60 pF at 0 V (typical of a small SMD part, from memory).
const schottky = { is: 3e-6, n: 1.05, rs: 0.05, vfSpread: 0.1, cjo: 60e-12, vj: 0.35, m: 0.5 };

function design(s: StageSpec): CoupledBuckDesign {
  const r = designStage(s);
  if (!r.ok || r.design.kind !== 'cwbuck') throw new Error('design failed');
  for (const w of r.design.secondaries) w.preload = null;
  return r.design;
}

describe('numerical periodic steady state of the switching cycle', () => {
  it('in continuous conduction with a small rectifier capacitance it agrees with the closed form (1 %)', () => {
    const d = design({ ...base, rectifier: { ...schottky, cjo: 2e-12 } } as StageSpec);
    for (const vin of [24, 36]) {
      const iout = [0.5, 0.1];
      const p = coupledPoint(d, vin, iout, { numeric: false });
      expect(p.sec[0]!.tc).toBeGreaterThanOrEqual(0.999 * p.toff); // the closed form's own region
      const r = solvePss(pssCircuit(d, vin, iout, p));
      expect(r.converged).toBe(true);
      // The closed form (index.ts header: first-order RL loop of the leakage, resistance and
      // rectifier over the off-time) is the continuous-conduction limit of the same circuit.
      expect(Math.abs(r.sec[0]!.vout / p.sec[0]!.vsec - 1)).toBeLessThan(0.01);
      expect(Math.abs(r.sec[0]!.iavg / 0.1 - 1)).toBeLessThan(5e-4); // its charge-balance tolerance, 2e-4
      expect(Math.abs(r.duty / p.duty - 1)).toBeLessThan(0.01);
    }
  });

  it('with a nearly ideal magnetic the secondary is n·Voff less the rectifier drop (ideal coupled inductor)', () => {
    // Erickson & Maksimović, Fundamentals of Power Electronics (coupled inductors, ch. 13):
    // with full coupling the secondary winding carries n times the primary winding's voltage,
    // so a rectified secondary conducting in the off-time sits at n·Voff − Vf.
    const d = design({ ...base, coupling: 0.9995, rectifier: { ...schottky, cjo: 1e-12 } } as StageSpec);
    d.primaryResistance = 1e-3 as Ohms;
    d.highSide.rdsOn = 1e-3;
    d.lowSide.rdsOn = 1e-3;
    d.rdsHotFactor = 1;
    for (const w of d.secondaries) w.resistance = 1e-3 as Ohms;
    const vin = 30;
    const iout = [0.5, 0.05];
    const p = coupledPoint(d, vin, iout, { numeric: false });
    const r = solvePss(pssCircuit(d, vin, iout, p));
    expect(r.converged).toBe(true);
    const n = Math.abs(d.secondaries[0]!.turns) / d.primaryTurns;
    const ic = 0.05 / (1 - p.duty); // the rectifier's current while it conducts
    const ideal = n * p.vpri - diodeVf(d.secondaries[0]!.rectifier, ic);
    expect(Math.abs(r.sec[0]!.vout / ideal - 1)).toBeLessThan(0.01);
  });

  it('closes its energy balance at light load, where the ring peak-charges the output', () => {
    // Conservation of energy over a periodic orbit (Tellegen's theorem; every inductance and
    // capacitance returns what it stored): what enters at the switch node leaves through the
    // outputs and the resistive and rectifier losses.
    const d = design({ ...base, rectifier: schottky } as StageSpec);
    const iout = [0.5, 0.01];
    const p = coupledPoint(d, 36, iout, { numeric: false });
    const r = solvePss(pssCircuit(d, 36, iout, p));
    expect(r.converged).toBe(true);
    expect(Math.abs(r.energyOut / r.energyIn - 1)).toBeLessThan(0.005);
    // Peak charging: above what the capacitance-free cycle gives at the same load.
    const bare = structuredClone(d);
    bare.secondaries[0]!.rectifier.cjo = 5e-12;
    const q = solvePss(pssCircuit(bare, 36, iout, coupledPoint(bare, 36, iout, { numeric: false })));
    expect(r.sec[0]!.vout).toBeGreaterThan(q.sec[0]!.vout);
  });

  it('the evaluation uses it where the closed form stops, and flags a point whose ring phase decides the output', () => {
    const d = design({ ...base, rectifier: schottky } as StageSpec);
    const op = (iout: number[]) => ({ vin: 36 as Volts, iout: iout as Amps[], ambient: 40 as Celsius });
    // It runs exactly where the closed form's own region test fails.
    for (const [vin, iout] of [[24, [0.5, 0.1]], [36, [0.5, 0.1]], [24, [0.5, 0.003]]] as [number, number[]][]) {
      const q = coupledPoint(d, vin, iout, { numeric: false });
      const cfMiss = regionFlags(d, q).some((f) => f.code === 'outside-validated-region' && f.data?.nodeId === 's15');
      numericPoint(d, vin, iout, q);
      expect(q.numeric !== undefined, `Vin ${vin} V, ${iout[1]} A`).toBe(cfMiss);
    }
    // Light load: it runs; each secondary is either covered (no flag) or flagged with numbers.
    const ev = evaluateStage(d, op([0.5, 0.003]));
    const p = coupledPoint(d, 36, [0.5, 0.003], { numeric: false });
    numericPoint(d, 36, [0.5, 0.003], p);
    expect(p.numeric).toBeDefined();
    const flagged = ev.flags.some((f) => f.code === 'outside-validated-region' && f.data?.nodeId === 's15');
    expect(flagged).toBe(!p.numeric!.covered[0]);
    if (flagged) expect(ev.flags.find((f) => f.code === 'outside-validated-region' && f.data?.nodeId === 's15')!.text).toMatch(/numerical switching-cycle model .*\d/);
    else expect(Math.abs(ev.outputs[1]!.voltage as number)).toBeCloseTo(p.numeric!.vout[0]!, 6);
    // Switched off, the closed form everywhere.
    const cf = coupledPoint(d, 36, [0.5, 0.003], { numeric: false });
    expect(cf.numeric).toBeUndefined();
  });

  it('a singular inductance matrix (no magnetic) is an error, not a result', () => {
    const d = design({ ...base, rectifier: schottky } as StageSpec);
    const p = coupledPoint(d, 30, [0.5, 0.1], { numeric: false });
    const c = pssCircuit(d, 30, [0.5, 0.1], p);
    c.L = [[1e-5, 1e-5], [1e-5, 1e-5]];
    expect(() => solvePss(c)).toThrow(/singular/);
  });
});
