import { describe, expect, it } from 'vitest';
import { designStage, evaluateStage, stageWindows, type CoupledBuckDesign } from '../../../src-main/engine/stages/index.ts';
import { coupledOutputs, coupledPoint } from '../../../src-main/engine/stages/cwbuck/index.ts';
import { diodeVf } from '../../../src-main/engine/stages/defaults.ts';
import { magneticSpec } from '../../../src-main/engine/magnetics.ts';
import { buckNetlist, coupledBuckNetlist } from '../../../src-main/export/spice.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../../src-main/engine/units.ts';

const o = (nodeId: string, voltage: number, currentMin: number, currentMax: number, tolerance = 0.08, rippleLimit = 0.1) =>
  ({ nodeId, voltage, tolerance, currentMin, currentMax, rippleLimit }) as StageSpec['outputs'][number];
const base = { kind: 'cwbuck', vinMin: 18, vinNom: 24, vinMax: 32, fsw: 400e3, ambient: 40, tjMax: 125, ceramicDerating: 0.6 } as const;
const spec = (outputs: StageSpec['outputs'], over: Record<string, unknown> = {}) => ({ ...base, outputs, ...over }) as StageSpec;
const op = (vin: number, iout: number[]) => ({ vin: vin as Volts, iout: iout as Amps[], ambient: 40 as Celsius });

function design(s: StageSpec): CoupledBuckDesign {
  const r = designStage(s);
  if (!r.ok || r.design.kind !== 'cwbuck') throw new Error(`design failed: ${!r.ok ? r.flags.map((f) => f.text).join('; ') : ''}`);
  return r.design;
}

const three = spec([o('p5', 5, 0.05, 0.5, 0.03, 0.05), o('p12', 12, 0.01, 0.15), o('n12', -12, 0.01, 0.1), o('iso5', 5, 0, 0.2)]);

