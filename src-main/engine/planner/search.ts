/**
 * Exact-cover branch and bound over candidate blocks.
 *
 * State: the set of rails still to feed (a bitmask), the blocks chosen so far and their
 * additive score. Branching: the lowest uncovered rail; every block that covers it and only
 * uncovered rails is a child, best bound first. Leaves are evaluated exactly with the coupling
 * between stages (evaluateSelection); the additive score of a block without downstream load
 * is a lower bound of its coupled score (losses do not fall when load rises; cost and part
 * count do not depend on load), so pruning on the additive bound never cuts off the optimum.
 *
 * Bounds on the rails still to feed:
 * - `dp`: the exact additive optimum of the remaining set, by dynamic programming over
 *   subsets (memoised, up to DP_MAX_RAILS rails);
 * - `share`: Σ over remaining rails of the smallest per-rail share of a block's score
 *   (score ÷ rails covered), valid for any number of rails.
 * The search finishes when every branch is explored or pruned: that proves the optimum.
 * With a budget it is anytime: the incumbent is the best complete plan found so far.
 */
import type { BlockFactory } from './candidates.ts';
import { evaluateSelection, type Scorer, type SelectionEval } from './score.ts';
import type { Block } from './types.ts';

export const DP_MAX_RAILS = 16;
/** Sets are 32-bit masks: the search handles up to this many rails. */
export const MAX_RAILS = 30;
const EPS = 1e-9;

export interface SearchOutcome {
  best: { blocks: Block[]; sel: SelectionEval; score: number } | null;
  explored: number;
  leaves: number;
  complete: boolean;
  /** Why the best leaf candidates failed, when none was feasible. */
  leafFailures: Map<string, { count: number; example: NonNullable<SelectionEval['failure']> }>;
}

interface Frame {
  rem: number;
  partial: number;
  /** `i` is the block's position in the list this search was given. */
  options: { block: Block; i: number; bound: number }[];
  next: number;
}

