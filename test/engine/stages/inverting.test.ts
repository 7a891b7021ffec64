// Synchronous inverting buck-boost (src-main/engine/stages/inverting/). Equation checks name
// their source beside each assertion; the ngspice table compares the engine with simulations
// of an independently written netlist (test/reference/inverting-reference.ts).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { designStage, evaluateStage, stageWindows, type StageDesign } from '../../../src-main/engine/stages/index.ts';
import { invertingNetlist, invertingParts, invertingRhpZero, type InvertingDesign } from '../../../src-main/engine/stages/inverting/index.ts';
import { parseStageFile } from '../../../src-main/engine/stages/stage-json.ts';
import { partsForStage, type LibraryRow } from '../../../src-main/engine/library.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../../src-main/engine/units.ts';
import { ngspice } from '../../helpers/tools.ts';
import { runNgspice } from '../../helpers/ngspice.ts';
import { INV_POINTS, compareInverting, referenceNetlist } from '../../reference/inverting-reference.ts';

const spec = (over: Partial<StageSpec> = {}, out: Record<string, unknown> = {}): StageSpec => ({
  kind: 'inverting', vinMin: 10, vinNom: 12, vinMax: 14, fsw: 500e3, ambient: 40, tjMax: 125, ceramicDerating: 0.6,
  outputs: [{ nodeId: 'n5v', voltage: -5, tolerance: 0.05, currentMin: 0.01, currentMax: 0.3, rippleLimit: 0.05, ...out }],
  ...over,
} as unknown as StageSpec);

function design(s: StageSpec = spec()): InvertingDesign {
  const r = designStage(s);
  if (!r.ok) throw new Error(r.flags.map((f) => f.text).join('; '));
  return r.design as InvertingDesign;
}
const op = (vin: number, io: number) => ({ vin: vin as Volts, iout: [io as Amps], ambient: 40 as Celsius });

function ideal(d: InvertingDesign): InvertingDesign {
  const sw = { rdsOn: 0, qg: 0, coss: 0, tr: 0, tf: 0 };
  return { ...d, dcr: 0 as never, highSide: sw, lowSide: sw, controller: { ...d.controller, deadTime: 0, iq: 0 }, coreLossFraction: 0, cout: { ...d.cout, esr: 0 }, cin: { ...d.cin, esr: 0 } };
}

