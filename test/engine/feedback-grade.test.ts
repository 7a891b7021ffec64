// Feedback grade and per-stage switching frequency as design choices of the buck designer
// (src-main/engine/stages/buck/index.ts), with the default library (invented costs).
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { partsForStage, tableToRows, type LibraryRow } from '../../src-main/engine/library.ts';
import { readCsv } from '../../src-main/export/csv.ts';
import { designStage, evaluateStage, stageWindows } from '../../src-main/engine/stages/index.ts';
import { FSW_SET, type BuckDesign } from '../../src-main/engine/stages/buck/index.ts';
import type { StageSpec } from '../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Hertz, Ratio, Volts } from '../../src-main/engine/units.ts';
import { libraryCostModel } from '../../src-main/engine/library.ts';
import { importProjectValue } from '../../src-main/store/json-format.ts';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';

const lib: LibraryRow[] = (() => {
  const r = tableToRows(readCsv(readFileSync(join(import.meta.dirname, '../../db/default-library.csv'), 'utf8')));
  if (!r.ok) throw new Error('default library');
  return r.rows;
})();

function buckSpec(vout: number, tol: number, io: number, vinMin: number, vinMax: number, fsw: number, library: LibraryRow[] | undefined = lib): StageSpec {
  return {
    kind: 'buck', vinMin: vinMin as Volts, vinNom: ((vinMin + vinMax) / 2) as Volts, vinMax: vinMax as Volts,
    outputs: [{ nodeId: 'r', voltage: vout as Volts, tolerance: tol as Ratio, currentMin: (io * 0.1) as Amps, currentMax: io as Amps, rippleLimit: 0.033 as Volts }],
    fsw: fsw as Hertz, ambient: 50 as Celsius, tjMax: 125 as Celsius, ceramicDerating: 0.6 as Ratio,
    ...(library ? { library } : {}),
  };
}

function design(spec: StageSpec): { d: BuckDesign; reasons: string[] } {
  const r = designStage(spec);
  if (!r.ok) throw new Error(r.flags.map((f) => f.text).join('; '));
  return { d: r.design as BuckDesign, reasons: r.reasons };
}

const windowOf = (d: BuckDesign, s: StageSpec) =>
  stageWindows(d, { vin: [s.vinMin, s.vinNom, s.vinMax], iout: [{ min: s.outputs[0]!.currentMin, max: s.outputs[0]!.currentMax }] })[0]!;

describe('feedback grade (resistor tolerance and reference grade)', () => {
  it('a routine ±3 % 3.3 V buck from 18–30 V gets a grade whose worst-case window fits', () => {
    const s = buckSpec(3.3, 0.03, 1, 18, 30, 400e3);
    const { d, reasons } = design(s);
    const w = windowOf(d, s);
    // Before: 1 % resistors stacked with the ±1.5 % reference of the cheapest regulator put
    // the window outside ±3 %. After: a tighter grade is chosen.
    expect(w.inside).toBe(true);
    expect(d.divider.tolerance < 0.01 || d.controller.vrefTolerance < 0.015).toBe(true);
    expect(reasons.some((r) => r.startsWith('feedback grade:') && r.includes('cheapest grade inside'))).toBe(true);
    // The BOM lists divider resistors of the grade the design was analysed with.
    const rs = partsForStage('s', d, lib).filter((p) => p.role.startsWith('feedback'));
    expect(rs).toHaveLength(2);
    for (const p of rs) {
      const row = lib.find((r) => r.id === p.libraryId)!;
      expect(row.params.tolerance as number).toBeLessThanOrEqual(d.divider.tolerance + 1e-12);
    }
  });

  it('the window stacks reference and both resistors at their extremes (common practice), plus half the ripple', () => {
    const s = buckSpec(3.3, 0.03, 1, 18, 30, 400e3);
    const { d } = design(s);
    const w = windowOf(d, s);
    // Setpoint extremes: Vref(1 ± tv)·(1 + Rt(1 ± tr)/(Rb(1 ∓ tr))) [common practice].
    const tv = d.controller.vrefTolerance, tr = d.divider.tolerance;
    const spHi = d.divider.vref * (1 + tv) * (1 + (d.divider.rTop * (1 + tr)) / (d.divider.rBottom * (1 - tr)));
    const spLo = d.divider.vref * (1 - tv) * (1 + (d.divider.rTop * (1 - tr)) / (d.divider.rBottom * (1 + tr)));
    // The largest ripple is at Vin max, full load: ΔV = ΔI·ESR + ΔI/(8·fsw·C) [Erickson & Maksimović].
    const rp = evaluateStage(d, { vin: s.vinMax, iout: [s.outputs[0]!.currentMax], ambient: 25 as Celsius }).outputs[0]!.ripplePP as number;
    expect(w.max).toBeCloseTo(spHi + rp / 2, 4);
    expect(w.min).toBeCloseTo(spLo - rp / 2, 4);
  });

  it('a ±5 % rail keeps the cheapest grade (1 % resistors, the cheapest regulator)', () => {
    const s = buckSpec(3.3, 0.05, 1, 18, 30, 400e3);
    const { d, reasons } = design(s);
    expect(d.divider.tolerance).toBe(0.01);
    expect(reasons.some((r) => r.includes('the cheapest grade'))).toBe(true);
    const rs = partsForStage('s', d, lib).filter((p) => p.role.startsWith('feedback'));
    expect(rs.every((p) => p.libraryId === 'res-0402-1pc')).toBe(true);
  });

  it('without a library the resistor grade is still chosen (generic reference)', () => {
    const s = buckSpec(3.3, 0.025, 1, 18, 30, 400e3, undefined);
    const { d } = design(s);
    expect(windowOf(d, s).inside).toBe(true);
    expect(d.divider.tolerance).toBeLessThan(0.01);
  });
});

