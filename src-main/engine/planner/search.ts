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
import { MAX_PLANNED_RAILS } from '../rails.ts';

export const DP_MAX_RAILS = 16;
/**
 * Sets of rails are two 32-bit words (rails 0–31 in `lo`, 32–63 in `hi`): the search handles
 * up to this many rails, the same limit `validate` states (rails.ts), so every project it
 * accepts is planned.
 */
export const MAX_RAILS = MAX_PLANNED_RAILS;
if (MAX_RAILS > 64) throw new Error('rail sets are two 32-bit words: at most 64 rails');
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
  /** Rails still to feed: bits 0–31 and 32–63. */
  rem: number;
  remHi: number;
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
  if (n > MAX_RAILS) throw new RangeError(`the search handles up to ${MAX_RAILS} rails (got ${n})`);
  const word = (k: number) => (k >= 32 ? 0xffffffff : ((1 << k) >>> 0) - 1);
  const full = word(Math.min(n, 32));
  const fullHi = n > 32 ? word(n - 32) : 0;
  // Bounding scores: the block's own score plus its coupling floor.
  const score = blocks.map((b, i) => scorer.score(b.base) + (floors?.[i] ?? 0));
  const floorOf = new Map<Block, number>();
  if (floors) blocks.forEach((b, i) => floorOf.set(b, floors[i] ?? 0));
  const mask = blocks.map((b) => b.covers.reduce((m, r) => (r < 32 ? (m | (1 << r)) >>> 0 : m), 0));
  const maskHi = blocks.map((b) => b.covers.reduce((m, r) => (r >= 32 ? (m | (1 << (r - 32))) >>> 0 : m), 0));
  const fits = (i: number, lo: number, hi: number) => (mask[i]! & lo) >>> 0 === mask[i]! && (maskHi[i]! & hi) >>> 0 === maskHi[i]!;
  const isOpen = (rail: number, lo: number, hi: number) => (rail < 32 ? (lo & (1 << rail)) !== 0 : (hi & (1 << (rail - 32))) !== 0);
  const byRail: number[][] = Array.from({ length: n }, () => []);
  blocks.forEach((b, i) => { for (const r of b.covers) byRail[r]!.push(i); });
  // Cheapest share first, then by key for determinism.
  for (const list of byRail) list.sort((a, b) => score[a]! / blocks[a]!.covers.length - score[b]! / blocks[b]!.covers.length || (blocks[a]!.key < blocks[b]!.key ? -1 : 1));
  const minShare = byRail.map((l) => (l.length ? Math.min(...l.map((i) => score[i]! / blocks[i]!.covers.length)) : Infinity));
  const useDp = n <= DP_MAX_RAILS;
  const dp = useDp ? new Float64Array(1 << n).fill(NaN) : null;
  if (dp) dp[0] = 0;
  const lowBit = (m: number) => 31 - Math.clz32(m & -m);
  const lowRail = (lo: number, hi: number) => (lo ? lowBit(lo) : 32 + lowBit(hi));
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
  const shareBound = (rem: number, remHi: number): number => {
    let s = 0;
    for (let m = rem; m; m &= m - 1) s += minShare[lowBit(m)]!;
    for (let m = remHi; m; m &= m - 1) s += minShare[32 + lowBit(m)]!;
    return s;
  };
  // The DP runs only up to DP_MAX_RAILS (< 32) rails, where the high word is always 0.
  const bound = (rem: number, remHi: number) => (useDp ? dpValue(rem) : shareBound(rem, remHi));

  let incumbent = seed ? seed.score : Infinity;
  const leafFailures = out.leafFailures;
  const chosen: Block[] = [];
  const expand = (rem: number, remHi: number, partial: number): Frame => {
    const r = lowRail(rem, remHi);
    const options: Frame['options'] = [];
    for (const i of byRail[r]!) {
      if (!fits(i, rem, remHi)) continue;
      const b = partial + score[i]! + bound((rem & ~mask[i]!) >>> 0, (remHi & ~maskHi[i]!) >>> 0);
      if (b < incumbent - EPS) options.push({ block: blocks[i]!, i, bound: b });
    }
    options.sort((a, b) => a.bound - b.bound || (a.block.key < b.block.key ? -1 : 1));
    return { rem, remHi, partial, options, next: 0 };
  };
  if ((full === 0 && fullHi === 0) || bound(full, fullHi) === Infinity) { out.complete = true; return out; }
  const stack: Frame[] = [expand(full, fullHi, 0)];
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
    const remHi = (top.remHi & ~maskHi[opt.i]!) >>> 0;
    const done = rem === 0 && remHi === 0;
    // Exact score of the chosen blocks with the load they put on each other so far (a lower
    // bound of their final score: loads only grow as more blocks are chosen).
    chosen.push(opt.block);
    const ev = evaluateSelection(f, chosen, { partial: !done });
    if (!ev.ok) {
      if (done) out.leaves++;
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
    if (floors && !done) {
      for (const b of chosen) if (b.shape.input.kind === 'rail' && isOpen(b.shape.input.rail, rem, remHi)) exact += floorOf.get(b) ?? 0;
    }
    if (done) {
      out.leaves++;
      if (scoreOnly < incumbent - EPS) { incumbent = scoreOnly; out.best = { blocks: [...chosen], sel: ev, score: scoreOnly }; }
      chosen.pop();
    } else if (exact + bound(rem, remHi) >= incumbent - EPS) {
      chosen.pop();
    } else {
      stack.push(expand(rem, remHi, exact));
    }
    yield;
  }
  out.complete = true;
  return out;
}

