/**
 * Bill of materials: every stage's parts (library.ts partsForStage), reference designators
 * assigned stage by stage in plan order (U, Q, L, T, D, C, R, each counting up across the
 * whole tree, so the same plan always gets the same designators), then grouped by identical
 * part (class, library row, value, rating, package) with quantities, unit and extended cost.
 * Custom magnetics are never merged (each has its own specification sheet).
 */
import type { Plan } from './plan-types.ts';
import { isolationRank, type Requirements } from './model.ts';
import { partsForStage, type LibraryRow, type PartClass, type PartPick } from './library.ts';

export interface BomItem extends PartPick {
  refs: string[];
}

export interface BomLine {
  /** 1-based line number. */
  line: number;
  refs: string[];
  quantity: number;
  partClass: PartClass;
  libraryId: string | null;
  description: string;
  value: string;
  rating: string;
  package: string;
  unitCost: number;
  extendedCost: number;
  costNote: string;
  /** What procurement orders; empty strings for a generic row. */
  manufacturer: string;
  partNumber: string;
  /** Stage ids the line's parts belong to. */
  stages: string[];
  specRef?: string;
  problem?: string;
}

export interface Bom {
  lines: BomLine[];
  /** Parts per stage, with their designators (for the report and the window). */
  items: BomItem[];
  totalCost: number;
  totalParts: number;
  /** Parts no library row fits: listed, not costed. */
  problems: string[];
  /** True when every costed row of the library used is labelled an invented estimate. */
  allCostsInvented: boolean;
}

const PREFIX_ORDER: Record<PartPick['prefix'], number> = { U: 0, Q: 1, T: 2, L: 3, D: 4, C: 5, R: 6 };

function refNumberSort(a: string, b: string): number {
  const pa = a.replace(/\d+$/, '');
  const pb = b.replace(/\d+$/, '');
  return pa.localeCompare(pb) || Number(a.slice(pa.length)) - Number(b.slice(pb.length));
}

/** Compact designator list: U1, U2, U3, U5 → "U1–U3, U5". */
export function compactRefs(refs: string[]): string {
  const sorted = [...refs].sort(refNumberSort);
  const out: string[] = [];
  let i = 0;
  while (i < sorted.length) {
    const p = sorted[i]!.replace(/\d+$/, '');
    const n0 = Number(sorted[i]!.slice(p.length));
    let j = i;
    while (j + 1 < sorted.length && sorted[j + 1]!.replace(/\d+$/, '') === p && Number(sorted[j + 1]!.slice(p.length)) === Number(sorted[j]!.slice(p.length)) + 1) j++;
    const n1 = Number(sorted[j]!.slice(p.length));
    out.push(j - i >= 2 ? `${p}${n0}–${p}${n1}` : j === i ? `${p}${n0}` : `${p}${n0}, ${p}${n1}`);
    i = j + 1;
  }
  return out.join(', ');
}

export function buildBom(req: Requirements, plan: Plan, library: LibraryRow[]): Bom {
  const counters: Record<string, number> = {};
  const items: BomItem[] = [];
  for (const st of plan.stages) {
    const barrier = [...st.barriers].sort((a, b) => isolationRank(b.isolation) - isolationRank(a.isolation) || b.workingVoltage - a.workingVoltage)[0];
    const picks = partsForStage(st.id, st.design, library, {
      powerDerating: req.limits.powerDerating, electrolyticDerating: req.limits.electrolyticDerating,
      isolation: barrier ? { class: barrier.isolation, workingVoltage: barrier.workingVoltage } : null,
    });
    // Within a stage: by designator letter, then in the order the stage lists its parts.
    const ordered = picks.map((p, i) => ({ p, i })).sort((a, b) => PREFIX_ORDER[a.p.prefix] - PREFIX_ORDER[b.p.prefix] || a.i - b.i);
    for (const { p } of ordered) {
      const refs: string[] = [];
      for (let k = 0; k < p.quantity; k++) {
        counters[p.prefix] = (counters[p.prefix] ?? 0) + 1;
        refs.push(`${p.prefix}${counters[p.prefix]}`);
      }
      items.push({ ...p, refs });
    }
  }

  const groups = new Map<string, BomLine>();
  for (const it of items) {
    const key = it.partClass === 'magnetic-custom' || it.libraryId === null
      ? `unique\u0000${it.stageId}\u0000${it.role}`
      : [it.partClass, it.libraryId, it.value, it.rating, it.package].join('\u0000');
    const g = groups.get(key);
    if (g) {
      g.refs.push(...it.refs);
      g.quantity += it.quantity;
      g.extendedCost += it.unitCost * it.quantity;
      if (!g.stages.includes(it.stageId)) g.stages.push(it.stageId);
    } else {
      groups.set(key, {
        line: 0, refs: [...it.refs], quantity: it.quantity, partClass: it.partClass, libraryId: it.libraryId,
        description: it.description, value: it.value, rating: it.rating, package: it.package,
        unitCost: it.unitCost, extendedCost: it.unitCost * it.quantity, costNote: it.costNote,
        manufacturer: it.manufacturer ?? '', partNumber: it.partNumber ?? '', stages: [it.stageId],
        ...(it.specRef ? { specRef: it.specRef } : {}), ...(it.problem ? { problem: it.problem } : {}),
      });
    }
  }
  // Lines ordered by designator letter, then by first designator number: stable for a plan.
  const lines = [...groups.values()];
  for (const l of lines) l.refs.sort(refNumberSort);
  lines.sort((a, b) => {
    const pa = a.refs[0]!.replace(/\d+$/, '');
    const pb = b.refs[0]!.replace(/\d+$/, '');
    return PREFIX_ORDER[pa as PartPick['prefix']] - PREFIX_ORDER[pb as PartPick['prefix']] || refNumberSort(a.refs[0]!, b.refs[0]!);
  });
  lines.forEach((l, i) => { l.line = i + 1; });
  const totalCost = lines.reduce((a, l) => a + l.extendedCost, 0);
  const totalParts = lines.reduce((a, l) => a + l.quantity, 0);
  const problems = items.filter((i) => i.problem).map((i) => `${i.refs.join(', ')} (${i.stageId}): ${i.problem}`);
  const costed = lines.filter((l) => l.libraryId !== null);
  return {
    lines, items, totalCost, totalParts, problems,
    allCostsInvented: costed.length > 0 && costed.every((l) => /invented estimate/i.test(l.costNote)),
  };
}
