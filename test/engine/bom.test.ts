// BOM: part choice from the library against the design's ratings, grouping, designators,
// costs, preload resistors, and parts the library cannot supply.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { handRequirements } from '../export/hand-plan.ts';
import { designedHandPlan } from '../export/hand-designs.ts';
import { buildBom, compactRefs } from '../../src-main/engine/bom.ts';
import { emptyParts } from '../../src-main/engine/planner/cost-model.ts';
import { libraryCostModel, libraryUnitCosts, numParam, partsForStage, tableToRows, type LibraryRow } from '../../src-main/engine/library.ts';
import { readCsv } from '../../src-main/export/csv.ts';
import type { CoupledBuckDesign, StageDesign } from '../../src-main/engine/stages/index.ts';

const lib = (() => {
  const r = tableToRows(readCsv(readFileSync(join(import.meta.dirname, '../../db/default-library.csv'), 'utf8')));
  if (!r.ok) throw new Error('library');
  return r.rows;
})();
const byId = new Map(lib.map((r) => [r.id, r]));

describe('parts for a stage', () => {
  const req = handRequirements();
  const pr = designedHandPlan(req);
  const stages = pr.best!.stages;

  it('chooses capacitors rated at least as high as the design asks, holding the value', () => {
    for (const st of stages) {
      // The plan's stages carry capacitors (a load switch has none).
      const d = st.design as Exclude<StageDesign, { kind: 'load-switch' | 'iso-module' }>;
      const caps = [d.cin, d.cout, ...(d.kind === 'cwbuck' ? d.secondaries.map((w) => w.cout) : [])];
      const picks = partsForStage(st.id, d, lib).filter((p) => p.prefix === 'C');
      expect(picks).toHaveLength(caps.length);
      for (const c of caps) {
        const p = picks.find((x) => x.role === c.role)!;
        const row = byId.get(p.libraryId!)!;
        // Derated rating (ceramic ≤ 60 % of rating, DESIGN.md §4, NASA EEE-INST-002 style; the designer applied it).
        expect(numParam(row, 'vRated')).toBeGreaterThanOrEqual(c.ratedVoltage);
        expect(c.workingVoltage).toBeLessThanOrEqual(req.limits.ceramicDerating * numParam(row, 'vRated') + 1e-9);
        expect(numParam(row, 'cMax')).toBeGreaterThanOrEqual(c.value);
        expect(p.quantity).toBe(c.count);
      }
    }
  });

  it('rates rectifiers above the reverse voltage and the average current (common practice margins)', () => {
    const st = stages.find((s) => s.kind === 'cwbuck')!;
    const d = st.design as CoupledBuckDesign;
    const rects = partsForStage(st.id, d, lib).filter((p) => p.prefix === 'D');
    expect(rects).toHaveLength(d.secondaries.length);
    rects.forEach((p, k) => {
      const row = byId.get(p.libraryId!)!;
      expect(numParam(row, 'vr') * 0.8).toBeGreaterThanOrEqual(d.secondaries[k]!.rectifierReverseVoltage);
    });
  });

  it('adds a preload resistor rated within the power derating when a winding needs one', () => {
    const st = stages.find((s) => s.kind === 'cwbuck')!;
    const d = structuredClone(st.design as CoupledBuckDesign);
    d.secondaries[0]!.preload = { resistance: 1000 as never, current: 0.012 as never };
    const picks = partsForStage(st.id, d, lib);
    const pre = picks.find((p) => p.role.startsWith('preload'))!;
    expect(pre.value).toBe('1 kΩ');
    // P = V²/R at 110 % of 12 V: 13.2²/1000 = 0.174 W; rating × 0.5 derating must cover it → ≥ 0.25 W part.
    expect(numParam(byId.get(pre.libraryId!)!, 'power') * 0.5).toBeGreaterThanOrEqual(0.174);
  });

  it('prefers the cheaper of an integrated regulator and a controller with two switches', () => {
    const st = stages.find((s) => s.kind === 'buck')!;
    const picks = partsForStage(st.id, st.design, lib);
    expect(picks.filter((p) => p.prefix === 'U')).toHaveLength(1);
    expect(picks.filter((p) => p.prefix === 'Q')).toHaveLength(0);
    // Without integrated regulators in the library, a controller and two switches are chosen.
    const noInt = lib.filter((r) => !(r.partClass === 'controller' && numParam(r, 'integrated') === 1));
    const ext = partsForStage(st.id, st.design, noInt);
    expect(ext.filter((p) => p.prefix === 'Q')).toHaveLength(2);
    const sw = byId.get(ext.find((p) => p.prefix === 'Q')!.libraryId!)!;
    expect(numParam(sw, 'vds')).toBeGreaterThanOrEqual(1.25 * 32); // Vds ≥ 1.25·Vin max (common practice)
  });

  it('keeps the coupled-winding controller in forced PWM', () => {
    const st = stages.find((s) => s.kind === 'cwbuck')!;
    const u = partsForStage(st.id, st.design, lib).find((p) => p.prefix === 'U')!;
    expect(numParam(byId.get(u.libraryId!)!, 'forcedPwm')).toBe(1);
  });

  it('lists a part no library row fits, without cost, with the reason', () => {
    const st = stages.find((s) => s.kind === 'ldo')!;
    const picks = partsForStage(st.id, st.design, lib.filter((r) => r.partClass !== 'ldo'));
    const u = picks.find((p) => p.prefix === 'U')!;
    expect(u.libraryId).toBeNull();
    expect(u.unitCost).toBe(0);
    expect(u.problem).toMatch(/no LDO in the library/);
  });
});

