/**
 * Scoring of blocks and plans, and the exact evaluation of a complete selection of blocks
 * with the coupling between stages (a stage fed from a rail loads the stage that makes it).
 *
 * Weighted score (lower is better), each term normalised so the weights compare like with like:
 *   w.loss  · loss  / (10 % of the mode-weighted load power)
 * + w.cost  · cost  / (number of rails × cost of one typical buck)
 * + w.parts · parts / (number of rails × parts of one typical buck)
 * A plan that gives every rail its own typical buck at 90 % efficiency scores about
 * w.loss + w.cost + w.parts. The normalisers depend only on the requirements, so the score of a
 * plan is the sum of its blocks' scores (additive) for a fixed downstream load.
 */
import { DEFAULT_MAX_MAGNETICS_PER_DOMAIN, type Id, type Requirements } from '../model.ts';
import type { PlanScore } from '../plan-types.ts';
import type { Watts } from '../units.ts';
import type { BlockFactory } from './candidates.ts';
import type { Block, BlockEval, CostModel, PlanContext } from './types.ts';

export type Objective = 'loss' | 'cost' | 'parts' | 'balanced';
export const OBJECTIVES: readonly Objective[] = ['balanced', 'loss', 'cost', 'parts'];

/** Weight given to the other objectives when one objective is chosen: they only break ties. */
export const TIE_WEIGHT = 1e-3;

export interface Scorer {
  objective: Objective;
  weights: { loss: number; cost: number; parts: number };
  norm: { loss: number; cost: number; parts: number };
  score(e: { loss: number; cost: number; parts: number }): number;
}

export function normalisers(ctx: PlanContext, cm: CostModel): { loss: number; cost: number; parts: number } {
  let p = 0;
  for (const r of ctx.rails) {
    ctx.modeIds.forEach((m, i) => { p += Math.abs(r.voltage) * (r.current[m] ?? 0) * (ctx.shares[i] ?? 0); });
  }
  const n = Math.max(ctx.rails.length, 1);
  return { loss: Math.max(0.1 * p, 1e-3), cost: Math.max(n * cm.referenceStageCost, 1e-9), parts: Math.max(n * cm.referenceStageParts, 1) };
}

export function objectiveWeights(objective: Objective, req: Requirements): { loss: number; cost: number; parts: number } {
  const t = TIE_WEIGHT;
  switch (objective) {
    case 'loss': return { loss: 1, cost: t, parts: t };
    case 'cost': return { loss: t, cost: 1, parts: t };
    case 'parts': return { loss: t, cost: t, parts: 1 };
    default: {
      const w = req.preferences.weights;
      return { loss: Math.max(0, w.loss), cost: Math.max(0, w.cost), parts: Math.max(0, w.parts) };
    }
  }
}

export function makeScorer(objective: Objective, req: Requirements, ctx: PlanContext, cm: CostModel): Scorer {
  const weights = objectiveWeights(objective, req);
  const norm = normalisers(ctx, cm);
  return {
    objective, weights, norm,
    score: (e) => weights.loss * e.loss / norm.loss + weights.cost * e.cost / norm.cost + weights.parts * e.parts / norm.parts,
  };
}

export interface SelectionEval {
  ok: boolean;
  /** Block evaluations with their downstream load, index-aligned with the selection. */
  evals: BlockEval[];
  /** Order of the selection from upstream to downstream (indices into the selection). */
  order: number[];
  /** Index in the selection of the block feeding each selected block (−1 = a source). */
  parent: number[];
  loss: number;
  cost: number;
  parts: number;
  failure?: { constraint: string; text: string; shortfall: number; unit: string; railIndex?: number };
}

/**
 * Evaluate a complete selection exactly: every rail covered once (checked), the feed graph
 * acyclic, each block re-evaluated with the input currents of the blocks it feeds (deepest
 * first), and each source within its current limit at its lowest voltage in every mode.
 */
