/**
 * The design cut-off asks whether the blocks designed so far hold an exact cover of the rails
 * (exactCoverExists). Checked here against brute force over every subset of blocks (no shared
 * code with the search), and on the demo: with a clock that lets only a few dozen candidate
 * designs through the design share, design goes on until a tree exists.
 */
import { describe, expect, it } from 'vitest';
import { exactCoverExists } from '../../src-main/engine/planner/search.ts';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { demoDocument } from '../../src-main/store/demo.ts';

/** Every subset of the blocks: does one cover each rail exactly once? (2^blocks, small cases only.) */
function bruteForce(n: number, covers: number[][]): boolean {
  for (let s = 1; s < 1 << covers.length; s++) {
    const count = new Array<number>(n).fill(0);
    for (let i = 0; i < covers.length; i++) if (s & (1 << i)) for (const r of covers[i]!) count[r]!++;
    if (count.every((c) => c === 1)) return true;
  }
  return false;
}

function lcg(seed: number) {
  let x = seed >>> 0;
  return () => ((x = (Math.imul(x, 1664525) + 1013904223) >>> 0) / 2 ** 32);
}

describe('exact cover of the rails (design cut-off)', () => {
  it('agrees with brute force on 400 seeded random instances', () => {
    let yes = 0;
    let no = 0;
    for (let seed = 1; seed <= 400; seed++) {
      const rnd = lcg(seed);
      const n = 2 + Math.floor(rnd() * 7);
      const m = 1 + Math.floor(rnd() * 12);
      const covers: number[][] = [];
      for (let b = 0; b < m; b++) {
        const size = 1 + Math.floor(rnd() * Math.min(3, n));
        const set = new Set<number>();
        while (set.size < size) set.add(Math.floor(rnd() * n));
        covers.push([...set]);
      }
      const want = bruteForce(n, covers);
      expect(exactCoverExists(n, covers), `seed ${seed}`).toBe(want);
      if (want) yes++; else no++;
    }
    // Both answers occur often enough for the comparison to mean something.
    expect(yes).toBeGreaterThan(40);
    expect(no).toBeGreaterThan(40);
  });

  it('counts only covers within a per-domain crossing limit, agreeing with brute force on 300 seeded instances', () => {
    let yes = 0;
    let cut = 0;
    for (let seed = 1; seed <= 300; seed++) {
      const rnd = lcg(seed * 31 + 7);
      const n = 2 + Math.floor(rnd() * 6);
      const m = 2 + Math.floor(rnd() * 10);
      const limit = 1 + Math.floor(rnd() * 2);
      const covers: number[][] = [];
      const domains: number[][] = [];
      for (let b = 0; b < m; b++) {
        const size = 1 + Math.floor(rnd() * Math.min(3, n));
        const set = new Set<number>();
        while (set.size < size) set.add(Math.floor(rnd() * n));
        covers.push([...set]);
        // Each block crosses into none, one or both of two domains.
        domains.push([0, 1].filter(() => rnd() < 0.45));
      }
      // Brute force: some subset covers each rail once and crosses no domain more than `limit` times.
      let want = false;
      for (let sub = 1; sub < 1 << m && !want; sub++) {
        const count = new Array<number>(n).fill(0);
        const cross = [0, 0];
        for (let i = 0; i < m; i++) if (sub & (1 << i)) { for (const r of covers[i]!) count[r]!++; for (const d of domains[i]!) cross[d]!++; }
        want = count.every((c) => c === 1) && cross.every((c) => c <= limit);
      }
      expect(exactCoverExists(n, covers, undefined, { domains, limit }), `seed ${seed}`).toBe(want);
      if (want) yes++;
      if (!want && bruteForce(n, covers)) cut++;
    }
    // Both answers occur, and the limit removes some covers that exist without it.
    expect(yes).toBeGreaterThan(30);
    expect(cut).toBeGreaterThan(10);
  });

  it('handles rails past the first 32-bit word and says "unknown" at its node cap', () => {
    const n = 60;
    const singles = Array.from({ length: n }, (_, r) => [r]);
    expect(exactCoverExists(n, singles)).toBe(true);
    expect(exactCoverExists(n, singles.slice(0, 59))).toBe(false);
    // Pairs that overlap in a chain: rails 0..59 covered only by {i, i+1}; an even chain covers.
    const chain = Array.from({ length: n - 1 }, (_, r) => [r, r + 1]);
    expect(exactCoverExists(n, chain)).toBe(true);
    expect(exactCoverExists(n - 1, chain.slice(0, n - 2))).toBe(false);
    expect(exactCoverExists(n, chain, 3)).toBeNull();
  });
});

describe('design goes on past the design share while no tree can be formed', () => {
  it('finds a tree of the demo (16 V minimum input) when the clock lets few designs through', () => {
    // A virtual clock: each reading advances `step` ms of a 3000 ms budget, so the design
    // share (60 %) ends after a few dozen designs; a cut there held no exact cover of the rails.
    for (const step of [10, 14, 20]) {
      const req = demoDocument().requirements;
      req.sources[0]!.vMin = 16 as never;
      // The late-design rule is under test here, with the magnetics-per-domain limit lifted:
      // under the default of one, the 20 ms step (68 designs) holds no tree of this demo, a
      // known limit (docs/planner.md, Known limits; the limit is tested in shared-tap.test.ts).
      req.limits.maxMagneticsPerIsolatedDomain = 8;
      let t = 0;
      const r = new PlanSolver(req, { evaluator: engineEvaluator(), budgetMs: 3000, now: () => (t += step), verifyRemedies: false }).solve();
      expect(r.best, `step ${step} ms: ${r.infeasible.map((i) => i.text).join('; ')}`).not.toBeNull();
      expect(r.stats.provedOptimal).toBe(false);
      expect(r.stats.notProved).toMatch(/design share/);
    }
  }, 120_000);
});