describe('BOM grouping and designators', () => {
  const req = handRequirements();
  const pr = designedHandPlan(req);
  const bom = buildBom(req, pr.best!, lib);

  it('merges identical parts, keeps quantities and costs consistent, totals add up', () => {
    const keys = bom.lines.map((l) => [l.partClass, l.libraryId, l.value, l.rating, l.package].join('|'));
    expect(new Set(keys).size).toBe(keys.length);
    for (const l of bom.lines) expect(l.extendedCost).toBeCloseTo(l.unitCost * l.quantity, 12);
    expect(bom.totalCost).toBeCloseTo(bom.lines.reduce((a, l) => a + l.extendedCost, 0), 12);
    expect(bom.totalParts).toBe(bom.items.reduce((a, i) => a + i.quantity, 0));
    // The two 0402 1 % feedback resistors of different value stay separate lines.
    expect(bom.lines.filter((l) => l.libraryId === 'res-0402-1pc').length).toBe(4);
  });

  it('numbers designators stage by stage in plan order', () => {
    const first = (stageId: string, prefix: string) => bom.items.find((i) => i.stageId === stageId && i.prefix === prefix)!.refs[0];
    expect(first('st-buck-3v3', 'U')).toBe('U1');
    expect(first('st-cw-5v', 'U')).toBe('U2');
    expect(first('st-ldo-5q', 'U')).toBe('U3');
    expect(first('st-buck-3v3', 'C')).toBe('C1');
  });

  it('asks the custom magnetic for the isolation class of the barrier it crosses', () => {
    const mag = bom.lines.find((l) => l.partClass === 'magnetic-custom')!;
    expect(mag.rating).toContain('basic isolation 60 V');
    // The chosen former supports at least basic isolation (1).
    expect(numParam(byId.get(mag.libraryId!)!, 'isolation')).toBeGreaterThanOrEqual(1);
  });

  it('compacts designator runs', () => {
    expect(compactRefs(['C3', 'C1', 'C2', 'C5', 'R1'])).toBe('C1–C3, C5, R1');
    expect(compactRefs(['D1', 'D2'])).toBe('D1, D2');
    expect(compactRefs(['C9', 'C10', 'C11'])).toBe('C9–C11');
  });

  it('builds from an empty library without crashing, listing every part as missing', () => {
    const empty: LibraryRow[] = [];
    const b = buildBom(req, pr.best!, empty);
    expect(b.totalCost).toBe(0);
    expect(b.problems.length).toBe(b.items.length);
    expect(b.allCostsInvented).toBe(false);
  });
});

describe('library as the planner cost model', () => {
  it('prices part categories at the median library row and scales with the library', () => {
    const u = libraryUnitCosts(lib);
    // Median of the LDO rows' costs (hand check against the rows themselves, common practice).
    const ldo = lib.filter((r) => r.partClass === 'ldo').map((r) => r.cost).sort((a, b) => a - b);
    const mid = ldo.length % 2 ? ldo[(ldo.length - 1) / 2]! : (ldo[ldo.length / 2 - 1]! + ldo[ldo.length / 2]!) / 2;
    expect(u.ldo).toBeCloseTo(mid, 12);
    const parts = { ...emptyParts(), controller: 1, magnetic: 1, capacitor: 3, resistor: 2, ldo: 1 };
    const base = libraryCostModel(lib).cost(parts, 'buck');
    expect(base).toBeCloseTo(u.controller + u.magnetic + 3 * u.capacitor + 2 * u.resistor + u.ldo, 6);
    const doubled = libraryCostModel(lib.map((r) => ({ ...r, cost: 2 * r.cost }))).cost(parts, 'buck');
    expect(doubled).toBeCloseTo(2 * base, 6);
    expect(libraryCostModel([]).referenceStageCost).toBe(1);
  });
});