describe('per-stage switching frequency', () => {
  it('1.0 V from 18–36 V at a 1 MHz project frequency falls back to the highest set frequency whose on-time passes', () => {
    const s = buckSpec(1.0, 0.03, 1, 18, 36, 1e6);
    const { d, reasons } = design(s);
    expect(d.fsw).toBeLessThan(1e6);
    expect(FSW_SET).toContain(d.fsw);
    // On-time = D/fsw [Erickson & Maksimović, ch. 2], D from the model at Vin max, full load.
    const duty = (f: number) => evaluateStage({ ...d, fsw: f as Hertz }, { vin: s.vinMax, iout: [1 as Amps], ambient: 50 as Celsius }).duty!;
    expect(duty(d.fsw) / d.fsw).toBeGreaterThanOrEqual(d.controller.minOnTime);
    const higher = FSW_SET.filter((f) => f > d.fsw && f < 1e6).at(-1)!;
    expect(duty(higher) / higher).toBeLessThan(d.controller.minOnTime);
    const why = reasons[0]!;
    expect(why).toMatch(/^fsw \d+ kHz: on-time [\d.]+ ns at Vin 36 V is below the [\d.]+ ns minimum at the project's 1 MHz; \d+ kHz gives [\d.]+ ns/);
    // The stage's own evaluation uses its own frequency (no on-time error at either input end).
    for (const vin of [18, 36]) {
      expect(evaluateStage(d, { vin: vin as Volts, iout: [1 as Amps], ambient: 50 as Celsius }).flags.filter((f) => f.code === 'min-on-time')).toEqual([]);
    }
  });

  it('the planner gets a tree for a 1.0 V rail straight from 18–36 V at a 1 MHz project frequency', () => {
    // Invented two-rail project.
    const doc = importProjectValue({
      format: 'railwright-project', version: 1, meta: { name: 'Invented 1.0 V check' },
      sources: [{ id: 'in', name: 'DC input', vNom: '24V', vMin: '18V', vMax: '36V', currentLimit: '1A' }],
      domains: [{ id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 }],
      modes: [{ id: 'run', name: 'Run', share: 1 }],
      loads: [{ id: 'core', name: 'Core 1.0 V', domainId: 'main', voltage: '1V', tolerance: '±3%', current: { run: '1A' }, rippleLimit: '20mV', noiseClass: 'standard' }],
      preferences: { switchingFrequency: '1 MHz' },
    });
    if (!doc.ok) throw new Error(JSON.stringify(doc.problems));
    const req = doc.doc.requirements;
    const result = new PlanSolver(req, { evaluator: engineEvaluator({ library: lib }), costModel: libraryCostModel(lib), budgetMs: 5000 }).solve();
    expect(result.best, JSON.stringify(result.infeasible)).not.toBeNull();
    const st = result.best!.stages.find((x) => x.outputs.some((o) => o.nodeId === result.rails[0]!.id))!;
    expect(st.kind).toBe('buck');
    expect((st.design as BuckDesign).fsw).toBeLessThan(1e6);
  }, 60_000);
  it('the project frequency stays when its on-time passes', () => {
    const { d } = design(buckSpec(3.3, 0.05, 1, 9, 16, 400e3));
    expect(d.fsw).toBe(400e3);
  });
});

describe('LDO accuracy grade', () => {
  it('a ±1 % rail takes the cheapest LDO row whose accuracy fits, not the cheapest row', () => {
    const base = lib.find((r) => r.id === 'ldo-sot223-1a')!;
    const loose: LibraryRow = { ...base, id: 'ldo-loose', cost: 0.1, params: { ...base.params, accuracy: 0.02 } };
    const tight: LibraryRow = { ...base, id: 'ldo-tight', cost: 0.6, params: { ...base.params, accuracy: 0.005 } };
    const only = [...lib.filter((r) => r.partClass !== 'ldo'), loose, tight];
    const spec: StageSpec = {
      kind: 'ldo', vinMin: 4.75 as Volts, vinNom: 5 as Volts, vinMax: 5.25 as Volts, vinRipple: 0.01 as Volts,
      outputs: [{ nodeId: 'r', voltage: 3.3 as Volts, tolerance: 0.01 as Ratio, currentMin: 0.01 as Amps, currentMax: 0.2 as Amps, rippleLimit: 0.01 as Volts }],
      fsw: 400e3 as Hertz, ambient: 50 as Celsius, tjMax: 125 as Celsius, ceramicDerating: 0.6 as Ratio, library: only,
    };
    const r = designStage(spec);
    if (!r.ok) throw new Error(r.flags.map((f) => f.text).join('; '));
    expect((r.design as { parts?: { libraryId: string }[] }).parts?.[0]?.libraryId).toBe('ldo-tight');
    // The window stacks the accuracy with half the ripple (common practice): inside ±1 %.
    expect(stageWindows(r.design, { vin: [4.75, 5, 5.25] as Volts[], iout: [{ min: 0.01 as Amps, max: 0.2 as Amps }] })[0]!.inside).toBe(true);
    // A ±3 % rail keeps the cheap row.
    const r3 = designStage({ ...spec, outputs: [{ ...spec.outputs[0]!, tolerance: 0.03 as Ratio }] });
    expect(r3.ok && (r3.design as { parts?: { libraryId: string }[] }).parts?.[0]?.libraryId).toBe('ldo-loose');
  });
});