describe('inverting design and evaluation', () => {
  const d = design();

  it('lossless parts give Vout = −Vin·D/(1 − D) exactly', () => {
    // Erickson & Maksimović, Fundamentals of Power Electronics, ch. 2 (buck-boost conversion ratio −D/(1 − D))
    const ev = evaluateStage(ideal(d), op(12, 0.3));
    const D = ev.duty as number;
    expect(-12 * D / (1 - D)).toBeCloseTo(ev.outputs[0]!.voltage as number, 9);
    expect(ev.outputs[0]!.voltage as number).toBeCloseTo(-5, 9);
    expect(ev.loss as number).toBeCloseTo(0, 9);
  });

  it('energy balance is exact and every loss term is reported', () => {
    const ev = evaluateStage(d, op(12, 0.3));
    expect((ev.pin as number) - (ev.pout as number) - (ev.loss as number)).toBeCloseTo(0, 12);
    expect(Object.values(ev.lossBreakdown).reduce((a, b) => a + (b as number), 0)).toBeCloseTo(ev.loss as number, 12);
    for (const k of ['hs-conduction', 'ls-conduction', 'hs-switching', 'output-capacitance', 'dead-time', 'gate-drive', 'inductor-copper', 'inductor-core', 'output-capacitor-esr', 'input-capacitor-esr', 'quiescent']) {
      expect(ev.lossBreakdown[k], k).toBeGreaterThan(0);
    }
    expect(ev.pout as number).toBeCloseTo(5 * 0.3, 9);
  });

  it('IL = Iout/(1 − D); switches block Vin + |Vout|; both capacitors carry pulsed current', () => {
    const ev = evaluateStage(d, op(12, 0.3));
    const D = ev.duty as number;
    const il = 0.3 / (1 - D);
    const dI = (12 * D) / (d.inductance * d.fsw);
    // Erickson & Maksimović ch. 2: IL = Iout/(1 − D), ΔIL = Vin·D/(L·fsw)
    expect(ev.lossBreakdown['inductor-copper'] as number).toBeCloseTo((il * il + (dI * dI) / 12) * d.dcr, 4);
    // ½·(Vin + |Vout|)²·ΣCoss·fsw: the switch node swings Vin + |Vout| (common practice)
    expect(ev.lossBreakdown['output-capacitance'] as number).toBeCloseTo(0.5 * (d.highSide.coss + d.lowSide.coss) * 17 * 17 * d.fsw, 9);
    // Output capacitor RMS ≈ Iout·√(D/(1 − D)); input capacitor RMS ≈ IL·√(D(1 − D))  [Erickson & Maksimović]
    const cout = Math.sqrt((ev.lossBreakdown['output-capacitor-esr'] as number) / d.cout.esr);
    expect(cout / (0.3 * Math.sqrt(D / (1 - D)))).toBeGreaterThan(1);
    expect(cout / (0.3 * Math.sqrt(D / (1 - D)))).toBeLessThan(1.03);
    const cin = Math.sqrt((ev.lossBreakdown['input-capacitor-esr'] as number) / d.cin.esr);
    expect(cin / (il * Math.sqrt(D * (1 - D)))).toBeGreaterThan(1);
    expect(cin / (il * Math.sqrt(D * (1 - D)))).toBeLessThan(1.03);
    // ΔVout ≈ Iout·D/(fsw·Cout) + ESR·Ipk  [Erickson & Maksimović]
    expect(ev.outputs[0]!.ripplePP as number).toBeCloseTo((0.3 * D) / (d.fsw * d.cout.effective) + d.cout.esr * (il + dI / 2), 4);
  });

  it('records the RHP zero and states light-load behaviour with numbers', () => {
    // Erickson & Maksimović ch. 8: f_RHP = |Vout|(1 − D)²/(2π·D·L·Iout)
    const D = 5 / (5 + 0.9 * 10);
    expect(d.rhpZero).toBeCloseTo(invertingRhpZero(-5, D, d.inductance, 0.3), 6);
    expect(d.rhpZero).toBeCloseTo((5 * (1 - D) ** 2) / (2 * Math.PI * D * d.inductance * 0.3), 6);
    const r = designStage(spec());
    expect(r.ok && r.reasons.some((x) => /no minimum load; below [\d.]+ mA .* dissipates [\d.]+ W/.test(x))).toBe(true);
    expect(r.ok && r.reasons.some((x) => /block Vin \+ \|Vout\| = 19 V/.test(x))).toBe(true);
  });

  it('refuses a positive output and a duty beyond the maximum, quoting numbers', () => {
    const pos = designStage(spec({}, { voltage: 5 }));
    expect(!pos.ok && pos.flags[0]!.code).toBe('positive-output');
    const far = designStage(spec({ vinMin: 1 as Volts, vinNom: 1.2 as Volts, vinMax: 1.5 as Volts }, { voltage: -12 }));
    expect(!far.ok && far.flags[0]!.code).toBe('max-duty');
    expect(!far.ok && far.flags[0]!.text).toMatch(/duty 0\.93 at Vin min 1 V for −12 V .* 0\.85 maximum/);
  });

  it('duty beyond the maximum: the output magnitude falls to what the maximum duty gives', () => {
    const ev = evaluateStage(d, op(0.8, 0.1));
    expect(ev.flags.some((f) => f.code === 'max-duty')).toBe(true);
    expect(ev.duty as number).toBeCloseTo(0.85, 6);
    expect(Math.abs(ev.outputs[0]!.voltage as number)).toBeLessThan((0.8 * 0.85) / 0.15);
  });

  it('Tj for every dissipating part', () => {
    const ev = evaluateStage(d, op(10, 0.3));
    for (const p of ev.parts) expect(p.tj).toBeCloseTo(40 + p.power * p.thetaJA, 9);
  });

  it('windows are negative, cover Vin × load × reference/divider corners', () => {
    const w = stageWindows(d as StageDesign, { vin: [10, 12, 14] as Volts[], iout: [{ min: 0.01 as Amps, max: 0.3 as Amps }] })[0]!;
    expect(w.min as number).toBeLessThan(w.max as number);
    expect(w.max as number).toBeLessThan(0);
    // Magnitude extremes from vref ±1 % and E96 ±1 % (common practice worst case)
    const mag = 0.8 * 1.01 * (1 + (d.divider.rTop * 1.01) / (d.divider.rBottom * 0.99));
    expect(-(w.min as number)).toBeGreaterThan(mag);
    expect(w.minCorner).toMatch(/reference and divider high/);
    expect(w.inside).toBe(true);
  });

  it('with a library it picks an inverting controller rated for Vin + |Vout|', () => {
    const lib: LibraryRow[] = [
      { id: 'buck', partClass: 'controller', name: 'buck', cost: 0.1, params: { package: 'x', iMax: 5, vinMax: 40, iq: 1e-3, tonMin: 8e-8, dMax: 0.9, integrated: 1, forcedPwm: 1, rdsHs: 0.05, rdsLs: 0.03, thetaJA: 50 } },
      { id: 'inv-lo', partClass: 'controller', name: 'inverting 15 V (invented)', cost: 0.2, params: { package: 'x', iMax: 2, vinMax: 15, iq: 1e-3, tonMin: 8e-8, dMax: 0.88, integrated: 1, forcedPwm: 1, rdsHs: 0.1, rdsLs: 0.08, thetaJA: 60, topology: 'inverting' } },
      { id: 'inv', partClass: 'controller', name: 'inverting 30 V (invented)', cost: 0.5, params: { package: 'x', iMax: 2, vinMax: 30, iq: 1e-3, tonMin: 8e-8, dMax: 0.88, integrated: 1, forcedPwm: 1, rdsHs: 0.1, rdsLs: 0.08, thetaJA: 60, topology: 'inverting' } },
      { id: 'ind', partClass: 'inductor', name: 'ind', cost: 0.1, params: { package: 'x', lMin: 1e-6, lMax: 100e-6, iSat: 3, dcr: 0.2, thetaJA: 40 } },
    ] as LibraryRow[];
    const dl = design(spec({ library: lib }));
    expect(dl.parts!.map((p) => p.libraryId)).toEqual(['inv', 'ind']);
    expect(partsForStage('s', dl, lib)).toEqual(invertingParts('s', dl, lib));
    expect(partsForStage('s', design(), lib)[0]!.libraryId).toBe('inv');
  });

  it('stage file, netlist (gear, ≤ 10 ns, sanitised comments)', () => {
    const f = JSON.parse(readFileSync(join(import.meta.dirname, '../../../docs/examples/stage-inverting.json'), 'utf8'));
    expect(designStage(parseStageFile(f).spec!).ok).toBe(true);
    const text = invertingNetlist(design(spec({}, { nodeId: 'a\n.control\nshell rm -rf /' })), op(12, 0.3));
    expect(text).toContain('.options method=gear reltol=1e-4');
    expect(text).toMatch(/^\.tran 1e-8 /m);
    expect(text).not.toMatch(/^\.control|^shell/m);
  });
});