export function evaluateSelection(f: BlockFactory, sel: readonly Block[], opts: { partial?: boolean } = {}): SelectionEval {
  const n = f.ctx.rails.length;
  const nModes = f.ctx.modeIds.length;
  const coverOf = new Array<number>(n).fill(-1);
  const fail = (constraint: string, text: string, shortfall = 0, unit = '', railIndex?: number): SelectionEval => ({
    ok: false, evals: [], order: [], parent: [], loss: Infinity, cost: Infinity, parts: Infinity,
    failure: { constraint, text, shortfall, unit, ...(railIndex !== undefined ? { railIndex } : {}) },
  });
  sel.forEach((b, i) => {
    for (const r of b.covers) coverOf[r] = coverOf[r] === -1 ? i : -2;
  });
  for (let r = 0; r < n; r++) {
    if (coverOf[r] === -1 && !opts.partial) return fail('cover', `${f.ctx.rails[r]!.name} is not fed`, 0, '', r);
    if (coverOf[r] === -2) return fail('cover', `${f.ctx.rails[r]!.name} is fed twice`, 0, '', r);
  }
  // At most maxMagneticsPerIsolatedDomain magnetics cross into each isolated domain (a design
  // limit). A partial selection that exceeds it cannot be completed within it (crossings only
  // grow as blocks are added), so the check is exact in partial mode too, not a bound.
  const over = magneticsOverLimit(f, sel);
  if (over) return fail('magnetics-per-domain', over.text, over.shortfall, '', over.railIndex);
  // In a partial selection a block whose feeding rail is not chosen yet is treated as a root:
  // its load reaches the feeder later, so the partial score is a lower bound of the final one.
  const parent = sel.map((b) => (b.shape.input.kind === 'rail' ? Math.max(-1, coverOf[b.shape.input.rail]!) : -1));
  // Topological order, upstream first; a cycle makes the selection infeasible.
  const state = new Array<number>(sel.length).fill(0);
  const order: number[] = [];
  const children: number[][] = sel.map(() => []);
  parent.forEach((p, i) => { if (p >= 0) children[p]!.push(i); });
  const visit = (i: number): boolean => {
    if (state[i] === 2) return true;
    if (state[i] === 1) return false;
    state[i] = 1;
    const p = parent[i]!;
    if (p >= 0 && !visit(p)) return false;
    state[i] = 2;
    order.push(i);
    return true;
  };
  for (let i = 0; i < sel.length; i++) if (!visit(i)) return fail('cycle', 'the feeds form a loop');
  // Evaluate from the leaves up: each block with the input currents of its children.
  const evals = new Array<BlockEval | undefined>(sel.length);
  for (let k = order.length - 1; k >= 0; k--) {
    const i = order[k]!;
    const b = sel[i]!;
    let extra: Map<number, number[]> | undefined;
    for (const c of children[i]!) {
      const ce = evals[c]!;
      const rail = (sel[c]!.shape.input as { rail: number }).rail;
      extra ??= new Map();
      const e = extra.get(rail) ?? new Array<number>(nModes).fill(0);
      for (let m = 0; m < nModes; m++) e[m]! += ce.iinPerMode[m]!;
      extra.set(rail, e);
    }
    if (!extra) { evals[i] = b.base; continue; }
    const res = f.evaluate(b.shape, extra);
    if (!res.ok) {
      const rj = res.rejections[0]!;
      return fail(rj.constraint, `with the load of the stages it feeds, ${rj.text}`, rj.shortfall, rj.unit, rj.rail);
    }
    // The search's bounds assume a block's loss, cost and part count do not fall when its
    // downstream load rises; every evaluation with a downstream load checks it.
    const e = res.eval, e0 = b.base;
    if (e.loss < e0.loss - 1e-9 * Math.max(1, e0.loss) || e.cost < e0.cost - 1e-9 || e.parts < e0.parts) f.noteBoundViolation(b.key, e0, e);
    evals[i] = res.eval;
  }
  // Source current limits at each source's lowest voltage, every mode.
  for (const s of f.req.sources) {
    for (let m = 0; m < nModes; m++) {
      let i = 0;
      sel.forEach((b, k) => { if (b.shape.input.kind === 'source' && b.shape.input.id === s.id) i += evals[k]!.iinAtMin[m]!; });
      if (i > s.currentLimit * (1 + 1e-9)) {
        return fail('source-current', `${s.name} would deliver ${i.toFixed(3)} A in mode ${f.req.modes[m]?.name ?? m} at ${s.vMin} V, above its ${s.currentLimit} A limit`, i - s.currentLimit, 'A');
      }
    }
  }
  let loss = 0, cost = 0, parts = 0;
  for (const e of evals) { loss += e!.loss; cost += e!.cost; parts += e!.parts; }
  return { ok: true, evals: evals as BlockEval[], order, parent, loss, cost, parts };
}

/** The isolated domains a block's stages cross into (a coupled-winding magnetic's or an isolated module's barrier). */
export function blockCrossings(b: Block): Id[] {
  const out: Id[] = [];
  for (const st of b.base.stages) for (const br of st.barriers) if (!out.includes(br.toDomainId)) out.push(br.toDomainId);
  return out;
}

/**
 * The first isolated domain that more magnetics cross into than the design limit allows
 * (limits.maxMagneticsPerIsolatedDomain, default DEFAULT_MAX_MAGNETICS_PER_DOMAIN), with the
 * count and the stages that cross, or null. Each block is one magnetic or one module.
 */
export function magneticsOverLimit(f: BlockFactory, sel: readonly Block[]): { text: string; shortfall: number; railIndex?: number } | null {
  const limit = f.req.limits.maxMagneticsPerIsolatedDomain ?? DEFAULT_MAX_MAGNETICS_PER_DOMAIN;
  let by: Map<Id, Block[]> | null = null;
  for (const b of sel) {
    if (b.shape.kind !== 'cwbuck' && b.shape.kind !== 'iso-module') continue;
    for (const d of blockCrossings(b)) {
      by ??= new Map();
      const list = by.get(d) ?? [];
      list.push(b);
      by.set(d, list);
    }
  }
  if (!by) return null;
  for (const [d, list] of by) {
    if (list.length <= limit) continue;
    const dom = f.req.domains.find((x) => x.id === d);
    const names = list.map((b) => b.base.stages[0]?.name ?? b.key);
    const railIndex = f.ctx.rails.findIndex((r) => r.domainId === d);
    return {
      text: `${dom?.name ?? d} would be reached through ${list.length} magnetics (${names.join(', ')}), above the limit of ${limit} per isolated domain in the design limits`,
      shortfall: list.length - limit,
      ...(railIndex >= 0 ? { railIndex } : {}),
    };
  }
  return null;
}

export function planScore(s: { loss: number; cost: number; parts: number }, scorer: Scorer): PlanScore {
  return { loss: s.loss as Watts, cost: Math.round(s.cost * 1e6) / 1e6, parts: s.parts, weighted: scorer.score(s) };
}

export type { BlockFactory };
