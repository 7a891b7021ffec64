/**
 * The stage engine (engine/stages) behind the planner's StageEvaluator interface.
 *
 * Evaluations are pure functions of (design, operating point), and the planner asks for the
 * same ones many times (a block re-evaluated for a new downstream load repeats the modes whose
 * currents did not change; coupling floors repeat the feeder's points), so each evaluator
 * remembers them per design object. The planner never changes a design or an evaluation
 * after it is made.
 */
import { designStage, evaluateStage, stageWindows } from '../stages/index.ts';
import type { StageEvaluation } from '../stages/types.ts';
import type { StageEvaluator } from './types.ts';
import type { LibraryRow } from '../library.ts';
import type { Ratio } from '../units.ts';
import type { RatingMargins } from '../stages/part-choice.ts';

/**
 * With a library, every stage is designed with the project's parts (their parameters drive
 * the evaluation, and the BOM lists the same rows); without one, the generic defaults.
 */
export function engineEvaluator(opts: { library?: readonly LibraryRow[]; margins?: Partial<RatingMargins>; electrolyticDerating?: number } = {}): StageEvaluator {
  const evaluations = new WeakMap<object, Map<string, StageEvaluation>>();
  return {
    design(spec) {
      const r = designStage(opts.library ? {
        ...spec, library: opts.library,
        ...(opts.margins ? { margins: opts.margins } : {}),
        ...(opts.electrolyticDerating !== undefined ? { electrolyticDerating: opts.electrolyticDerating as Ratio } : {}),
      } : spec);
      return r.ok ? { ok: true, design: r.design } : { ok: false, flags: r.flags };
    },
    evaluate(design, op) {
      if (typeof design !== 'object' || design === null || !Array.isArray(op?.iout)) return evaluateStage(design, op);
      let seen = evaluations.get(design);
      if (!seen) { seen = new Map(); evaluations.set(design, seen); }
      // Numbers print exactly (shortest round-trip form), so equal keys mean equal inputs.
      const key = `${op.vin}|${op.ambient}|${op.iout.join(',')}${op.mode !== undefined ? `|${op.mode}` : ''}`;
      const hit = seen.get(key);
      if (hit) return hit;
      const ev = evaluateStage(design, op);
      seen.set(key, ev);
      return ev;
    },
    windows: (design, corners) => stageWindows(design, corners),
  };
}