/** One branch-and-bound run for one scorer. A generator: each `yield` is one node expanded. */
export function* branchAndBound(
  f: BlockFactory, blocks: readonly Block[], scorer: Scorer,
  seed?: { blocks: Block[]; score: number } | null,
  /** Filled as the search goes, so a caller that stops early still reads the incumbent. */
  out: SearchOutcome = { best: null, explored: 0, leaves: 0, complete: false, leafFailures: new Map() },
  /** Per block (aligned with `blocks`): a lower bound of the cost its input adds upstream. */
  floors?: readonly number[],
): Generator<void, SearchOutcome> {
  const n = f.ctx.rails.length;
  const full = n === 32 ? 0xffffffff : ((1 << n) >>> 0) - 1;
  // Bounding scores: the block's own score plus its coupling floor.
  const score = blocks.map((b, i) => scorer.score(b.base) + (floors?.[i] ?? 0));
  const floorOf = new Map<Block, number>();
  if (floors) blocks.forEach((b, i) => floorOf.set(b, floors[i] ?? 0));
  const mask = blocks.map((b) => b.covers.reduce((m, r) => (m | (1 << r)) >>> 0, 0));
  const byRail: number[][] = Array.from({ length: n }, () => []);
  blocks.forEach((b, i) => { for (const r of b.covers) byRail[r]!.push(i); });
  // Cheapest share first, then by key for determinism.
  for (const list of byRail) list.sort((a, b) => score[a]! / blocks[a]!.covers.length - score[b]! / blocks[b]!.covers.length || (blocks[a]!.key < blocks[b]!.key ? -1 : 1));
  const minShare = byRail.map((l) => (l.length ? Math.min(...l.map((i) => score[i]! / blocks[i]!.covers.length)) : Infinity));
  const useDp = n <= DP_MAX_RAILS;
  const dp = useDp ? new Float64Array(1 << n).fill(NaN) : null;
  if (dp) dp[0] = 0;
  const lowBit = (m: number) => 31 - Math.clz32(m & -m);
  // Exact additive optimum of a remaining set (iterative memoised DP over subsets).
  const dpValue = (rem0: number): number => {
    if (!dp) return 0;
    const v0 = dp[rem0]!;
    if (!Number.isNaN(v0)) return v0;
    const stack: number[] = [rem0];
    while (stack.length) {
      const rem = stack[stack.length - 1]!;
      if (!Number.isNaN(dp[rem]!)) { stack.pop(); continue; }
      const r = lowBit(rem);
      let best = Infinity;
      let pending = false;
      for (const i of byRail[r]!) {
        const m = mask[i]!;
        if ((m & rem) >>> 0 !== m) continue;
        const sub = (rem & ~m) >>> 0;
        const v = dp[sub]!;
        if (Number.isNaN(v)) { stack.push(sub); pending = true; continue; }
        if (score[i]! + v < best) best = score[i]! + v;
      }
      if (!pending) { dp[rem] = best; stack.pop(); }
    }
    return dp[rem0]!;
  };
  const shareBound = (rem: number): number => {
    let s = 0;
    for (let m = rem; m; m &= m - 1) s += minShare[lowBit(m)]!;
    return s;
  };
  const bound = (rem: number) => (useDp ? dpValue(rem) : shareBound(rem));

  let incumbent = seed ? seed.score : Infinity;
  const leafFailures = out.leafFailures;
  const chosen: Block[] = [];
  const expand = (rem: number, partial: number): Frame => {
    const r = lowBit(rem);
    const options: Frame['options'] = [];
    for (const i of byRail[r]!) {
      const m = mask[i]!;
      if ((m & rem) >>> 0 !== m) continue;
      const b = partial + score[i]! + bound((rem & ~m) >>> 0);
      if (b < incumbent - EPS) options.push({ block: blocks[i]!, i, bound: b });
    }
    options.sort((a, b) => a.bound - b.bound || (a.block.key < b.block.key ? -1 : 1));
    return { rem, partial, options, next: 0 };
  };
  if (full === 0 || bound(full) === Infinity) { out.complete = true; return out; }
  const stack: Frame[] = [expand(full, 0)];
  while (stack.length) {
    const top = stack[stack.length - 1]!;
    if (top.next >= top.options.length) {
      stack.pop();
      if (stack.length) chosen.pop();
      continue;
    }
    const opt = top.options[top.next++]!;
    if (opt.bound >= incumbent - EPS) { top.next = top.options.length; continue; }
    out.explored++;
    const rem = (top.rem & ~mask[opt.i]!) >>> 0;
    // Exact score of the chosen blocks with the load they put on each other so far (a lower
    // bound of their final score: loads only grow as more blocks are chosen).
    chosen.push(opt.block);
    const ev = evaluateSelection(f, chosen, { partial: rem !== 0 });
    if (!ev.ok) {
      if (rem === 0) out.leaves++;
      if (ev.failure) {
        const k = ev.failure.constraint;
        const cur = leafFailures.get(k);
        if (cur) cur.count++; else leafFailures.set(k, { count: 1, example: ev.failure });
      }
      chosen.pop();
      yield;
      continue;
    }
    let exact = 0;
    for (const e of ev.evals) exact += scorer.score(e);
    const scoreOnly = exact;
    // Chosen blocks whose feeding rail is still open: their floor is not in `exact` yet.
    if (floors && rem !== 0) {
      for (const b of chosen) if (b.shape.input.kind === 'rail' && (rem & (1 << b.shape.input.rail)) !== 0) exact += floorOf.get(b) ?? 0;
    }
    if (rem === 0) {
      out.leaves++;
      if (scoreOnly < incumbent - EPS) { incumbent = scoreOnly; out.best = { blocks: [...chosen], sel: ev, score: scoreOnly }; }
      chosen.pop();
    } else if (exact + bound(rem) >= incumbent - EPS) {
      chosen.pop();
    } else {
      stack.push(expand(rem, exact));
    }
    yield;
  }
  out.complete = true;
  return out;
}

/** Bitmask helpers shared with tests. */
export function railMask(covers: readonly number[]): number {
  return covers.reduce((m, r) => (m | (1 << r)) >>> 0, 0);
}
