// Isolated fixed-ratio module (src-main/engine/stages/iso-module/): unregulated ratio with a
// load-regulation line, minimum load, efficiency line, barrier class and working voltage.
// The model of such modules is common practice, from memory; the numbers are invented rows.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { designStage, evaluateStage, stageWindows, type StageDesign } from '../../../src-main/engine/stages/index.ts';
import { isoLoss, isoModuleParts, isoOutput, type IsoModuleDesign } from '../../../src-main/engine/stages/iso-module/index.ts';
import { parseStageFile } from '../../../src-main/engine/stages/stage-json.ts';
import { partsForStage, type LibraryRow } from '../../../src-main/engine/library.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../../src-main/engine/units.ts';

const spec = (over: Partial<StageSpec> = {}, out: Record<string, unknown> = {}): StageSpec => ({
  kind: 'iso-module', vinMin: 11.4, vinNom: 12, vinMax: 12.6, fsw: 0, ambient: 40, tjMax: 105, ceramicDerating: 0.6,
  isolation: { class: 'basic', workingVoltage: 100 },
  outputs: [{ nodeId: '5v-iso', voltage: 5, tolerance: 0.15, currentMin: 0.005, currentMax: 0.25, rippleLimit: 0.1, ...out }],
  ...over,
} as unknown as StageSpec);
function design(s = spec()): IsoModuleDesign {
  const r = designStage(s);
  if (!r.ok) throw new Error(r.flags.map((f) => f.text).join('; '));
  return r.design as IsoModuleDesign;
}
const op = (vin: number, io: number) => ({ vin: vin as Volts, iout: [io as Amps], ambient: 40 as Celsius });
const lib: LibraryRow[] = [
  { id: 'm-func', partClass: 'iso-module', name: 'functional (invented)', cost: 0.5, params: { package: 'x', vinNom: 12, ratio: 5 / 12, pRated: 2, loadReg: 0.08, minLoad: 0.1, etaFull: 0.8, pNoLoad: 0.1, isolation: 0, workingVoltage: 60, thetaJA: 45 } },
  { id: 'm-basic', partClass: 'iso-module', name: 'basic (invented)', cost: 1, params: { package: 'x', vinNom: 12, ratio: 5 / 12, pRated: 2, loadReg: 0.08, minLoad: 0.1, etaFull: 0.82, pNoLoad: 0.1, isolation: 1, workingVoltage: 250, thetaJA: 45 } },
  { id: 'r', partClass: 'resistor', name: 'Thick-film', cost: 0.01, params: { package: '1206', power: 0.5, tolerance: 0.01 } },
] as LibraryRow[];

describe('isolated fixed-ratio module', () => {
  const d = design();

  it('output is ratio·Vin at full load and rises along the load-regulation line at light load', () => {
    const m = d.module;
    expect(isoOutput(m, d.iRated, 12, d.iRated)).toBeCloseTo(m.ratio * 12, 12);
    expect(isoOutput(m, d.iRated, 12, 0.1 * d.iRated)).toBeCloseTo(m.ratio * 12 * (1 + m.loadReg), 12);
    // Unregulated: the input's spread passes straight through
    expect(isoOutput(m, d.iRated, 12.6, d.iRated) / isoOutput(m, d.iRated, 12, d.iRated)).toBeCloseTo(12.6 / 12, 12);
  });

  it('efficiency line: η_full at full load, falling at light load; energy balance exact', () => {
    const m = d.module;
    const pFull = m.pRated;
    expect(pFull / (pFull + isoLoss(m, 1))).toBeCloseTo(m.etaFull, 12);
    const ev = evaluateStage(d, op(12, 0.25));
    const evLight = evaluateStage(d, op(12, 0.05));
    expect(evLight.efficiency as number).toBeLessThan(ev.efficiency as number);
    expect((ev.pin as number) - (ev.pout as number) - (ev.loss as number)).toBeCloseTo(0, 12);
    expect(ev.parts[0]!.tj).toBeCloseTo(40 + (ev.lossBreakdown.module as number) * m.thetaJA, 9);
  });

  it('minimum load: a preload makes it up; without it the evaluation warns with numbers', () => {
    expect(d.preload).not.toBeNull();
    expect(d.preload!.current + 0.005).toBeGreaterThanOrEqual(d.module.minLoad * d.iRated * 0.95);
    const bare = evaluateStage({ ...d, preload: null }, op(12, 0.005));
    expect(bare.flags.some((f) => f.code === 'below-minimum-load' && /load [\d.]+ % of rated is below the module's 10 % minimum/.test(f.text))).toBe(true);
  });

  it('the barrier: the module must cover the domain class and working voltage', () => {
    const dl = design(spec({ library: lib }));
    expect(dl.parts![0]!.libraryId).toBe('m-basic');
    expect(dl.module.isolation).toBe('basic');
    const tooMuch = designStage(spec({ library: lib, isolation: { class: 'reinforced', workingVoltage: 100 } as never }));
    expect(!tooMuch.ok && tooMuch.flags[0]!.text).toMatch(/no isolated module in the library .* with reinforced isolation for 100 V/);
    const func = design(spec({ library: lib, isolation: { class: 'functional', workingVoltage: 50 } as never }));
    expect(func.parts![0]!.libraryId).toBe('m-func');
  });

  it('refuses an input outside the module range or an output band the line cannot meet', () => {
    const wide = designStage(spec({ vinMin: 9 as Volts }));
    expect(!wide.ok && wide.flags[0]!.code).toBe('no-module');
    const tight = designStage(spec({}, { tolerance: 0.03 }));
    expect(!tight.ok && tight.flags[0]!.text).toMatch(/output [\d.]+…[\d.]+ V/);
  });

  it('windows over Vin × load corners; BOM lists the module and the preload', () => {
    const w = stageWindows(d as StageDesign, { vin: [11.4, 12, 12.6] as Volts[], iout: [{ min: 0.005 as Amps, max: 0.25 as Amps }] })[0]!;
    expect(w.minCorner).toMatch(/Vin 11\.4 V, loads max/);
    expect(w.maxCorner).toMatch(/Vin 12\.6 V, loads min/);
    const dl = design(spec({ library: lib }));
    const picks = partsForStage('s', dl, lib);
    expect(picks).toEqual(isoModuleParts('s', dl, lib));
    expect(picks.map((p) => p.libraryId)).toEqual(['m-basic', 'r']);
  });

  it('the stage file example designs', () => {
    const f = JSON.parse(readFileSync(join(import.meta.dirname, '../../../docs/examples/stage-iso-module.json'), 'utf8'));
    expect(designStage(parseStageFile(f).spec!).ok).toBe(true);
  });
});
