// Coupled-winding buck with the parasitics the independent ngspice grid showed: rectifier
// capacitance (leakage ring, peak charging at light load), leakage shared between
// secondaries wound together, the computed preload and the turn-on spike.
import { describe, expect, it } from 'vitest';
import { designStage, evaluateStage, type CoupledBuckDesign } from '../../../src-main/engine/stages/index.ts';
import { coupledPoint, mutualLeakage } from '../../../src-main/engine/stages/cwbuck/index.ts';
import { parseSpec } from '../../../src-main/engine/stages/stage-json.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../../src-main/engine/units.ts';

const o = (nodeId: string, voltage: number, currentMin: number, currentMax: number, tolerance = 0.08, rippleLimit = 0.1) =>
  ({ nodeId, voltage, tolerance, currentMin, currentMax, rippleLimit }) as StageSpec['outputs'][number];
// Invented: the planner's region, a low primary at high input with high-ratio secondaries.
const outs = [o('p5', 5, 0.1, 0.5, 0.03, 0.05), o('s15', 15, 0.002, 0.1), o('n15', -15, 0.002, 0.1)];
const base = { kind: 'cwbuck', vinMin: 24, vinNom: 30, vinMax: 36, fsw: 300e3, ambient: 40, tjMax: 125, ceramicDerating: 0.6, outputs: outs } as unknown as StageSpec;
// Schottky with 60 pF at 0 V (typical of a small SMD part, from memory).
const schottky = { is: 3e-6, n: 1.05, rs: 0.05, vfSpread: 0.1, cjo: 60e-12, vj: 0.35, m: 0.5 };

function design(s: StageSpec): CoupledBuckDesign {
  const r = designStage(s);
  if (!r.ok || r.design.kind !== 'cwbuck') throw new Error(`design failed: ${!r.ok ? r.flags.map((f) => f.text).join('; ') : ''}`);
  return r.design;
}
const op = (vin: number, iout: number[]) => ({ vin: vin as Volts, iout: iout as Amps[], ambient: 40 as Celsius });

describe('rectifier capacitance and the leakage ring', () => {
  it('a lightly loaded secondary is peak-charged above the capacitance-free value, and flagged with its numbers', () => {
    const d = design({ ...base, rectifier: schottky } as StageSpec);
    for (const w of d.secondaries) w.preload = null;
    const bare = structuredClone(d);
    for (const w of bare.secondaries) delete w.rectifier.cjo;
    const light = [0.5, 0.002, 0.002];
    const withC = evaluateStage(d, op(36, light));
    const without = evaluateStage(bare, op(36, light));
    expect(withC.outputs[1]!.voltage as number).toBeGreaterThan((without.outputs[1]!.voltage as number) * 1.03);
    const f = withC.flags.find((x) => x.code === 'outside-validated-region' && x.data?.nodeId === 's15');
    expect(f?.text).toMatch(/peak charging|ring/);
    expect(f?.text).toMatch(/\d/);
  });

  it('computes the preload: the smallest E24 resistor that keeps the lightest secondary in band and in continuous conduction', () => {
    const r = designStage({ ...base, rectifier: schottky } as StageSpec);
    if (!r.ok || r.design.kind !== 'cwbuck') throw new Error('design failed');
    const d = r.design;
    const light = [0.5, 0.002, 0.002];
    const at = evaluateStage(d, op(36, light));
    for (let i = 0; i < 2; i++) {
      const w = d.secondaries[i]!;
      expect(w.preload).not.toBeNull();
      const v = Math.abs(at.outputs[i + 1]!.voltage as number);
      expect(v).toBeLessThanOrEqual(15 * 1.08);
      expect(at.flags.some((x) => x.code === 'outside-validated-region' && x.data?.nodeId === w.nodeId && /stops/.test(x.text))).toBe(false);
      // One E24 step larger (less current) no longer does.
      const weaker = structuredClone(d);
      const pw = weaker.secondaries[i]!;
      pw.preload = { resistance: (w.preload!.resistance * 1.1) as never, current: (15 / (w.preload!.resistance * 1.1)) as never };
      const p = coupledPoint(weaker, 36, light, { detail: 'voltages' });
      const s = p.sec[i]!;
      expect(s.vsec > 15 * 1.08 || s.tc < 0.999 * p.toff).toBe(true);
    }
    expect(r.reasons.some((x) => /preload .* mW\), the smallest E24 value/.test(x))).toBe(true);
  });

  it('without a known capacitance the 2 % preload rule stays (results unchanged)', () => {
    const d = design({ ...base, outputs: [outs[0]!, o('s15', 15, 0.001, 0.1), outs[2]!] } as StageSpec);
    expect(d.secondaries[0]!.preload!.current).toBeGreaterThanOrEqual(0.02 * 0.1 * 0.95);
    expect(d.secondaries[0]!.preload!.current).toBeLessThanOrEqual(0.02 * 0.1 * 1.1);
  });

  it('rates the rectifier for the turn-on spike, 3 × the plateau n·(Vin,max − Vpri) + |Vout| or more', () => {
    const d = design({ ...base, rectifier: schottky } as StageSpec);
    for (const w of d.secondaries) {
      const n = Math.abs(w.turns) / d.primaryTurns;
      expect(w.rectifierReverseVoltage as number).toBeGreaterThanOrEqual(2.9 * (n * (36 - 5) + 15));
    }
  });

  it('refuses a rectifier model with a bad field, naming it', () => {
    const r = designStage({ ...base, rectifier: { ...schottky, cjo: -1 } } as StageSpec);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.flags[0]!.text).toMatch(/rectifier\.cjo/);
  });
});

describe('secondaries wound together', () => {
  it('shared leakage (k_ij above k_i·k_j) lowers loaded secondaries; the star value changes nothing', () => {
    const star = design(base);
    const k = star.secondaries[0]!.coupling;
    const same = structuredClone(star);
    same.secondaryCoupling = [[1, k * k], [k * k, 1]];
    expect(mutualLeakage(same)).toBeNull();
    const tight = structuredClone(star);
    tight.secondaryCoupling = [[1, 0.999], [0.999, 1]];
    const full = [0.5, 0.1, 0.1];
    const a = evaluateStage(star, op(30, full)).outputs;
    const b = evaluateStage(same, op(30, full)).outputs;
    const c = evaluateStage(tight, op(30, full)).outputs;
    expect(b[1]!.voltage).toBe(a[1]!.voltage);
    expect(Math.abs(c[1]!.voltage as number)).toBeLessThan(Math.abs(a[1]!.voltage as number));
  });

  it('refuses a coupling matrix no passive magnetic has, and one of the wrong size', () => {
    const bad = designStage({ ...base, coupling: 0.9, secondaryCoupling: [[1, 0.2], [0.2, 1]] } as StageSpec);
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.flags[0]!.text).toMatch(/secondaryCoupling: .*positive definite/);
    const size = designStage({ ...base, secondaryCoupling: [[1]] } as StageSpec);
    expect(size.ok).toBe(false);
    if (!size.ok) expect(size.flags[0]!.text).toMatch(/secondaryCoupling: must be 2×2/);
  });

  it('the stage file reads both fields and names a bad one', () => {
    expect(() => parseSpec({ ...base, rectifier: { is: 1e-6, bogus: 1 } })).toThrow(/rectifier\.bogus/);
    const s = parseSpec({ ...base, rectifier: schottky, secondaryCoupling: [[1, 0.999], [0.999, 1]] });
    expect(s.rectifier?.cjo).toBe(60e-12);
    expect(s.secondaryCoupling?.[0]?.[1]).toBe(0.999);
  });
});
