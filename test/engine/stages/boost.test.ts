// Synchronous boost stage (src-main/engine/stages/boost/). Equation checks name their source
// beside each assertion; the ngspice table compares the engine with simulations of an
// independently written netlist (test/reference/boost-reference.ts).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { designStage, evaluateStage, stageWindows, type StageDesign } from '../../../src-main/engine/stages/index.ts';
import { boostNetlist, boostParts, rhpZero, type BoostDesign } from '../../../src-main/engine/stages/boost/index.ts';
import { parseStageFile } from '../../../src-main/engine/stages/stage-json.ts';
import { partsForStage, type LibraryRow } from '../../../src-main/engine/library.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../../src-main/engine/units.ts';
import { ngspice } from '../../helpers/tools.ts';
import { runNgspice } from '../../helpers/ngspice.ts';
import { BOOST_POINTS, compareBoost, referenceNetlist } from '../../reference/boost-reference.ts';

const spec = (over: Partial<StageSpec> = {}, out: Record<string, unknown> = {}): StageSpec => ({
  kind: 'boost', vinMin: 4.5, vinNom: 5, vinMax: 5.5, fsw: 500e3, ambient: 40, tjMax: 125, ceramicDerating: 0.6,
  outputs: [{ nodeId: '12v', voltage: 12, tolerance: 0.03, currentMin: 0.02, currentMax: 1, rippleLimit: 0.1, ...out }],
  ...over,
} as unknown as StageSpec);

function design(s: StageSpec = spec()): BoostDesign {
  const r = designStage(s);
  if (!r.ok) throw new Error(r.flags.map((f) => f.text).join('; '));
  return r.design as BoostDesign;
}

const op = (vin: number, io: number) => ({ vin: vin as Volts, iout: [io as Amps], ambient: 40 as Celsius });

/** The same design with lossless parts (no drops, no dead time). */
function ideal(d: BoostDesign): BoostDesign {
  const sw = { rdsOn: 0, qg: 0, coss: 0, tr: 0, tf: 0 };
  return { ...d, dcr: 0 as never, highSide: sw, lowSide: sw, controller: { ...d.controller, deadTime: 0, iq: 0 }, coreLossFraction: 0, cout: { ...d.cout, esr: 0 }, cin: { ...d.cin, esr: 0 } };
}

