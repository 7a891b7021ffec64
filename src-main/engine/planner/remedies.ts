/**
 * Remedies are offered only when they work: each candidate remedy (a change to the
 * requirements with its target numbers) is applied to a copy of the requirements and checked
 * by re-planning within a bounded budget. For a rail with no feasible feed, the check designs
 * the feeds of that rail in the new requirements (single-rail feeds first, then every winding
 * set that contains it) until one is feasible; for a tree-level failure it plans the whole
 * tree. A remedy whose check does not finish in time is not offered.
 */
import { groupRails } from '../rails.ts';
import { STAGE_KINDS, type Requirements, type StageKind } from '../model.ts';
import { BlockFactory, enumerateShapes, type GenerationOptions } from './candidates.ts';
import type { CostModel, StageEvaluator } from './types.ts';

export function generationOptions(req: Requirements, allowRailFeeds: boolean): GenerationOptions {
  return {
    allowRailFeeds,
    maxSecondaries: Math.max(0, Math.floor(req.preferences.maxSecondaries)),
    allowed: new Set<StageKind>(req.preferences.allowedKinds.filter((k) => STAGE_KINDS.includes(k))),
  };
}

/** Does the rail (by id) have a feasible feed under `req`? 'unknown' when out of time. */
export function railHasFeed(
  req: Requirements, railId: string, evaluator: StageEvaluator, costModel: CostModel, allowRailFeeds: boolean,
  deadline: number, now: () => number,
): 'yes' | 'no' | 'unknown' {
  const rails = groupRails(req);
  const idx = rails.findIndex((r) => r.id === railId);
  if (idx < 0) return 'unknown';
  const f = new BlockFactory(req, rails, evaluator, costModel);
  const opts = generationOptions(req, allowRailFeeds);
  const { singles, coupled, shared } = enumerateShapes(f, opts);
  const tryShape = (s: Parameters<BlockFactory['evaluate']>[0]): boolean => f.evaluate(s).ok;
  for (const s of singles) {
    if (s.kind !== 'cwbuck' && s.rail === idx && tryShape(s)) return 'yes';
    if (now() > deadline) return 'unknown';
  }
  let passed = 0;
  for (let k = 1; k <= opts.maxSecondaries; k++) {
    for (const s of coupled(k)) {
      // Sets without the rail are passed over; the clock is read now and then here too.
      if (s.kind !== 'cwbuck' || (s.primary !== idx && !s.secondaries.includes(idx))) {
        if (++passed % 2000 === 0 && now() > deadline) return 'unknown';
        continue;
      }
      if (tryShape(s)) return 'yes';
      if (now() > deadline) return 'unknown';
    }
  }
  for (const alone of [true, false]) {
    for (const s of shared(alone)) {
      if (s.kind !== 'cwbuck' || (s.primary !== idx && !s.secondaries.includes(idx))) {
        if (++passed % 2000 === 0 && now() > deadline) return 'unknown';
        continue;
      }
      if (tryShape(s)) return 'yes';
      if (now() > deadline) return 'unknown';
    }
  }
  return 'no';
}
