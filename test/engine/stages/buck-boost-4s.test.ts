// Four-switch buck-boost (src-main/engine/stages/buck-boost-4s/). Equation checks name their
// source beside each assertion; the ngspice table compares the engine with simulations of an
// independently written netlist (test/reference/fourswitch-reference.ts).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { designStage, evaluateStage, stageWindows, type StageDesign } from '../../../src-main/engine/stages/index.ts';
import { fourSwitchNetlist, fourSwitchParts, fourSwitchPoint, type FourSwitchDesign } from '../../../src-main/engine/stages/buck-boost-4s/index.ts';
import { parseStageFile } from '../../../src-main/engine/stages/stage-json.ts';
import { partsForStage, type LibraryRow } from '../../../src-main/engine/library.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../../src-main/engine/units.ts';
import { ngspice } from '../../helpers/tools.ts';
import { runNgspice } from '../../helpers/ngspice.ts';
import { FS_POINTS, compareFourSwitch, referenceNetlist } from '../../reference/fourswitch-reference.ts';

const spec = (over: Partial<StageSpec> = {}, out: Record<string, unknown> = {}): StageSpec => ({
  kind: 'buck-boost-4s', vinMin: 9, vinNom: 24, vinMax: 36, fsw: 400e3, ambient: 40, tjMax: 125, ceramicDerating: 0.6,
  outputs: [{ nodeId: '12v', voltage: 12, tolerance: 0.05, currentMin: 0.01, currentMax: 1, rippleLimit: 0.1, ...out }],
  ...over,
} as unknown as StageSpec);

function design(s: StageSpec = spec()): FourSwitchDesign {
  const r = designStage(s);
  if (!r.ok) throw new Error(r.flags.map((f) => f.text).join('; '));
  return r.design as FourSwitchDesign;
}
const op = (vin: number, io: number) => ({ vin: vin as Volts, iout: [io as Amps], ambient: 40 as Celsius });
function ideal(d: FourSwitchDesign): FourSwitchDesign {
  const sw = { rdsOn: 0, qg: 0, coss: 0, tr: 0, tf: 0 };
  return { ...d, dcr: 0 as never, highSide: sw, lowSide: sw, controller: { ...d.controller, deadTime: 0, iq: 0 }, coreLossFraction: 0, cout: { ...d.cout, esr: 0 }, cin: { ...d.cin, esr: 0 } };
}

