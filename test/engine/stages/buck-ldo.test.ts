import { describe, expect, it } from 'vitest';
import { designStage, evaluateStage, stageWindows, StageInputError, type BuckDesign, type LdoDesign } from '../../../src-main/engine/stages/index.ts';
import { buckPoint } from '../../../src-main/engine/stages/buck/index.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../../src-main/engine/units.ts';

const spec = (over: Record<string, unknown> & Pick<StageSpec, 'kind' | 'outputs'>): StageSpec => ({
  vinMin: 10, vinNom: 12, vinMax: 14, fsw: 500e3, ambient: 25, tjMax: 125, ceramicDerating: 0.6, ...over,
} as StageSpec);
const out = (voltage: number, currentMax: number, over: Record<string, number> = {}) => ({
  nodeId: 'r', voltage, tolerance: 0.03, currentMin: 0.1 * currentMax, currentMax, rippleLimit: 0.05, ...over,
}) as StageSpec['outputs'][number];
const op = (vin: number, iout: number[], ambient = 25) => ({ vin: vin as Volts, iout: iout as Amps[], ambient: ambient as Celsius });

function buck(): BuckDesign {
  const r = designStage(spec({ kind: 'buck', outputs: [out(3.3, 2)] }));
  if (!r.ok || r.design.kind !== 'buck') throw new Error('buck design failed');
  return r.design;
}

/** The same design with every parasitic removed: the textbook ideal converter. */
function ideal(d: BuckDesign): BuckDesign {
  return {
    ...d, dcr: 0 as BuckDesign['dcr'], coreLossFraction: 0,
    highSide: { rdsOn: 0, qg: 0, coss: 0, tr: 0, tf: 0 }, lowSide: { rdsOn: 0, qg: 0, coss: 0, tr: 0, tf: 0, qrr: 0 },
    controller: { ...d.controller, iq: 0, deadTime: 0 },
    cout: { ...d.cout, esr: 0 }, cin: { ...d.cin, esr: 0 },
  };
}

