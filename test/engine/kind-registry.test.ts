// Every declared stage kind (engine/model.ts STAGE_MODEL_KINDS) is registered with every part
// of the kind interface (stages/registry.ts): designer, evaluator, names, drawing colour, mode
// dependence, design fields, window entry, BOM parts and, if it switches, a netlist writer;
// an unknown kind is refused by name. Each kind is exercised on its invented example in
// docs/examples/stage-<kind>.json. Common practice.
import { describe, expect, expectTypeOf, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { STAGE_MODEL_KINDS, type StageKind } from '../../src-main/engine/model.ts';
import { KIND_NAMES, STAGE_KINDS, kindModuleOf, kindNames, kindSettingName, missingDesignFields } from '../../src-main/engine/stages/registry.ts';
import { designStage, evaluatesPerMode, stageWindows, type StageDesign } from '../../src-main/engine/stages/index.ts';
import { parseStageFile } from '../../src-main/engine/stages/stage-json.ts';
import { partsForStage, tableToRows, type LibraryRow } from '../../src-main/engine/library.ts';
import { readCsv } from '../../src-main/export/csv.ts';
import { KIND_NAMES as WINDOW_KIND_NAMES } from '../../src-main/api/window-shared.ts';
import type { PlanStage } from '../../src-main/engine/plan-types.ts';
import type { StageDesign as ContractStageDesign } from '../../src-main/api/contract.ts';

describe('stage kind registry', () => {
  for (const kind of STAGE_MODEL_KINDS) {
    it(`${kind} provides every part of the interface`, () => {
      const m = kindModuleOf(kind);
      expect(m, kind).toBeDefined();
      expect(m!.kind).toBe(kind);
      expect(typeof m!.design).toBe('function');
      expect(typeof m!.evaluate).toBe('function');
      expect(m!.label, kind).toMatch(/^\S.*\S$/);
      for (const n of ['title', 'noun', 'feeding', 'full'] as const) expect(m!.names[n], `${kind} names.${n}`).toMatch(/^\S.*\S$/);
      expect(m!.colour, kind).toMatch(/^#[0-9a-f]{6}$/);
      expect(typeof m!.perMode, kind).toBe('boolean');
      expect(typeof m!.designFields, kind).toBe('function');
      expect(typeof m!.parts, kind).toBe('function');
      expect(typeof m!.window?.outputsAt, kind).toBe('function');
      expect(typeof m!.window?.cases, kind).toBe('function');
    });
  }

  const library: LibraryRow[] = (() => {
    const r = tableToRows(readCsv(readFileSync(join(import.meta.dirname, '../../db/default-library.csv'), 'utf8')));
    if (!r.ok) throw new Error('default library');
    return r.rows;
  })();
  const example = (kind: string) => parseStageFile(JSON.parse(readFileSync(join(import.meta.dirname, '../../docs/examples', `stage-${kind}.json`), 'utf8')));
  for (const kind of STAGE_MODEL_KINDS) {
    it(`${kind}: its entries work on its example design (fields, window cases, windows, BOM parts)`, () => {
      const file = example(kind);
      const r = designStage(file.spec!);
      expect(r.ok, kind).toBe(true);
      if (!r.ok) return;
      const d = r.design;
      expect(d.kind).toBe(kind);
      // Every field the entry names is carried by the design the engine gives.
      const fields = Object.keys(kindModuleOf(kind)!.designFields());
      expect(fields).toContain('kind');
      expect(fields).toContain('outputs');
      expect(missingDesignFields(d)).toEqual([]);
      // The tolerance cases are labelled apart (a corner's label names its case).
      const cases = kindModuleOf(kind)!.window.cases(d as never);
      expect(cases.length, kind).toBeGreaterThan(0);
      expect(new Set(cases.map((c) => c.label)).size).toBe(cases.length);
      // One window per output, each from finite corners.
      const sp = file.spec!;
      const w = stageWindows(d, file.corners ?? { vin: [sp.vinMin, sp.vinNom, sp.vinMax], iout: sp.outputs.map((o) => ({ min: o.currentMin, max: o.currentMax })) });
      expect(w.length).toBe(d.outputs.length);
      for (const x of w) expect(Number.isFinite(x.min) && Number.isFinite(x.max) && x.min <= x.max, `${kind} ${x.nodeId}`).toBe(true);
      // BOM parts, every one of this stage, none from the "no part mapping" fallback.
      const parts = partsForStage('st1', d, library);
      expect(parts.length, kind).toBeGreaterThan(0);
      for (const p of parts) {
        expect(p.stageId).toBe('st1');
        expect(p.problem ?? '').not.toMatch(/no part mapping/);
      }
    });
  }
  it('refuses a stage file design that lacks a field of its kind, naming the field', () => {
    const d = designStage(example('buck').spec!);
    if (!d.ok) throw new Error('buck example');
    const { divider: _dropped, ...rest } = d.design as StageDesign & { divider: unknown };
    expect(() => parseStageFile({ design: rest })).toThrow(/design\.divider: a buck design carries this field/);
    expect(parseStageFile({ design: JSON.parse(JSON.stringify(d.design)) }).design?.kind).toBe('buck');
  });
  it('names every kind apart, and the window reads the same names', () => {
    for (const n of ['title', 'noun', 'feeding', 'full'] as const) {
      const all = STAGE_MODEL_KINDS.map((k) => kindNames(k)[n]);
      expect(new Set(all).size, n).toBe(all.length);
    }
    const colours = STAGE_MODEL_KINDS.map((k) => kindModuleOf(k)!.colour);
    expect(new Set(colours).size).toBe(colours.length);
    expect(WINDOW_KIND_NAMES).toEqual(KIND_NAMES);
    expect(Object.keys(KIND_NAMES).sort()).toEqual([...STAGE_MODEL_KINDS].sort());
    // The remedy names a kind with its setting key when the trade word differs from it.
    expect(kindSettingName('cwbuck')).toBe('coupled-winding buck (cwbuck)');
    expect(kindSettingName('ldo')).toBe('LDO');
    expect(kindNames('flyback').noun).toBe('flyback');
  });
  it('passes the operating mode only to a kind gated per mode (the load switch, off in some modes)', () => {
    expect(STAGE_MODEL_KINDS.filter((k) => evaluatesPerMode(k))).toEqual(['load-switch']);
  });
  it('gives every kind a label of its own (the drawing tells the kinds apart by it)', () => {
    const labels = STAGE_MODEL_KINDS.map((k) => kindModuleOf(k)!.label);
    expect(new Set(labels).size).toBe(labels.length);
  });
  // The kinds that switch at a frequency (common practice: an LDO, a load switch and a
  // bought isolated module have no switching circuit to simulate).
  const SWITCHING = ['buck', 'cwbuck', 'boost', 'inverting', 'buck-boost-4s'] as const;
  it('gives every switching kind a netlist writer, and no other kind one', () => {
    for (const k of STAGE_MODEL_KINDS) {
      expect(typeof kindModuleOf(k)!.netlist, k).toBe((SWITCHING as readonly string[]).includes(k) ? 'function' : 'undefined');
    }
  });
  it('registers no kind that is not declared', () => {
    expect(Object.keys(STAGE_KINDS).sort()).toEqual([...STAGE_MODEL_KINDS].sort());
  });
  // Type-level: these lines fail `tsc --noEmit` (not the test run) when a declared kind has no
  // design in the StageDesign union, or a plan stage's design loses its type.
  it('types every kind\'s design in the union a plan stage carries', () => {
    expectTypeOf<StageDesign['kind']>().toEqualTypeOf<StageKind>();
    expectTypeOf<PlanStage['design']>().toEqualTypeOf<StageDesign | null>();
    expectTypeOf<ContractStageDesign>().toEqualTypeOf<StageDesign>();
  });
  it('refuses an unknown kind naming the field', () => {
    const r = designStage({ kind: 'flyback' } as never);
    expect(r.ok).toBe(false);
    expect(r.flags[0]!.code).toBe('unsupported-kind');
  });
});
