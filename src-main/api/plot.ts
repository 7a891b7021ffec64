/**
 * Plot data for the window: stage curves of the shown plan (engine/curves.ts), swept with
 * the real stage engine from the roll-up's operating point; the system versus a source's
 * voltage (the roll-up at each voltage); the rail windows per operating mode (rollup.ts).
 * The SVG is drawn in the window (src-renderer/lib/plot-svg.ts).
 */
import { z } from 'zod';
import { stageCurves, systemSourceSweep, systemLoadSweep, CurveError } from '../engine/curves.ts';
import { modeWindows, rollupPlan } from '../engine/rollup.ts';
import { groupRails } from '../engine/rails.ts';
import type { Plan } from '../engine/plan-types.ts';
import { computeRollup, ENGINE_MODELS } from './figures.ts';
import { ApiFailure, handler } from './registry.ts';
import type { Session } from './session.ts';
import type { ModeWindowsView, SystemSweepView } from './contract.ts';

/** The tree the other views show (the selected alternative, else the best). */
function shownPlan(s: Session, field: string): Plan {
  const result = s.planResult;
  if (!result) throw new ApiFailure(`${field}: there is no plan yet (run Plan first)`, field);
  const plan = result.alternatives.find((p) => p.id === s.selectedId) ?? result.best ?? result.alternatives[0] ?? null;
  if (!plan) throw new ApiFailure(`${field}: the plan has no tree to plot`, field);
  return plan;
}

function systemSweepView(s: Session, sourceId: string | undefined): SystemSweepView {
  const plan = shownPlan(s, 'sourceId');
  const req = s.requirements;
  const feeding = req.sources.filter((x) => plan.stages.some((st) => st.inputNodeId === x.id));
  if (!feeding.length) throw new ApiFailure('sourceId: no source feeds the shown tree', 'sourceId');
  const src = sourceId === undefined ? feeding[0]! : feeding.find((x) => x.id === sourceId);
  if (!src) throw new ApiFailure(`sourceId: no source "${sourceId}" feeds the shown tree`, 'sourceId');
  try {
    const rails = groupRails(req);
    const sw = systemSourceSweep(req, rails, plan, src.id, ENGINE_MODELS);
    return { ...sw, sources: feeding.map((x) => ({ id: x.id, name: x.name })), load: systemLoadSweep(req, rails, plan, ENGINE_MODELS) };
  } catch (e) {
    if (e instanceof CurveError) throw new ApiFailure(e.message, 'sourceId');
    throw new ApiFailure(`sourceId: the sweep could not be computed: ${(e as Error).message}`, 'sourceId');
  }
}

function modeWindowsView(s: Session): ModeWindowsView {
  const plan = shownPlan(s, 'plan');
  const req = s.requirements;
  let rolled, perMode;
  try {
    rolled = computeRollup(s, plan).raw;
    perMode = modeWindows(req, groupRails(req), plan, rolled, ENGINE_MODELS);
  } catch (e) {
    throw new ApiFailure(`plan: the windows could not be computed: ${(e as Error).message}`, 'plan');
  }
  const rails = rolled.windows.filter((w) => w.isRail).map((w) => ({
    nodeId: w.nodeId, name: w.name, target: w.target, allowedMin: w.allowedMin, allowedMax: w.allowedMax,
    all: { min: w.min, max: w.max, inside: w.inside, proved: w.proved },
    modes: perMode.flatMap((m) => {
      const x = m.rows.find((r) => r.nodeId === w.nodeId);
      return x ? [{ modeId: m.modeId, modeName: m.modeName, min: x.min, max: x.max, inside: x.inside, proved: x.proved, minCorner: x.minCorner, maxCorner: x.maxCorner }] : [];
    }),
  }));
  return { modes: perMode.map((m) => ({ id: m.modeId, name: m.modeName })), rails };
}

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
  'plot.systemSweep': handler('plot.systemSweep', z.object({ sourceId: z.string().min(1).max(200).optional() }).strict(),
    (s, a) => JSON.parse(JSON.stringify(systemSweepView(s, a.sourceId))) as SystemSweepView),
  'plot.modeWindows': handler('plot.modeWindows', z.object({}).strict(), (s) => JSON.parse(JSON.stringify(modeWindowsView(s))) as ModeWindowsView),
};