describe('synchronous buck: textbook closed forms (Erickson & Maksimović, Fundamentals of Power Electronics)', () => {
  it('body-diode reverse recovery: Qrr·Vin·fsw while the valley current is positive, none when it is negative', () => {
    const d = buck();
    // 20 nC at 48 V and 300 kHz ≈ 0.29 W (issue 13's figure, from memory; Qrr·Vin·fsw, common practice)
    const d48 = { ...d, fsw: 300e3 as BuckDesign['fsw'], lowSide: { ...d.lowSide, qrr: 20e-9 } };
    expect(evaluateStage(d48, op(48, [2])).lossBreakdown['reverse-recovery']).toBeCloseTo(20e-9 * 48 * 300e3, 12);
    // generic: 4 nC per ampere of valley current (from memory)
    const p = buckPoint(d, 12, 2);
    expect(p.ivalley).toBeGreaterThan(0);
    expect(evaluateStage(d, op(12, [2])).lossBreakdown['reverse-recovery']).toBeCloseTo(4e-9 * p.ivalley * 12 * d.fsw, 12);
    // at no load the valley is negative (forced PWM): the diode is off at that edge
    expect(buckPoint(d, 12, 0).ivalley).toBeLessThan(0);
    expect(evaluateStage(d, op(12, [0])).lossBreakdown['reverse-recovery']).toBe(0);
  });
  it('ideal converter: D = Vout/Vin, ΔIL = (Vin − Vout)·D/(L·fsw), ΔV = ΔIL/(8·fsw·C), η = 1', () => {
    const d = ideal(buck());
    const vout = d.divider.vout;
    const ev = evaluateStage(d, op(12, [2]));
    expect(ev.duty).toBeCloseTo(vout / 12, 12); // E&M ch. 2, volt-second balance
    const p = buckPoint(d, 12, 2);
    const dIL = ((12 - vout) * (vout / 12)) / (d.inductance * d.fsw);
    expect(p.ripple).toBeCloseTo(dIL, 12); // E&M ch. 2, inductor current ripple
    expect(ev.outputs[0]!.ripplePP).toBeCloseTo(dIL / (8 * d.fsw * d.cout.effective), 12); // E&M ch. 2, capacitor ripple
    expect(ev.efficiency).toBeCloseTo(1, 12);
  });
  it('hand-worked example: 12 V → 3.3 V, 4.7 µH, 500 kHz, 2 A', () => {
    const d0 = ideal(buck());
    const d = { ...d0, inductance: 4.7e-6 as BuckDesign['inductance'], divider: { ...d0.divider, vout: 3.3 } };
    const p = buckPoint(d, 12, 2);
    // D = 3.3/12 = 0.275; ΔIL = 8.7·0.275/(4.7 µH·500 kHz) = 1.01809 A; peak = 2.50904 A (E&M ch. 2, by hand)
    expect(p.duty).toBeCloseTo(0.275, 12);
    expect(p.ripple).toBeCloseTo(1.01809, 5);
    expect(p.ipk).toBeCloseTo(2.50904, 5);
    // RMS of a triangle on a DC level: √(Io² + ΔI²/12) = √4.086376 = 2.02148 A (E&M ch. 2, by hand)
    expect(p.irms).toBeCloseTo(2.02148, 5);
  });
  it('each loss term follows its stated form and pin = pout + Σloss exactly', () => {
    const d = buck();
    const ev = evaluateStage(d, op(12, [2]));
    const lb = ev.lossBreakdown;
    const sum = Object.values(lb).reduce((a, b) => a + b, 0);
    expect(ev.loss).toBeCloseTo(sum, 12);
    expect(ev.pin).toBeCloseTo(ev.pout + ev.loss, 12);
    expect(ev.iin * 12).toBeCloseTo(ev.pin, 12);
    // ½·Vin·Io·(tr+tf)·fsw (common practice)
    expect(lb['hs-switching']).toBeCloseTo(0.5 * 12 * 2 * (d.highSide.tr + d.highSide.tf) * d.fsw, 12);
    // gate Qg·Vdrv·fsw and controller Vin·Iq (common practice)
    expect(lb['gate-drive']).toBeCloseTo((d.highSide.qg + d.lowSide.qg) * d.controller.vDrive * d.fsw, 12);
    expect(lb.quiescent).toBeCloseTo(12 * d.controller.iq, 12);
    // input capacitor RMS Io·√(D(1−D)) (E&M), through the bank's ESR
    const D = ev.duty!;
    expect(lb['input-capacitor-esr']).toBeCloseTo((2 * Math.sqrt(D * (1 - D))) ** 2 * d.cin.esr, 12);
    // hot Rds ×1.4 (common practice: 1.3–1.5 × the 25 °C value)
    const p = buckPoint(d, 12, 2);
    expect(lb['hs-conduction']).toBeCloseTo(p.irms ** 2 * d.highSide.rdsOn * 1.4 * D, 12);
    expect(ev.efficiency).toBeGreaterThan(0.8);
    expect(ev.efficiency).toBeLessThan(0.97);
  });
  it('junction temperatures are Ta + P·θJA (JEDEC JESD51-2 defines θJA)', () => {
    const ev = evaluateStage(buck(), op(12, [2], 50));
    for (const part of ev.parts) expect(part.tj).toBeCloseTo(50 + part.power * part.thetaJA, 12);
    expect(ev.parts.every((x) => x.thetaSource === 'default-from-memory')).toBe(true);
  });
  it('the duty accounts for the resistive drops: a lossy buck needs more duty than Vout/Vin', () => {
    const d = buck();
    expect(evaluateStage(d, op(12, [2])).duty!).toBeGreaterThan(d.divider.vout / 12);
  });
  it('a minimum on-time violation at the project frequency moves the stage to a lower frequency of the set', () => {
    const r = designStage(spec({ kind: 'buck', vinMin: 36, vinNom: 48, vinMax: 60, fsw: 2e6, outputs: [out(1.0, 1)] }));
    // D ≈ 1/60 at 2 MHz: about 8.5 ns against the 100 ns minimum; on-time = D/fsw
    // [Erickson & Maksimović, ch. 2] reaches 100 ns near 170 kHz, so 150 kHz is the highest that passes.
    expect(r.ok).toBe(true);
    expect(r.ok && r.design.kind === 'buck' && r.design.fsw).toBe(150e3);
    expect(r.ok && r.reasons[0]).toMatch(/^fsw 150 kHz: on-time [\d.]+ ns at Vin 60 V is below the 100 ns minimum at the project's 2 MHz; 150 kHz gives [\d.]+ ns/);
  });
  it('refuses a minimum on-time violation at Vin max when no frequency of the set passes, with the numbers', () => {
    const r = designStage(spec({ kind: 'buck', vinMin: 100, vinNom: 120, vinMax: 150, fsw: 2e6, outputs: [out(1.0, 1)] }));
    expect(r.ok).toBe(false);
    const f = !r.ok ? r.flags.find((x) => x.code === 'min-on-time' && x.data?.vin === 150) : undefined;
    // D ≈ 1/150: about 3.4 ns at 2 MHz and 67 ns even at 100 kHz, against the 100 ns minimum
    expect(f?.text).toMatch(/on-time \d.* ns at Vin 150 V is below the controller's minimum 100 ns: lower fsw or the input range; the lower frequencies 1 MHz, .*, 100 kHz fail too \(at 100 kHz: on-time/);
  });
  it('out of duty the output follows M = D (Erickson & Maksimović, ch. 2) and the flag quotes the duty it wanted', () => {
    const d = buck();
    const ev = evaluateStage(d, op(3.5, [0]));
    // no load: Vout ≈ Dmax·Vin give or take the dead-time shares (2·20 ns at 500 kHz = 2 % of the period)
    expect(ev.duty).toBeCloseTo(0.9, 6);
    expect(Math.abs(ev.outputs[0]!.voltage - 0.9 * 3.5)).toBeLessThan(0.02 * 4.5);
    const f = ev.flags.find((x) => x.code === 'max-duty')!;
    expect(f.severity).toBe('error');
    expect(Number(f.data!.duty)).toBeCloseTo(d.divider.vout / 3.5, 1); // M = D, within the dead-time shares
    const [w] = stageWindows(d, { vin: [3.5, 12] as Volts[], iout: [{ min: 0 as Amps, max: 2 as Amps }] });
    expect(w!.inside).toBe(false);
    expect(w!.minCorner).toMatch(/Vin 3.5 V/);
  });
  it('refuses a duty above the maximum at Vin min', () => {
    const r = designStage(spec({ kind: 'buck', vinMin: 5.2, vinNom: 6, vinMax: 7, outputs: [out(5, 1)] }));
    expect(r.ok).toBe(false);
    expect(!r.ok && r.flags.some((x) => x.code === 'max-duty')).toBe(true);
  });
  it('chooses an output capacitor rated so it sees at most the derating share (common practice: ceramic ≤ 60 %)', () => {
    const d = buck();
    expect(d.cout.workingVoltage / d.cout.ratedVoltage).toBeLessThanOrEqual(0.6);
    expect(d.cin.workingVoltage / d.cin.ratedVoltage).toBeLessThanOrEqual(0.6);
    // the designed ripple stays under the limit at Vin max
    expect(evaluateStage(d, op(14, [2])).outputs[0]!.ripplePP).toBeLessThan(0.05);
  });
  it('window: the setpoint extremes from the reference (±1 %) and E96 resistors of the chosen grade, ± half the ripple', () => {
    const d = buck();
    const [w] = stageWindows(d, { vin: [10, 12, 14] as Volts[], iout: [{ min: 0.2 as Amps, max: 2 as Amps }] });
    const { vref, rTop, rBottom } = d.divider;
    // ±3 % at 3.3 V: 1 % resistors with the ±1 % reference miss the band, so the designer
    // buys the divider in 0.5 % (the cheapest grade that fits).
    const tr = d.divider.tolerance;
    expect(tr).toBe(0.005);
    expect(d.controller.vrefTolerance).toBe(0.01);
    // Vout = Vref·(1 + Rtop/Rbottom) at the tolerance corners (common practice worst case)
    const hi = vref * 1.01 * (1 + (rTop * (1 + tr)) / (rBottom * (1 - tr)));
    const lo = vref * 0.99 * (1 + (rTop * (1 - tr)) / (rBottom * (1 + tr)));
    const ripples = [10, 12, 14].flatMap((v) => [0.2, 2].map((i) => evaluateStage(d, op(v, [i])).outputs[0]!.ripplePP as number));
    expect(w!.max).toBeCloseTo(hi + Math.max(...ripples) / 2, 9);
    expect(w!.min).toBeCloseTo(lo - Math.max(...ripples) / 2, 9);
    expect(w!.maxCorner).toMatch(/reference and divider high/);
  });
  it('bad input names the field and changes nothing', () => {
    const s = spec({ kind: 'buck', outputs: [out(3.3, 2)], vinMin: Number.NaN });
    const r = designStage(s);
    expect(r.ok).toBe(false);
    expect(!r.ok && r.flags[0]!.text).toMatch(/^vinMin: must be a finite number/);
    expect(Number.isNaN(s.vinMin)).toBe(true);
    const d = buck();
    const before = JSON.stringify(d);
    expect(() => evaluateStage(d, op(12, [1, 2]))).toThrow(StageInputError);
    expect(() => evaluateStage(d, op(Number.POSITIVE_INFINITY, [1]))).toThrow(/vin: must be a non-zero finite number/);
    expect(() => stageWindows(d, { vin: [], iout: [] })).toThrow(/corners.vin/);
    expect(JSON.stringify(d)).toBe(before);
    expect(designStage({ ...s, kind: 'boost' as never, vinMin: 10 as Volts }).ok).toBe(false);
  });
});

describe('LDO (common practice; Tj per JEDEC JESD51-2 θJA)', () => {
  const ldoSpec = spec({ kind: 'ldo', vinMin: 4.8, vinNom: 5, vinMax: 5.3, vinRipple: 0.05 as Volts, fsw: 400e3, ambient: 40, outputs: [out(3.3, 0.3, { rippleLimit: 0.01 })] });
  const ldo = (): LdoDesign => {
    const r = designStage(ldoSpec);
    if (!r.ok || r.design.kind !== 'ldo') throw new Error('ldo design failed');
    return r.design;
  };
  it('dissipation, efficiency and Tj by hand', () => {
    const d = ldo();
    const ev = evaluateStage(d, op(5, [0.3], 40));
    // P = (5 − 3.3)·0.3 + 5·Iq (common practice)
    expect(ev.loss).toBeCloseTo(1.7 * 0.3 + 5 * d.iq, 12);
    expect(ev.efficiency).toBeCloseTo((3.3 * 0.3) / (5 * (0.3 + d.iq)), 12); // η = Pout/Pin ≈ Vout/Vin
    // Tj = Ta + P·θJA (JESD51-2); with the 90 K/W default: 40 + 0.51025·90 = 85.92 °C by hand
    expect(d.package.thetaJA).toBe(90);
    expect(ev.parts[0]!.tj).toBeCloseTo(40 + (1.7 * 0.3 + 5 * 50e-6) * 90, 9);
  });
  it('PSRR falls with frequency and load; a post-regulated ripple above the rail\'s limit is flagged with numbers', () => {
    const d = ldo();
    // lower rejection at higher ripple frequency and at higher load (two-region model, from memory)
    const at = (f: number, i: number) => evaluateStage({ ...d, rippleFrequency: f }, op(5.3, [i])).outputs[0]!.ripplePP;
    expect(at(1e6, 0.1)).toBeGreaterThan(at(400e3, 0.1));
    expect(at(400e3, 0.1)).toBeGreaterThan(at(50e3, 0.1));
    expect(at(50e3, 0.1)).toBeCloseTo(at(100e3, 0.1), 15); // flat below the corner
    expect(at(400e3, 0.3)).toBeGreaterThan(at(400e3, 0.1));
    // 2 MHz: 40 − 26 = 14 dB → the 20 dB floor, less the load term
    expect(at(2e6, 0.001)).toBeCloseTo(0.05 * 10 ** (-(20 - 6 * 0.001 / (d.ratedCurrent as number)) / 20), 12);
    // 0.05 V in at the floor is ≈ 5 mV out; a 2 mV rail limit is flagged with both numbers
    const tight = { ...d, rippleFrequency: 2e6, outputs: [{ ...d.outputs[0]!, rippleLimit: 0.002 as Volts }] };
    const f = evaluateStage(tight, op(5.3, [0.1])).flags.find((x) => x.code === 'ripple-over-limit');
    expect(f?.data?.limit).toBe(0.002);
    expect(f?.data?.ripple as number).toBeGreaterThan(0.002);
  });
  it('ripple out = ripple in × 10^(−PSRR/20), fading near dropout', () => {
    const d = ldo();
    // PSRR two-region model (from memory): 40 dB to 100 kHz, −20 dB/decade above (to a 20 dB
    // floor), 6 dB less at the rated current: at 400 kHz and 0.3 A of the rated current
    const psrr = Math.max(20, 40 - 20 * Math.log10(400e3 / 100e3)) - 6 * (0.3 / (d.ratedCurrent as number));
    expect(evaluateStage(d, op(5.3, [0.3])).outputs[0]!.ripplePP).toBeCloseTo(0.05 * 10 ** (-psrr / 20), 12); // ripple out = ripple in × 10^(−PSRR/20), common practice
    // at the low input the headroom is inside the knee, so less rejection
    expect(evaluateStage(d, op(4.0, [0.3])).outputs[0]!.ripplePP).toBeGreaterThan(0.05 / 100);
  });
  it('dropout is checked at the input trough and reported with the shortfall', () => {
    const r = designStage({ ...ldoSpec, vinMin: 3.5 as Volts });
    expect(r.ok).toBe(false);
    const f = !r.ok ? r.flags.find((x) => x.code === 'dropout') : undefined;
    // trough = 3.5 − 0.025; dropout at 0.3 A of a 0.5 A part = 0.03 + 0.3·0.3/0.5 = 0.21 V → short 0.035 V
    expect(f?.data?.shortfall).toBeCloseTo(0.035, 6);
  });
  it('picks a bigger package when the small one would run too hot', () => {
    const r = designStage({ ...ldoSpec, vinMin: 11 as Volts, vinNom: 12 as Volts, vinMax: 13 as Volts, outputs: [out(3.3, 0.15)] });
    expect(r.ok).toBe(true);
    if (r.ok && r.design.kind === 'ldo') {
      const p = (13 - 3.3) * 0.15 + 13 * r.design.iq;
      expect(40 + p * r.design.package.thetaJA).toBeLessThanOrEqual(125);
      expect(r.design.package.thetaJA).toBeLessThan(90);
    }
  });
  it('negative regulator: signed output, magnitudes in the arithmetic', () => {
    const r = designStage({ ...ldoSpec, vinMin: -5.3 as Volts, vinNom: -5 as Volts, vinMax: -4.8 as Volts, outputs: [out(-3.3, 0.1)] });
    expect(r.ok).toBe(true);
    if (r.ok) {
      const ev = evaluateStage(r.design, op(-5, [0.1]));
      expect(ev.outputs[0]!.voltage).toBeCloseTo(-3.3, 12);
      expect(ev.loss).toBeGreaterThan(0.17);
      const [w] = stageWindows(r.design, { vin: [-5.3, -5, -4.8] as Volts[], iout: [{ min: 0 as Amps, max: 0.1 as Amps }] });
      expect(w!.max).toBeLessThan(-3.2);
      expect(w!.min).toBeGreaterThan(-3.4);
    }
  });
});