/** Bitmask helpers shared with tests (rails 0–31; the search keeps rails 32–63 in a second word). */
export function railMask(covers: readonly number[]): number {
  return covers.reduce((m, r) => (m | (1 << r)) >>> 0, 0);
}

/**
 * Whether some set of the blocks feeds every one of `n` rails exactly once (the cover alone:
 * no scores, no coupling). Depth first on the lowest open rail, remembering the open sets
 * already shown to have no cover. `nodeCap` bounds the work: past it the answer is `null`
 * (unknown), which a caller treats as "maybe". With `crossings` (per block, the isolated
 * domains it crosses into, as small integers) a cover counts only when no domain is crossed
 * more than `limit` times (the magnetics-per-domain design limit).
 */
export function exactCoverExists(
  n: number, covers: readonly (readonly number[])[], nodeCap = 50_000,
  crossings?: { domains: readonly (readonly number[])[]; limit: number },
): boolean | null {
  if (n === 0) return true;
  if (n > MAX_RAILS) throw new RangeError(`the search handles up to ${MAX_RAILS} rails (got ${n})`);
  const lo = covers.map((c) => c.reduce((m, r) => (r < 32 ? (m | (1 << r)) >>> 0 : m), 0));
  const hi = covers.map((c) => c.reduce((m, r) => (r >= 32 ? (m | (1 << (r - 32))) >>> 0 : m), 0));
  const byRail: number[][] = Array.from({ length: n }, () => []);
  covers.forEach((c, i) => { for (const r of c) if (r >= 0 && r < n) byRail[r]!.push(i); });
  const word = (k: number) => (k >= 32 ? 0xffffffff : ((1 << k) >>> 0) - 1);
  const dead = new Set<string>();
  let nodes = 0;
  let capped = false;
  const lowBit = (m: number) => 31 - Math.clz32(m & -m);
  const count: number[] = [];
  const go = (rem: number, remHi: number): boolean => {
    if (rem === 0 && remHi === 0) return true;
    const k = crossings ? `${rem}:${remHi}:${count.join(',')}` : `${rem}:${remHi}`;
    if (dead.has(k)) return false;
    if (++nodes > nodeCap) { capped = true; return false; }
    const r = rem ? lowBit(rem) : 32 + lowBit(remHi);
    for (const i of byRail[r]!) {
      if ((lo[i]! & rem) >>> 0 !== lo[i]! || (hi[i]! & remHi) >>> 0 !== hi[i]!) continue;
      const ds = crossings?.domains[i] ?? [];
      if (crossings && ds.some((d) => (count[d] ?? 0) + 1 > crossings.limit)) continue;
      for (const d of ds) count[d] = (count[d] ?? 0) + 1;
      const ok = go((rem & ~lo[i]!) >>> 0, (remHi & ~hi[i]!) >>> 0);
      for (const d of ds) count[d]!--;
      if (ok) return true;
      if (capped) return false;
    }
    dead.add(k);
    return false;
  };
  const found = go(word(Math.min(n, 32)), n > 32 ? word(n - 32) : 0);
  return found ? true : capped ? null : false;
}