describe('four-switch buck-boost', () => {
  const d = design();

  it('buck, transition and boost regions across the input range, with the textbook duties', () => {
    const id = ideal(d);
    const v = d.divider.vout;
    // Erickson & Maksimović ch. 2: buck D = Vout/Vin, IL = Iout
    const buck = fourSwitchPoint(id, 24, 1);
    expect(buck.region).toBe('buck');
    expect(buck.db).toBeCloseTo(v / 24, 9);
    expect(buck.il).toBeCloseTo(1, 9);
    // boost D = 1 − Vin/Vout, IL = Iout/(1 − D)
    const boost = fourSwitchPoint(id, 9, 1);
    expect(boost.region).toBe('boost');
    expect(boost.dc).toBeCloseTo(1 - 9 / v, 9);
    expect(boost.il).toBeCloseTo(1 / (1 - boost.dc), 9);
    // transition: Vout = Vin·Db/(1 − Dc) with the input leg at its largest duty (common practice, from memory)
    const mid = fourSwitchPoint(id, 12.5, 1);
    expect(mid.region).toBe('transition');
    expect(12.5 * mid.db / (1 - mid.dc)).toBeCloseTo(v, 9);
    expect(d.transitionBand[0]).toBeCloseTo(12 * 0.9, 9);
    expect(d.transitionBand[1]).toBeCloseTo(12 / 0.9, 9);
  });

  it('energy balance exact, every term reported, extra switching loss in the transition band', () => {
    for (const vin of [9, 12.5, 24, 36]) {
      const ev = evaluateStage(d, op(vin, 1));
      expect((ev.pin as number) - (ev.pout as number) - (ev.loss as number)).toBeCloseTo(0, 12);
      expect(Object.values(ev.lossBreakdown).reduce((a, b) => a + (b as number), 0)).toBeCloseTo(ev.loss as number, 12);
    }
    const buck = evaluateStage(d, op(24, 1)).lossBreakdown;
    const boost = evaluateStage(d, op(9, 1)).lossBreakdown;
    const mid = evaluateStage(d, op(12.5, 1));
    expect(buck['output-leg-switching']).toBe(0);
    expect(boost['input-leg-switching']).toBe(0);
    expect(mid.lossBreakdown['input-leg-switching']).toBeGreaterThan(0);
    expect(mid.lossBreakdown['output-leg-switching']).toBeGreaterThan(0);
    // Gate drive of both legs in the band, one leg elsewhere (common practice)
    expect(mid.lossBreakdown['gate-drive'] as number).toBeCloseTo(2 * (buck['gate-drive'] as number), 12);
    expect(mid.flags.some((f) => f.code === 'transition-band' && /Vin 12\.5 V: both legs switch.* [\d.]+ mW/.test(f.text))).toBe(true);
  });

  it('inductor copper follows IL = Iout in buck and Iout/(1 − D) in boost', () => {
    const b = fourSwitchPoint(d, 24, 1);
    const ev = evaluateStage(d, op(24, 1));
    // Erickson & Maksimović ch. 2: ΔIL = (Vin − Vout)·D/(L·fsw)
    const dI = ((24 - 12) * b.db) / (d.inductance * d.fsw);
    expect(ev.lossBreakdown['inductor-copper'] as number).toBeCloseTo((1 + (dI * dI) / 12) * d.dcr, 3);
    const k = fourSwitchPoint(d, 9, 1);
    const il = 1 / (1 - k.dc);
    const dIb = (9 * k.dc) / (d.inductance * d.fsw);
    expect(evaluateStage(d, op(9, 1)).lossBreakdown['inductor-copper'] as number).toBeCloseTo((il * il + (dIb * dIb) / 12) * d.dcr, 6);
  });

  it('Tj for all four switches, controller and inductor', () => {
    const ev = evaluateStage(d, op(12.5, 1));
    expect(ev.parts.map((p) => p.role)).toEqual(['switch A (input high side)', 'switch B (input low side)', 'switch C (output low side)', 'switch D (output high side)', 'controller', 'inductor']);
    for (const p of ev.parts) expect(p.tj).toBeCloseTo(40 + p.power * p.thetaJA, 9);
    const sum = ev.parts.reduce((a, p) => a + p.power, 0);
    const ls = ev.lossBreakdown;
    // Every loss except the capacitors' lands in a part
    expect(sum).toBeCloseTo((ev.loss as number) - (ls['output-capacitor-esr'] as number) - (ls['input-capacitor-esr'] as number), 9);
  });

  it('refuses a negative output and too large a step-up, with numbers', () => {
    expect((designStage(spec({}, { voltage: -12 })) as { flags: { code: string }[] }).flags[0]!.code).toBe('negative-output');
    const far = designStage(spec({ vinMin: 1 as Volts, vinNom: 5 as Volts }));
    expect(!far.ok && far.flags[0]!.text).toMatch(/output-leg duty 0\.925 at Vin min 1 V .* 0\.85 maximum/);
  });

  it('windows over Vin × load × setpoint corners', () => {
    const w = stageWindows(d as StageDesign, { vin: [9, 24, 36] as Volts[], iout: [{ min: 0.01 as Amps, max: 1 as Amps }] })[0]!;
    expect(w.inside).toBe(true);
    expect(w.minCorner).toMatch(/reference and divider low/);
    expect(w.maxCorner).toMatch(/reference and divider high/);
  });

  it('parts: four switches from the library pair, a buck-boost controller only', () => {
    const lib: LibraryRow[] = [
      { id: 'buck', partClass: 'controller', name: 'buck', cost: 0.1, params: { package: 'x', iMax: 5, vinMax: 60, iq: 1e-3, tonMin: 8e-8, dMax: 0.9, integrated: 0, forcedPwm: 1, thetaJA: 50 } },
      { id: 'bb', partClass: 'controller', name: 'four-switch controller (invented)', cost: 0.9, params: { package: 'x', iMax: 5, vinMax: 60, iq: 1e-3, tonMin: 8e-8, dMax: 0.88, integrated: 0, forcedPwm: 1, thetaJA: 50, topology: 'buck-boost-4s' } },
      { id: 'q', partClass: 'switch', name: 'n-channel (invented)', cost: 0.1, params: { package: 'x', vds: 60, id: 10, rdsOn: 0.01, qg: 1e-8, coss: 3e-10, thetaJA: 50 } },
      { id: 'ind', partClass: 'inductor', name: 'ind', cost: 0.1, params: { package: 'x', lMin: 1e-6, lMax: 100e-6, iSat: 8, dcr: 0.05, thetaJA: 40 } },
    ] as LibraryRow[];
    const dl = design(spec({ library: lib }));
    expect(dl.parts!.map((p) => p.libraryId)).toEqual(['bb', 'q', 'q', 'ind']);
    const picks = partsForStage('s', dl, lib);
    expect(picks).toEqual(fourSwitchParts('s', dl, lib));
    expect(picks.filter((p) => p.prefix === 'Q').reduce((a, p) => a + p.quantity, 0)).toBe(4);
  });

  it('stage file and netlist (gear, ≤ 10 ns, sanitised comments, legs held in the buck and boost regions)', () => {
    const f = JSON.parse(readFileSync(join(import.meta.dirname, '../../../docs/examples/stage-buck-boost-4s.json'), 'utf8'));
    expect(designStage(parseStageFile(f).spec!).ok).toBe(true);
    const nasty = design(spec({}, { nodeId: 'z\n.end\nR9 a b 1' }));
    const buck = fourSwitchNetlist(nasty, op(24, 1));
    expect(buck).toContain('.options method=gear reltol=1e-4');
    expect(buck).toMatch(/^\.tran 1e-8 /m);
    expect(buck).toMatch(/^VGD gd 0 DC 1$/m);
    expect(buck.match(/^\.end$/gm)!.length).toBe(1);
    expect(fourSwitchNetlist(nasty, op(9, 1))).toMatch(/^VGA ga 0 DC 1$/m);
  });
});