describe('boost design and evaluation', () => {
  const d = design();

  it('lossless parts give D = 1 − Vin/Vout exactly', () => {
    // Erickson & Maksimović, Fundamentals of Power Electronics, ch. 2 (boost conversion ratio 1/(1 − D))
    const ev = evaluateStage(ideal(d), op(5, 1));
    expect(ev.duty as number).toBeCloseTo(1 - 5 / 12, 9);
    expect(ev.loss as number).toBeCloseTo(0, 9);
  });

  it('with losses D ≈ 1 − η·Vin/Vout and the input current is Iout/((1 − D)) at the input power', () => {
    const ev = evaluateStage(d, op(5, 1));
    const eta = ev.efficiency as number;
    // Erickson & Maksimović, ch. 2/3: D = 1 − η·Vin/Vout (η from the conduction losses mostly)
    expect(Math.abs((ev.duty as number) - (1 - (eta * 5) / 12))).toBeLessThan(0.02);
    expect(eta).toBeGreaterThan(0.85);
    expect(eta).toBeLessThan(0.99);
    // Energy balance, exactly: pin = pout + loss, and the sum of the terms is the loss
    expect((ev.pin as number) - (ev.pout as number) - (ev.loss as number)).toBeCloseTo(0, 12);
    const sum = Object.values(ev.lossBreakdown).reduce((a, b) => a + (b as number), 0);
    expect(sum).toBeCloseTo(ev.loss as number, 12);
    expect((ev.iin as number) * 5).toBeCloseTo(ev.pin as number, 12);
    for (const k of ['ls-conduction', 'hs-conduction', 'ls-switching', 'output-capacitance', 'dead-time', 'gate-drive', 'inductor-copper', 'inductor-core', 'output-capacitor-esr', 'input-capacitor-esr', 'quiescent']) {
      expect(ev.lossBreakdown[k], k).toBeGreaterThan(0);
    }
  });

  it('inductor copper loss follows IL = Iout/(1 − D) and ΔIL = Vin·D/(L·fsw)', () => {
    const ev = evaluateStage(d, op(5, 1));
    const D = ev.duty as number;
    // Erickson & Maksimović, ch. 2: IL = Iout/(1 − D) (capacitor charge balance), ΔIL = Vin·D/(L·fsw)
    const il = 1 / (1 - D);
    const dI = (5 * D) / (d.inductance * d.fsw);
    expect(ev.lossBreakdown['inductor-copper'] as number).toBeCloseTo((il * il + (dI * dI) / 12) * d.dcr, 3);
  });

  it('output ripple is Iout·D/(fsw·Cout) + ESR·Ipk and output-capacitor RMS ≈ Iout·√(D/(1 − D))', () => {
    const ev = evaluateStage(d, op(5, 1));
    const D = ev.duty as number;
    const il = 1 / (1 - D);
    const dI = (5 * D) / (d.inductance * d.fsw);
    // Erickson & Maksimović, ch. 2 (output capacitor charge during the main switch's on-time)
    expect(ev.outputs[0]!.ripplePP as number).toBeCloseTo((1 * D) / (d.fsw * d.cout.effective) + d.cout.esr * (il + dI / 2), 3);
    const rms2 = (ev.lossBreakdown['output-capacitor-esr'] as number) / d.cout.esr;
    // Erickson & Maksimović: Iout·√(D/(1 − D)) is the ripple-free limit; the ripple adds a little
    expect(Math.sqrt(rms2) / (1 * Math.sqrt(D / (1 - D)))).toBeGreaterThan(1);
    expect(Math.sqrt(rms2) / (1 * Math.sqrt(D / (1 - D)))).toBeLessThan(1.03);
  });

  it('notes the right-half-plane zero and the crossover limit it sets', () => {
    // Erickson & Maksimović, ch. 8: f_RHP = Vout·(1 − D)²/(2π·L·Iout); crossover ≲ f_RHP/5 common practice
    const D = 1 - (0.9 * 4.5) / 12;
    expect(d.rhpZero).toBeCloseTo((12 * (1 - D) ** 2) / (2 * Math.PI * d.inductance * 1), 6);
    expect(rhpZero(12, D, d.inductance, 1)).toBeCloseTo(d.rhpZero, 9);
    expect(d.crossoverLimit).toBeCloseTo(d.rhpZero / 5, 9);
    const r = designStage(spec());
    expect(r.ok && r.reasons.some((x) => /right-half-plane zero at [\d.]+ kHz.*crossover below [\d.]+ kHz/.test(x))).toBe(true);
  });

  it('states its light-load behaviour with numbers', () => {
    const r = designStage(spec());
    expect(r.ok && r.reasons.some((x) => /forced PWM .* no minimum load; below [\d.]+ mA .* reverses .* dissipates [\d.]+ W/.test(x))).toBe(true);
    // At 50 mA the valley is negative (continuous conduction with reversing current)
    const ev = evaluateStage(d, op(5, 0.05));
    expect(ev.efficiency as number).toBeGreaterThan(0.5);
    expect(Math.abs((ev.outputs[0]!.voltage as number) - 12)).toBeLessThan(1e-9);
  });

  it('refuses a step-down, a negative output and a duty beyond the maximum, quoting numbers', () => {
    const down = designStage(spec({ vinMax: 12.5 as Volts }));
    expect(down.ok).toBe(false);
    expect(!down.ok && down.flags[0]!.code).toBe('no-step-up');
    expect(!down.ok && down.flags[0]!.text).toMatch(/12 V .* highest input 12.5 V/);
    const neg = designStage(spec({}, { voltage: -12 }));
    expect(!neg.ok && neg.flags[0]!.code).toBe('negative-output');
    const far = designStage(spec({ vinMin: 1 as Volts, vinNom: 1.2 as Volts, vinMax: 1.5 as Volts }));
    expect(!far.ok && far.flags[0]!.code).toBe('max-duty');
    expect(!far.ok && far.flags[0]!.text).toMatch(/duty 0\.925 at Vin min 1 V .* 0\.85 maximum/);
  });

  it('warns above duty 0.8 and flags an input above the setpoint', () => {
    const hi = design(spec({ vinMin: 2.2 as Volts, vinNom: 2.5 as Volts, vinMax: 3 as Volts }, { currentMax: 0.2 }));
    const ev = evaluateStage(hi, op(2.2, 0.2));
    expect(ev.flags.some((f) => f.code === 'high-duty' && /duty 0\.8\d+ at Vin 2\.2 V/.test(f.text))).toBe(true);
    const over = evaluateStage(d, op(13, 0.5));
    expect(over.flags.some((f) => f.code === 'input-above-output' && f.severity === 'error')).toBe(true);
    expect(over.outputs[0]!.voltage as number).toBeLessThan(13);
  });

  it('duty beyond the controller maximum: the output falls to what the maximum duty gives', () => {
    const ev = evaluateStage(d, op(1.5, 0.2));
    expect(ev.flags.some((f) => f.code === 'max-duty')).toBe(true);
    expect(ev.duty as number).toBeCloseTo(0.85, 6);
    // Erickson & Maksimović ch. 2: at most Vin/(1 − Dmax) = 10 V
    expect(ev.outputs[0]!.voltage as number).toBeLessThan(1.5 / 0.15);
  });

  it('lists every dissipating part with Tj = Ta + P·θJA', () => {
    const ev = evaluateStage(d, op(4.5, 1));
    expect(ev.parts.map((p) => p.role)).toEqual(['high-side switch', 'low-side switch', 'controller', 'inductor']);
    for (const p of ev.parts) expect(p.tj).toBeCloseTo(40 + p.power * p.thetaJA, 9);
    const hot = evaluateStage({ ...d, thetaJA: { ...d.thetaJA, lowSide: 2000 } }, op(4.5, 1));
    expect(hot.flags.some((f) => f.code === 'tj-over-limit' && /low-side switch: junction \d+ °C/.test(f.text))).toBe(true);
  });

  it('windows cover Vin × load × reference/divider corners', () => {
    const w = stageWindows(design(spec({}, { tolerance: 0.05 })) as StageDesign, { vin: [4.5, 5, 5.5] as Volts[], iout: [{ min: 0.02 as Amps, max: 1 as Amps }] })[0]!;
    // Setpoint extremes: vref ±1 %, E96 ±1 % on both resistors (common practice worst case)
    const vHi = 0.8 * 1.01 * (1 + (1.4e6 * 1.01) / (1e5 * 0.99));
    expect(w.max as number).toBeGreaterThan(vHi);
    expect(w.max as number).toBeLessThan(vHi + 0.06);
    expect(w.maxCorner).toMatch(/reference and divider high/);
    expect(w.minCorner).toMatch(/reference and divider low/);
    expect(w.inside).toBe(true);
    // ±3 %: the reference and divider tolerances alone take the setpoint past +3 %, and the window says so
    const tight = stageWindows(d as StageDesign, { vin: [4.5, 5, 5.5] as Volts[], iout: [{ min: 0.02 as Amps, max: 1 as Amps }] })[0]!;
    expect(tight.inside).toBe(false);
  });

  it('with a library it picks a boost controller, never a buck controller', () => {
    const lib: LibraryRow[] = [
      { id: 'buck-int', partClass: 'controller', name: 'buck', cost: 0.1, params: { package: 'x', iMax: 5, vinMax: 40, iq: 1e-3, tonMin: 8e-8, dMax: 0.9, integrated: 1, forcedPwm: 1, rdsHs: 0.05, rdsLs: 0.03, thetaJA: 50 } },
      { id: 'boost-int', partClass: 'controller', name: 'boost (invented)', cost: 0.5, params: { package: 'x', iMax: 4, vinMax: 20, iq: 1e-3, tonMin: 8e-8, dMax: 0.88, integrated: 1, forcedPwm: 1, rdsHs: 0.05, rdsLs: 0.03, thetaJA: 50, topology: 'boost' } },
      { id: 'ind', partClass: 'inductor', name: 'ind', cost: 0.1, params: { package: 'x', lMin: 1e-6, lMax: 22e-6, iSat: 6, dcr: 0.03, thetaJA: 40 } },
    ] as LibraryRow[];
    const bd = design(spec({ library: lib }));
    expect(bd.parts!.map((p) => p.libraryId)).toEqual(['boost-int', 'ind']);
    expect(bd.controller.maxDuty).toBe(0.88);
    const picks = partsForStage('s1', bd, lib);
    expect(picks[0]!.libraryId).toBe('boost-int');
    expect(boostParts('s1', bd, lib)).toEqual(picks);
    // Without refs the BOM still looks only at boost controllers rated for the output
    const generic = partsForStage('s1', design(), lib);
    expect(generic[0]!.libraryId).toBe('boost-int');
    const none = designStage(spec({ library: lib.filter((r) => r.id !== 'boost-int') }));
    expect(!none.ok && none.flags[0]!.text).toMatch(/no boost regulator or controller .* see the output, 12.4 V/);
  });

  it('the stage file format reads a boost spec', () => {
    const f = JSON.parse(readFileSync(join(import.meta.dirname, '../../../docs/examples/stage-boost.json'), 'utf8'));
    const file = parseStageFile(f);
    expect(file.spec!.kind).toBe('boost');
    expect(designStage(file.spec!).ok).toBe(true);
  });

  it('netlist: gear, step ≤ 10 ns, user text only sanitised in comments', () => {
    const nasty = design(spec({}, { nodeId: 'x\n.include /etc/passwd\rR1 a b 1' }));
    const text = boostNetlist(nasty, op(5, 1));
    expect(text).toContain('.options method=gear reltol=1e-4');
    expect(text).toMatch(/^\.tran 1e-8 /m);
    expect(text).not.toMatch(/^\.include/m);
    for (const line of text.split('\n')) if (line.includes('passwd')) expect(line.startsWith('*')).toBe(true);
  });
});

