/**
 * Plot data for the window: stage curves of the shown plan (engine/curves.ts), swept with
 * the real stage engine from the roll-up's operating point. The SVG is drawn in the window.
 */
import { z } from 'zod';
import { stageCurves, CurveError } from '../engine/curves.ts';
import { rollupPlan } from '../engine/rollup.ts';
import { groupRails } from '../engine/rails.ts';
import { ENGINE_MODELS } from './figures.ts';
import { ApiFailure, handler } from './registry.ts';

export const plotHandlers = {
  'plot.stageCurves': handler('plot.stageCurves', z.object({ stageId: z.string().min(1).max(200) }).strict(), (s, a) => {
    const result = s.planResult;
    if (!result) throw new ApiFailure('stageId: there is no plan yet (run Plan first)', 'stageId');
    const plan = result.alternatives.find((p) => p.id === s.selectedId) ?? result.best ?? result.alternatives[0] ?? null;
    if (!plan) throw new ApiFailure('stageId: the plan has no tree to take the stage from', 'stageId');
    if (!plan.stages.some((st) => st.id === a.stageId)) throw new ApiFailure(`stageId: no stage "${a.stageId}" in the shown tree`, 'stageId');
    try {
      const raw = rollupPlan(s.requirements, groupRails(s.requirements), plan, ENGINE_MODELS);
      const c = stageCurves(plan, raw, a.stageId, s.requirements.limits.ambient, ENGINE_MODELS);
      return JSON.parse(JSON.stringify(c));
    } catch (e) {
      if (e instanceof CurveError) throw new ApiFailure(e.message, 'stageId');
      throw new ApiFailure(`stageId: the stage curves could not be computed: ${(e as Error).message}`, 'stageId');
    }
  }),
};