describe('four-switch buck-boost against ngspice (stored simulations)', () => {
  const fixture = JSON.parse(readFileSync(join(import.meta.dirname, '../../fixtures/fourswitch-ngspice.json'), 'utf8')) as { points: { name: string; v_out0: number; i_in: number }[] };
  it('covers ≥ 4 points and all three regions', () => {
    expect(fixture.points.length).toBeGreaterThanOrEqual(4);
    const regions = new Set(FS_POINTS.map((p) => compareFourSwitch(p, fixture.points.find((x) => x.name === p.name)!).region));
    expect([...regions].sort()).toEqual(['boost', 'buck', 'transition']);
  });
  for (const p of FS_POINTS) {
    it(`${p.name}: output within 2 %, efficiency within 3 points (ngspice simulation)`, () => {
      const r = compareFourSwitch(p, fixture.points.find((x) => x.name === p.name)!);
      expect(Math.abs(r.errorPct)).toBeLessThan(2); // ngspice simulation of test/reference/fourswitch-reference.ts
      expect(Math.abs(r.etaEngine - r.etaSim) * 100).toBeLessThan(3); // ngspice simulation
    });
  }
});

const tool = ngspice();
describe.skipIf(tool.skip)('four-switch buck-boost against ngspice (one point simulated live)', () => {
  it('fs2 (transition) simulated now agrees with the engine and the stored figure', async () => {
    const p = FS_POINTS[1]!;
    const sim = await runNgspice(referenceNetlist(p), tool.path!);
    const r = compareFourSwitch(p, { v_out0: sim.meas.v_out0!, i_in: sim.meas.i_in! });
    expect(Math.abs(r.errorPct)).toBeLessThan(2); // ngspice simulation
    expect(Math.abs(r.etaEngine - r.etaSim) * 100).toBeLessThan(3); // ngspice simulation
    const fixture = JSON.parse(readFileSync(join(import.meta.dirname, '../../fixtures/fourswitch-ngspice.json'), 'utf8')) as { points: { v_out0: number }[] };
    expect(sim.meas.v_out0!).toBeCloseTo(fixture.points[1]!.v_out0, 2);
  }, 60_000);
});
