// Load switch (src-main/engine/stages/load-switch/): P = I²·Ron(Tj), inrush = Cload·dV/dt,
// per-mode on/off. Sources beside each check.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { designStage, evaluateStage, stageWindows, type StageDesign } from '../../../src-main/engine/stages/index.ts';
import { loadSwitchParts, loadSwitchThermal, type LoadSwitchDesign } from '../../../src-main/engine/stages/load-switch/index.ts';
import { parseStageFile } from '../../../src-main/engine/stages/stage-json.ts';
import { partsForStage, type LibraryRow } from '../../../src-main/engine/library.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../../src-main/engine/units.ts';

const spec = (over: Partial<StageSpec> = {}, out: Record<string, unknown> = {}): StageSpec => ({
  kind: 'load-switch', vinMin: 3.25, vinNom: 3.3, vinMax: 3.35, fsw: 0, ambient: 40, tjMax: 125, ceramicDerating: 0.6,
  loadSwitch: { cload: 22e-6, inrushLimit: 0.2, offModes: ['sleep'] },
  outputs: [{ nodeId: 'radio', voltage: 3.3, tolerance: 0.05, currentMin: 0, currentMax: 0.5, rippleLimit: 0.05, ...out }],
  ...over,
} as unknown as StageSpec);
function design(s = spec()): LoadSwitchDesign {
  const r = designStage(s);
  if (!r.ok) throw new Error(r.flags.map((f) => f.text).join('; '));
  return r.design as LoadSwitchDesign;
}
const op = (vin: number, io: number, mode?: string) => ({ vin: vin as Volts, iout: [io as Amps], ambient: 40 as Celsius, ...(mode ? { mode } : {}) });

describe('load switch', () => {
  const d = design();

  it('conduction loss is I²·Ron(Tj) with Ron(Tj) = Ron25·(1 + α(Tj − 25)) and Tj = Ta + P·θJA', () => {
    const ev = evaluateStage(d, op(3.3, 0.5));
    const tj = ev.parts[0]!.tj as number;
    const ronHot = d.ron * (1 + d.ronTempCoeff * (tj - 25)); // MOSFET channel resistance rises ≈ 0.4 %/K, from memory
    expect(ev.lossBreakdown.conduction as number).toBeCloseTo(0.25 * ronHot, 12); // P = I²·R (Joule)
    expect(tj).toBeCloseTo(40 + (ev.loss as number) * d.thetaJA, 9);
    expect(ev.outputs[0]!.voltage as number).toBeCloseTo(3.3 - 0.5 * ronHot, 12); // Ohm's law
    expect((ev.pin as number) - (ev.pout as number) - (ev.loss as number)).toBeCloseTo(0, 12);
  });

  it('inrush = Cload·dV/dt within its limit, the rise time stated', () => {
    // i = C·dv/dt (the capacitor equation)
    expect(d.inrush).toBeCloseTo(22e-6 * d.slewRate, 12);
    expect(d.inrush).toBeLessThanOrEqual(0.2);
    expect(d.riseTime).toBeCloseTo(3.35 / d.slewRate, 12);
    const r = designStage(spec());
    expect(r.ok && r.reasons.some((x) => /inrush Cload·dV\/dt = 22 µF × 3 V\/ms = 66 mA \(limit 200 mA\)/.test(x))).toBe(true);
    const fixed = designStage(spec({ loadSwitch: { cload: 100e-6, slewRate: 1e4, inrushLimit: 0.5 } }));
    expect(!fixed.ok && fixed.flags[0]!.code).toBe('inrush-over-limit');
    expect(!fixed.ok && fixed.flags[0]!.text).toMatch(/inrush 1000 mA .* 500 mA limit/);
  });

  it('off in the modes where its rail is gated: passes nothing, draws only its off-state current', () => {
    const off = evaluateStage(d, op(3.3, 0.5, 'sleep'));
    expect(off.outputs[0]!.current).toBe(0);
    expect(off.outputs[0]!.voltage).toBe(0);
    expect(off.pout).toBe(0);
    expect(off.pin as number).toBeCloseTo(3.3 * d.iOff, 15);
    expect(off.flags.some((f) => f.code === 'gated-off' && /mode sleep/.test(f.text))).toBe(true);
    expect(evaluateStage(d, op(3.3, 0.5, 'run')).outputs[0]!.current).toBe(0.5);
  });

  it('refuses an input outside the rail band and a drop over budget, quoting numbers', () => {
    const wide = designStage(spec({ vinMin: 3 as Volts }));
    expect(!wide.ok && wide.flags[0]!.text).toMatch(/3…3\.35 V is not inside the rail's 3\.13…3\.46 V band/);
    const heavy = designStage(spec({}, { currentMax: 20 }));
    expect(!heavy.ok && heavy.flags[0]!.code).toBe('no-switch');
  });

  it('picks a lower Ron for a larger current; thermal runaway is flagged', () => {
    expect(design(spec({}, { currentMax: 1.8 })).ron).toBeLessThan(d.ron);
    const hot = { ...d, thetaJA: 1e4, iMax: 10 };
    expect(loadSwitchThermal(hot, 3.3, 5, 40).runaway).toBe(true);
    expect(evaluateStage(hot, op(3.3, 5)).flags.some((f) => f.code === 'thermal-runaway')).toBe(true);
  });

  it('windows: the input range less the hot drop', () => {
    const w = stageWindows(d as StageDesign, { vin: [3.25, 3.3, 3.35] as Volts[], iout: [{ min: 0 as Amps, max: 0.5 as Amps }] })[0]!;
    expect(w.max as number).toBeCloseTo(3.35, 9);
    expect(w.min as number).toBeLessThan(3.25);
    expect(w.minCorner).toMatch(/Vin 3\.25 V, loads max/);
  });

  it('library rows of class load-switch: the design and the BOM use the same row', () => {
    const lib: LibraryRow[] = [
      { id: 'big', partClass: 'load-switch', name: 'big (invented)', cost: 0.3, params: { package: 'x', iMax: 3, vinMax: 5.5, ron: 0.02, thetaJA: 90 } },
      { id: 'small', partClass: 'load-switch', name: 'small (invented)', cost: 0.1, params: { package: 'x', iMax: 1, vinMax: 5.5, ron: 0.08, thetaJA: 180 } },
    ] as LibraryRow[];
    const dl = design(spec({ library: lib }));
    expect(dl.parts![0]!.libraryId).toBe('small');
    expect(partsForStage('s', dl, lib)).toEqual(loadSwitchParts('s', dl, lib));
    expect(partsForStage('s', dl, lib)[0]!.libraryId).toBe('small');
    expect(design(spec({ library: lib }, { currentMax: 2 })).parts![0]!.libraryId).toBe('big');
  });

  it('the stage file format reads it (loadSwitch block, operating-point mode)', () => {
    const f = JSON.parse(readFileSync(join(import.meta.dirname, '../../../docs/examples/stage-load-switch.json'), 'utf8'));
    const file = parseStageFile({ ...f, operatingPoint: { vin: 3.3, iout: [0.5], mode: 'sleep' } });
    expect(file.spec!.loadSwitch).toEqual({ cload: 22e-6, inrushLimit: 0.2, offModes: ['sleep'] });
    expect(file.operatingPoint!.mode).toBe('sleep');
    expect(() => parseStageFile({ ...f, spec: { ...f.spec, loadSwitch: { offModes: [3] } } })).toThrow(/spec\.loadSwitch\.offModes: a list of mode ids/);
  });
});
