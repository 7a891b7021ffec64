// Every declared stage kind (engine/model.ts STAGE_MODEL_KINDS) is registered with a designer
// and an evaluator (stages/registry.ts); an unknown kind is refused by name. Common practice.
import { describe, expect, expectTypeOf, it } from 'vitest';
import { STAGE_MODEL_KINDS, type StageKind } from '../../src-main/engine/model.ts';
import { STAGE_KINDS, kindModuleOf } from '../../src-main/engine/stages/registry.ts';
import { designStage, type StageDesign } from '../../src-main/engine/stages/index.ts';
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
    });
  }
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
