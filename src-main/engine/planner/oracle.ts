/**
 * Exhaustive oracle for tests (≤ 7 rails): enumerates every assignment of a feeding block to
 * each rail, keeps the consistent ones (every rail of a chosen block points at that block),
 * evaluates each complete tree exactly (evaluateSelection, shared candidate evaluation) and
 * returns the best weighted score. No bounds, no ordering, no pruning: it shares no search
 * code with the planner. Used only by tests and the bench.
 */
import type { BlockFactory } from './candidates.ts';
import { evaluateSelection, type Scorer } from './score.ts';
import type { Block } from './types.ts';

export const ORACLE_MAX_RAILS = 9;

export interface OracleResult {
  bestScore: number;
  bestKeys: string[] | null;
  /** Complete trees evaluated. */
  trees: number;
  /** False when stopped by `maxMs` (then bestScore is only an upper bound). */
  complete: boolean;
}

export function oracleBest(f: BlockFactory, blocks: readonly Block[], scorer: Scorer, opts: { maxMs?: number } = {}): OracleResult {
  const stopAt = opts.maxMs !== undefined ? performance.now() + opts.maxMs : Infinity;
  let stopped = false;
  const n = f.ctx.rails.length;
  if (n > ORACLE_MAX_RAILS) throw new RangeError(`the oracle handles up to ${ORACLE_MAX_RAILS} rails (got ${n})`);
  const perRail: Block[][] = Array.from({ length: n }, (_, r) => blocks.filter((b) => b.covers.includes(r)));
  const assign = new Array<Block | null>(n).fill(null);
  let bestScore = Infinity;
  let bestKeys: string[] | null = null;
  let trees = 0;
  const rec = (r: number): void => {
    if (stopped || ((trees & 1023) === 0 && performance.now() > stopAt)) { stopped = true; return; }
    if (r === n) {
      // Consistency: a block chosen for one rail must be the choice of all the rails it covers.
      const chosen = new Set<Block>();
      for (let i = 0; i < n; i++) chosen.add(assign[i]!);
      for (const b of chosen) for (const c of b.covers) if (assign[c] !== b) return;
      trees++;
      const sel = [...chosen];
      const ev = evaluateSelection(f, sel);
      if (!ev.ok) return;
      let s = 0;
      for (const e of ev.evals) s += scorer.score(e);
      if (s < bestScore) { bestScore = s; bestKeys = sel.map((b) => b.key).sort(); }
      return;
    }
    // A rail already covered by an earlier rail's block can only take that block.
    for (let c = 0; c < r; c++) {
      const prev = assign[c]!;
      if (prev.covers.includes(r)) { assign[r] = prev; rec(r + 1); assign[r] = null; return; }
    }
    for (const b of perRail[r]!) {
      // Only the cheapest legality test while enumerating: a block chosen by an earlier rail
      // must have been chosen by every earlier rail it covers.
      let ok = true;
      for (const c of b.covers) if (c < r && assign[c] !== b) { ok = false; break; }
      if (!ok) continue;
      assign[r] = b;
      rec(r + 1);
      assign[r] = null;
    }
  };
  rec(0);
  return { bestScore, bestKeys, trees, complete: !stopped };
}
