/**
 * The stage engine (engine/stages) behind the planner's StageEvaluator interface.
 */
import { designStage, evaluateStage, stageWindows, type StageDesign } from '../stages/index.ts';
import type { StageEvaluator } from './types.ts';

export function engineEvaluator(): StageEvaluator {
  return {
    design(spec) {
      const r = designStage(spec);
      return r.ok ? { ok: true, design: r.design } : { ok: false, flags: r.flags };
    },
    evaluate: (design, op) => evaluateStage(design as StageDesign, op),
    windows: (design, corners) => stageWindows(design as StageDesign, corners),
  };
}
