/**
 * The planner's choice as a set-partitioning integer program in LP file format, for an
 * outside check with a general-purpose MILP solver (tests and bench use the `highs` package).
 * One binary variable per candidate block with the weighted score the engine computed for it;
 * each rail covered exactly once; each source within its current limit at its lowest voltage
 * in every mode (a knapsack-type conflict constraint); at most maxMagneticsPerIsolatedDomain
 * blocks crossing the barrier into each isolated domain. The objective is additive only when no
 * block draws from another rail (plan with allowRailFeeds: false), which is when the MILP
 * optimum must equal the planner's best.
 */
import { DEFAULT_MAX_MAGNETICS_PER_DOMAIN, type Requirements } from '../model.ts';
import type { Scorer } from './score.ts';
import type { Block } from './types.ts';

export function setPartitionLp(req: Requirements, railCount: number, blocks: readonly Block[], scorer: Scorer): string {
  const num = (x: number) => (Math.abs(x) < 1e-12 ? '0' : x.toPrecision(15));
  const lines: string[] = ['\\ Railwright planner: set partitioning over candidate blocks', 'Minimize', ' obj:'];
  const terms = blocks.map((b, i) => `${num(scorer.score(b.base))} x${i}`);
  for (let i = 0; i < terms.length; i += 8) lines.push(`  ${i === 0 ? '' : '+ '}${terms.slice(i, i + 8).join(' + ')}`);
  lines.push('Subject To');
  for (let r = 0; r < railCount; r++) {
    const vars = blocks.filter((b) => b.covers.includes(r)).map((b) => `x${b.index}`);
    lines.push(` rail${r}: ${vars.length ? vars.join(' + ') : '0 x0'} = 1`);
  }
  req.sources.forEach((s, si) => {
    req.modes.forEach((_, m) => {
      const t = blocks.filter((b) => b.shape.input.kind === 'source' && b.shape.input.id === s.id).map((b) => `${num(b.base.iinAtMin[m]!)} x${b.index}`);
      if (t.length) lines.push(` src${si}m${m}: ${t.join(' + ')} <= ${num(s.currentLimit)}`);
    });
  });
  const limit = req.limits.maxMagneticsPerIsolatedDomain ?? DEFAULT_MAX_MAGNETICS_PER_DOMAIN;
  req.domains.forEach((d, di) => {
    if (d.isolation === 'none') return;
    // A block crosses into d when one of its stages has a barrier to it (a magnetic or a module).
    const t = blocks.filter((b) => b.base.stages.some((st) => st.barriers.some((x) => x.toDomainId === d.id))).map((b) => `x${b.index}`);
    if (t.length > limit) lines.push(` mag${di}: ${t.join(' + ')} <= ${limit}`);
  });
  lines.push('Binary');
  for (let i = 0; i < blocks.length; i += 16) lines.push(' ' + blocks.slice(i, i + 16).map((b) => `x${b.index}`).join(' '));
  lines.push('End');
  return lines.join('\n');
}