describe('inverting against ngspice (stored simulations)', () => {
  const fixture = JSON.parse(readFileSync(join(import.meta.dirname, '../../fixtures/inverting-ngspice.json'), 'utf8')) as { points: { name: string; v_out0: number; i_in: number }[] };
  it('covers at least 4 operating points', () => expect(fixture.points.length).toBeGreaterThanOrEqual(4));
  for (const p of INV_POINTS) {
    it(`${p.name}: output within 2 %, efficiency within 3 points (ngspice simulation)`, () => {
      const r = compareInverting(p, fixture.points.find((x) => x.name === p.name)!);
      expect(Math.abs(r.errorPct)).toBeLessThan(2); // ngspice simulation of test/reference/inverting-reference.ts
      expect(Math.abs(r.etaEngine - r.etaSim) * 100).toBeLessThan(3); // ngspice simulation
    });
  }
});

const tool = ngspice();
describe.skipIf(tool.skip)('inverting against ngspice (one point simulated live)', () => {
  it('inv1 simulated now agrees with the engine and the stored figure', async () => {
    const p = INV_POINTS[0]!;
    const sim = await runNgspice(referenceNetlist(p), tool.path!);
    const r = compareInverting(p, { v_out0: sim.meas.v_out0!, i_in: sim.meas.i_in! });
    expect(Math.abs(r.errorPct)).toBeLessThan(2); // ngspice simulation
    expect(Math.abs(r.etaEngine - r.etaSim) * 100).toBeLessThan(3); // ngspice simulation
    const fixture = JSON.parse(readFileSync(join(import.meta.dirname, '../../fixtures/inverting-ngspice.json'), 'utf8')) as { points: { v_out0: number }[] };
    expect(sim.meas.v_out0!).toBeCloseTo(fixture.points[0]!.v_out0, 2);
  }, 60_000);
});