// ngspice reference table: engine against stored simulations of the independently written
// netlist (test/fixtures/boost-ngspice.json, made by `npx tsx test/reference/boost-table.ts`).
describe('boost against ngspice (stored simulations)', () => {
  const fixture = JSON.parse(readFileSync(join(import.meta.dirname, '../../fixtures/boost-ngspice.json'), 'utf8')) as { points: { name: string; v_out0: number; i_in: number }[] };
  it('covers at least 4 operating points', () => {
    expect(fixture.points.length).toBeGreaterThanOrEqual(4);
  });
  for (const p of BOOST_POINTS) {
    it(`${p.name}: output within 2 %, efficiency within 3 points (ngspice simulation)`, () => {
      const sim = fixture.points.find((x) => x.name === p.name)!;
      const r = compareBoost(p, sim);
      expect(Math.abs(r.errorPct)).toBeLessThan(2); // ngspice simulation of test/reference/boost-reference.ts
      expect(Math.abs(r.etaEngine - r.etaSim) * 100).toBeLessThan(3); // ngspice simulation
    });
  }
});

const tool = ngspice();
describe.skipIf(tool.skip)('boost against ngspice (one point simulated live)', () => {
  it('bst1 simulated now agrees with the engine and with the stored figure', async () => {
    const p = BOOST_POINTS[0]!;
    const sim = await runNgspice(referenceNetlist(p), tool.path!);
    const r = compareBoost(p, { v_out0: sim.meas.v_out0!, i_in: sim.meas.i_in! });
    expect(Math.abs(r.errorPct)).toBeLessThan(2); // ngspice simulation
    expect(Math.abs(r.etaEngine - r.etaSim) * 100).toBeLessThan(3); // ngspice simulation
    const fixture = JSON.parse(readFileSync(join(import.meta.dirname, '../../fixtures/boost-ngspice.json'), 'utf8')) as { points: { name: string; v_out0: number }[] };
    expect(sim.meas.v_out0!).toBeCloseTo(fixture.points[0]!.v_out0, 2);
  }, 60_000);
});