describe('coupled-winding buck designer', () => {
  it('chooses integer turns that put every secondary within tolerance at mid load, sign = winding sense', () => {
    const d = design(three);
    expect(Number.isInteger(d.primaryTurns)).toBe(true);
    expect(d.secondaries.map((w) => Math.sign(w.turns))).toEqual([1, -1, 1]);
    const mid = d.outputs.map((x) => (x.currentMin + x.currentMax) / 2);
    const ev = evaluateStage(d, op(24, mid));
    d.outputs.forEach((x, i) => {
      expect(Math.sign(ev.outputs[i]!.voltage)).toBe(Math.sign(x.voltage));
      expect(Math.abs(ev.outputs[i]!.voltage - x.voltage) / Math.abs(x.voltage)).toBeLessThanOrEqual(x.tolerance);
    });
  });
  it('where the tolerance leaves room, the chosen turns keep the whole worst-case window inside', () => {
    const d = design(three);
    const ws = stageWindows(d, { vin: [18, 24, 32] as Volts[], iout: d.outputs.map((x) => ({ min: x.currentMin, max: x.currentMax })) });
    expect(ws[0]!.inside).toBe(true); // regulated primary: reference ±1 %, E96 ±1 % (common practice worst case)
    expect(ws[1]!.inside).toBe(true);
    expect(ws[2]!.inside).toBe(true);
    // the unloaded isolated winding cannot: its window says so instead of the designer refusing
    expect(ws[3]!.inside).toBe(false);
    expect(ws[3]!.max).toBeGreaterThan(ws[3]!.allowedMax);
  });
  it('uses the smallest primary turns that fit: one fewer primary turn cannot hit the targets as well', () => {
    const d = design(three);
    expect(d.primaryTurns).toBeGreaterThanOrEqual(3);
    // ideal ratio check: n ≈ (|Vsec| + Vf)/Vpri within one turn (DESIGN.md §4: Vsec = n·Vpri − Vf)
    d.secondaries.forEach((w, i) => {
      const target = (Math.abs(d.outputs[i + 1]!.voltage) + diodeVf(w.rectifier, d.outputs[i + 1]!.currentMax)) / d.divider.vout;
      expect(Math.abs(Math.abs(w.turns) - target * d.primaryTurns)).toBeLessThanOrEqual(1.5);
    });
  });
  it('sizes Lp for ≈30–40 % magnetizing ripple (after the E12 step) at Vin max, full load', () => {
    const d = design(three);
    const p = coupledPoint(d, 32, d.outputs.map((x) => x.currentMax));
    // ΔIm/Im near the 35 % target; E12 steps are ≈ ±10 % (common practice ripple target)
    expect(p.dim / p.im).toBeGreaterThan(0.25);
    expect(p.dim / p.im).toBeLessThan(0.5);
    // Im = Ipri + Σ n·Isec (DESIGN.md §4, derived)
    expect(p.im).toBeCloseTo(0.5 + p.sec.reduce((a, s) => a + s.n * s.isec, 0), 6);
  });
  it('energy balance is exact and every loss term is separate', () => {
    const d = design(three);
    const ev = evaluateStage(d, op(24, [0.5, 0.15, 0.1, 0.2]));
    expect(ev.pin).toBeCloseTo(ev.pout + ev.loss, 12);
    expect(ev.loss).toBeCloseTo(Object.values(ev.lossBreakdown).reduce((a, b) => a + b, 0), 12);
    for (const k of ['hs-conduction', 'ls-conduction', 'rectifiers', 'secondary-copper', 'primary-copper', 'magnetic-core', 'preload']) {
      expect(ev.lossBreakdown[k], k).toBeGreaterThan(0);
    }
    expect(ev.parts.filter((p) => p.role.startsWith('rectifier')).length).toBe(3);
  });
  it('loaded secondary: the leakage limit of the model is DESIGN.md §4\'s 2·Llk·fsw·Isec/(1−D)² term', () => {
    // Loose coupling and no resistance: τ = Llk/Rt ≫ Toff, so the off-time current is a ramp
    // and E = n·Voff − Vsec − V0 approaches 2·Llk·fsw·Isec/(1−D)² (derived, DESIGN.md §4).
    const d0 = design(spec([o('p5', 5, 0.05, 0.3, 0.03, 0.05), o('s12', 12, 0.05, 0.1, 0.15)]));
    const d: CoupledBuckDesign = { ...d0, lowSide: { ...d0.lowSide, rdsOn: 0 }, primaryResistance: 0 as never,
      secondaries: d0.secondaries.map((w) => ({ ...w, coupling: 0.9, resistance: 0 as never, rectifier: { ...w.rectifier, rs: 0, n: 1e-6 }, preload: null })) };
    const p = coupledPoint(d, 24, [0.3, 0.1]);
    const s = p.sec[0]!;
    const leakageTerm = (2 * s.llk * d.fsw * s.isec) / (1 - p.duty) ** 2;
    const drop = s.n * p.voff - s.vsec;
    expect(s.tau).toBeGreaterThan(20 * p.toff);
    // The closed form leaves out the charge the leakage still delivers while its current
    // decays after the high side turns on, so the model's drop is somewhat smaller.
    expect(drop / leakageTerm).toBeGreaterThan(0.8);
    expect(drop / leakageTerm).toBeLessThanOrEqual(1.0);
  });
  it('loaded secondary: the resistive limit of the model is R·Isec/(1−D) (DESIGN.md §4)', () => {
    const d0 = design(spec([o('p5', 5, 0.05, 0.3, 0.03, 0.05), o('s12', 12, 0.05, 0.1, 0.15)]));
    const d: CoupledBuckDesign = { ...d0, lowSide: { ...d0.lowSide, rdsOn: 0 }, primaryResistance: 0 as never,
      secondaries: d0.secondaries.map((w) => ({ ...w, coupling: 0.99999, resistance: 1 as never, rectifier: { ...w.rectifier, rs: 0, n: 1e-6 }, preload: null })) };
    const p = coupledPoint(d, 24, [0.3, 0.1]);
    const s = p.sec[0]!;
    expect(s.tau).toBeLessThan(p.toff / 50);
    // τ ≪ Toff: flat-topped current Isec/(1−D) through R (derived, DESIGN.md §4)
    expect((s.n * p.voff - s.vsec) / ((1 * s.isec) / (1 - p.duty))).toBeCloseTo(1, 2);
  });
  it('specifies a preload where a secondary may run unloaded and the window shows the light-load rise', () => {
    const d = design(three);
    const iso = d.secondaries[2]!;
    expect(iso.preload).not.toBeNull();
    const ws = stageWindows(d, { vin: [18, 24, 32] as Volts[], iout: d.outputs.map((x) => ({ min: x.currentMin, max: x.currentMax })) });
    const light = evaluateStage(d, op(24, [0.5, 0.15, 0.1, 0])).outputs[3]!.voltage;
    const heavy = evaluateStage(d, op(24, [0.5, 0.15, 0.1, 0.2])).outputs[3]!.voltage;
    expect(light).toBeGreaterThan(heavy);
    expect(ws[3]!.max).toBeGreaterThanOrEqual(light);
    expect(ws[3]!.maxCorner).toMatch(/loads max\/min\/min\/min|min\/min\/min\/min/);
  });
  it('explains with numbers when no integer turns fit (coupling too loose)', () => {
    const r = designStage(spec([o('p5', 5, 0.05, 0.3, 0.03, 0.05), o('s12', 12, 0.05, 0.1, 0.05)], { coupling: 0.9 }));
    expect(r.ok).toBe(false);
    expect(!r.ok && r.flags[0]!.text).toMatch(/no integer turns up to Np = 40 keep s12 \(12 V ±5 %\) within tolerance: the centre of its band .* -?\d.* % off/);
  });
  it('flags: duty too high for good secondary regulation', () => {
    const r = designStage(spec([o('p5', 5, 0.05, 0.3, 0.03, 0.05), o('s12', 12, 0.01, 0.05, 0.15)], { vinMin: 7.5 as Volts, vinNom: 9 as Volts, vinMax: 10 as Volts }));
    const flags = r.ok ? r.flags : r.flags;
    expect(flags.some((f) => f.code === 'duty-high-for-secondaries')).toBe(true);
  });
  it('flags: negative low-side peak beyond the controller limit, with numbers', () => {
    const r = designStage(spec([o('p3', 3.3, 0, 0.05, 0.03, 0.05), o('s12', 12, 0.2, 0.8, 0.1, 0.2)]));
    expect(r.ok).toBe(false);
    const f = !r.ok ? r.flags.find((x) => x.code === 'negative-peak') : undefined;
    expect(f?.text).toMatch(/negative peak −?-?\d.* A is beyond the controller's limit −1.5 A/);
  });
  it('flags: too many windings and power above the range', () => {
    const four = spec([o('p5', 5, 0.1, 1.5, 0.03, 0.05), o('a', 12, 0.05, 0.4), o('b', -12, 0.05, 0.4), o('c', 15, 0.05, 0.3), o('d', 5, 0.05, 0.4)]);
    const r = designStage(four);
    const flags = r.ok ? r.flags : r.flags;
    expect(flags.some((f) => f.code === 'too-many-windings')).toBe(true);
    expect(flags.some((f) => f.code === 'power-above-range')).toBe(true);
  });
  it('windows: the two tolerance cases bound all four (setpoint × rectifier drop) combinations, at every magnetic corner', () => {
    const d = design(three);
    // The magnetic's corners, built here from the leakage formula Llk = n²·Lp·(1 − k²)/k²
    // (coupled-inductor model, from memory): Lp ±20 % and leakage 50 %…100 %, leakage held
    // while Lp moves. The star model (no secondaryCoupling) needs nothing else.
    const variant = (g: number, f: number): CoupledBuckDesign => ({
      ...d, inductance: (d.inductance * g) as CoupledBuckDesign['inductance'],
      secondaries: d.secondaries.map((w) => {
        const n = w.turns / d.primaryTurns;
        const llk = f * n * n * d.inductance * (1 - w.coupling ** 2) / w.coupling ** 2;
        return { ...w, coupling: Math.sqrt((n * n * d.inductance * g) / (n * n * d.inductance * g + llk)) };
      }),
    });
    const designs = [d, ...[0.8, 1.2].flatMap((g) => [0.5, 1].map((f) => variant(g, f)))];
    const vins = [18, 24, 32];
    const ws = stageWindows(d, { vin: vins as Volts[], iout: d.outputs.map((x) => ({ min: x.currentMin, max: x.currentMax })) }, { magneticSweep: 'full' });
    const { vref, rTop, rBottom } = d.divider;
    const lo = new Array(4).fill(Infinity);
    const hi = new Array(4).fill(-Infinity);
    for (const vin of vins) for (let mask = 0; mask < 16; mask++) {
      const iout = d.outputs.map((x, i) => (mask & (1 << i) ? x.currentMax : x.currentMin));
      for (const sp of [-1, 1]) for (const vf of [0.9, 1.1]) for (const dv of designs) {
        // Vout = Vref·(1 + Rtop/Rbottom) at the tolerance corners (common practice worst case)
        const vp = vref * (1 + sp * 0.01) * (1 + (rTop * (1 + sp * 0.01)) / (rBottom * (1 - sp * 0.01)));
        coupledOutputs(dv, vin, iout, { vPrimary: vp, vfScale: vf }).forEach((o, i) => {
          const m = Math.abs(o.voltage);
          lo[i] = Math.min(lo[i], m - o.ripplePP / 2);
          hi[i] = Math.max(hi[i], m + o.ripplePP / 2);
        });
      }
    }
    // Equal to within 0.1 mV (the primary's ripple moves a few µV with the rectifier drop).
    ws.forEach((w, i) => {
      expect(Math.abs(Math.min(Math.abs(w.min), Math.abs(w.max)) - lo[i])).toBeLessThan(1e-4);
      expect(Math.abs(Math.max(Math.abs(w.min), Math.abs(w.max)) - hi[i])).toBeLessThan(1e-4);
    });
  });
  it('windows: worst case covers the Monte Carlo spread, which is reproducible by seed', () => {
    const d = design(three);
    const corners = { vin: [18, 24, 32] as Volts[], iout: d.outputs.map((x) => ({ min: x.currentMin, max: x.currentMax })) };
    const a = stageWindows(d, corners, { monteCarlo: { runs: 300, seed: 7 } });
    const b = stageWindows(d, corners, { monteCarlo: { runs: 300, seed: 7 } });
    const c = stageWindows(d, corners, { monteCarlo: { runs: 300, seed: 8 } });
    expect(a).toEqual(b);
    expect(a[1]!.monteCarlo!.min).not.toBe(c[1]!.monteCarlo!.min);
    for (const w of a) {
      expect(w.monteCarlo!.min).toBeGreaterThanOrEqual(w.min - 1e-9);
      expect(w.monteCarlo!.max).toBeLessThanOrEqual(w.max + 1e-9);
      expect(w.min).toBeLessThan(w.max);
    }
    // the negative rail's window is signed
    expect(a[2]!.max).toBeLessThan(0);
    expect(a[2]!.allowedMin).toBeCloseTo(-12 * 1.08, 12);
  });
});

describe('magnetic specification', () => {
  it('carries turns, Lp, leakage targets, saturation with margin, RMS currents, wire and isolation', () => {
    const d = design(spec(three.outputs, { isolation: { class: 'reinforced', workingVoltage: 250 as Volts } }));
    const m = magneticSpec(d);
    expect(m.windings.map((w) => w.turns)).toEqual([d.primaryTurns, ...d.secondaries.map((w) => w.turns)]);
    expect(m.saturationCurrent).toBeGreaterThan(m.windings[0]!.peakCurrent);
    for (const w of m.windings) {
      expect(w.wire.currentDensity).toBeLessThanOrEqual(5 + 1e-9); // stated density (common practice 4–6 A/mm²)
      expect(w.rmsCurrent).toBeGreaterThan(0);
    }
    // secondary RMS above its DC current: pulsed conduction (DESIGN.md §4)
    expect(m.windings[1]!.rmsCurrent).toBeGreaterThan(0.15);
    expect(m.leakageTargets[0]!.minCoupling).toBe(0.99);
    expect(m.isolation).toEqual({ class: 'reinforced', workingVoltage: 250 });
    expect(m.cautions.join(' ')).toMatch(/reinforced barrier .* 250 V/);
    expect(m.cautions.join(' ')).toMatch(/certifies nothing/);
  });
  it('designs the magnetic on a core: turns kept in ratio and within the flux limit, wire fits the window', () => {
    const d = design(spec(three.outputs, { isolation: { class: 'reinforced', workingVoltage: 250 as Volts } }));
    const m = magneticSpec(d);
    const c = m.core!;
    expect(c).not.toBeNull();
    const designTurns = [d.primaryTurns, ...d.secondaries.map((w) => w.turns)];
    expect(c.windings.map((w) => w.turns)).toEqual(designTurns.map((t) => t * c.turnsMultiplier));
    // Erickson & Maksimović ch. 14: N ≥ L·Ipk/(Bmax·Ae) with the worst primary peak.
    const ipk = m.windings[0]!.peakCurrent;
    expect((d.inductance * ipk) / (c.windings[0]!.turns * c.core.ae)).toBeLessThanOrEqual(c.fluxLimit * (1 + 1e-9));
    expect(c.fill).toBeLessThanOrEqual(c.windowUtilisation);
    // Reinforced barrier: secondaries in triple-insulated wire, three layers of tape (common practice).
    expect(c.windings.slice(1).every((w) => w.insulation === 'triple-insulated')).toBe(true);
    expect(c.windingOrder.join(' ')).toMatch(/3 layers of polyester/);
  });
});

describe('netlists (structure; ngspice runs them in test/reference)', () => {
  it('coupled-winding netlist: options, step, caution, coupling, reversed negative winding', () => {
    const d = design(three);
    const text = coupledBuckNetlist(d, op(24, [0.5, 0.15, 0.1, 0.2]));
    expect(text).toMatch(/^\* Railwright open-loop netlist: coupled-winding buck/);
    expect(text).toMatch(/\* CAUTION:/);
    expect(text).toContain('.options method=gear reltol=1e-4');
    const tran = text.match(/^\.tran (\S+) (\S+) (\S+) (\S+) uic$/m)!;
    expect(Number(tran[1])).toBeLessThanOrEqual(10e-9);
    expect(Number(tran[4])).toBeLessThanOrEqual(10e-9);
    expect(Number(tran[2])).toBeGreaterThanOrEqual(1e-3);
    expect(text).toMatch(/^KP1 LP LS1 9\.9e-1$/m);
    expect(text).toMatch(/^KS1_2 LS1 LS2 9\.801e-1$/m);
    expect(text).toMatch(/^DS2 o2 wb2 DRECT2$/m); // reversed rectifier on the negative winding
    expect(text).toMatch(/^LS2 wa2 0 /m);
    expect(text).toMatch(/^\.meas tran v_out3 AVG v\(o3\)/m);
    expect(text).toMatch(/^RPRE3 o3 0 /m);
  });
  it('buck netlist', () => {
    const r = designStage({ ...base, kind: 'buck', outputs: [o('r3', 3.3, 0.1, 2, 0.03, 0.05)] } as StageSpec);
    if (!r.ok || r.design.kind !== 'buck') throw new Error('buck');
    const text = buckNetlist(r.design, op(24, [2]));
    expect(text).toContain('SHS vin sw gh 0 SWHS');
    expect(text).toContain('.options method=gear reltol=1e-4');
    expect(text.trimEnd().endsWith('.end')).toBe(true);
  });
});
