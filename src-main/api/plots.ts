/**
 * Plots of the shown tree: the curves come from the engine (engine/curves.ts sweeping the
 * stage models and the roll-up), the rail windows and the alternatives' loss and cost from
 * the same roll-up and BOM the Budget and Alternatives views show (one number per
 * quantity); export/plot-svg.ts draws them.
 */
import { z } from 'zod';
import { groupRails } from '../engine/rails.ts';
import { stageLoadSweep, stageReference, stageVinSweep, systemVinSweep } from '../engine/curves.ts';
import { designOutputOrder } from '../engine/rollup.ts';
import { formatQuantity } from '../engine/notation.ts';
import type { Plan } from '../engine/plan-types.ts';
import { plotSvg, type PlotScene } from '../export/plot-svg.ts';
import type { PlotSpec, PlotView } from './contract.ts';
import { ApiFailure, handler } from './registry.ts';
import type { Session } from './session.ts';
import { computeBom, computeRollup, ENGINE_MODELS } from './figures.ts';

export const plotSpecSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('stage-load'), stageId: z.string().min(1).max(200) }).strict(),
  z.object({ kind: z.literal('stage-vin'), stageId: z.string().min(1).max(200) }).strict(),
  z.object({ kind: z.literal('system-vin'), sourceId: z.string().min(1).max(200).optional() }).strict(),
  z.object({ kind: z.literal('rail-windows') }).strict(),
  z.object({ kind: z.literal('alternatives') }).strict(),
]) as z.ZodType<PlotSpec>;

const CASE_NAME = { min: 'V min', nom: 'V nom', max: 'V max' } as const;

function shownPlan(s: Session): Plan {
  const r = s.planResult;
  if (!r) throw new ApiFailure('plot: there is no plan yet (press Plan first)', 'plot');
  const p = r.alternatives.find((x) => x.id === s.selectedId) ?? r.best ?? r.alternatives[0];
  if (!p) throw new ApiFailure('plot: the plan has no tree to plot (no feasible tree)', 'plot');
  return p;
}

/** The plot's drawing and the series it shows. */
export function buildPlot(s: Session, spec: PlotSpec): { scene: PlotScene; series: string[] } {
  const plan = shownPlan(s);
  const req = s.requirements;
  const modeName = (id: string) => req.modes.find((m) => m.id === id)?.name ?? id;
  if (spec.kind === 'alternatives') {
    const r = s.planResult!;
    const points = r.alternatives.flatMap((p, i) => {
      try {
        const loss = (computeRollup(s, p)).view.weightedLoss;
        const cost = computeBom(s, p).total;
        return [{ label: `Tree ${String.fromCharCode(65 + i)}`, x: cost, y: loss, highlight: p.id === plan.id }];
      } catch {
        return [];
      }
    });
    if (!points.length) throw new ApiFailure('plot: no alternative could be costed and rolled up', 'plot');
    return {
      scene: {
        type: 'scatter', title: 'Loss versus cost of the alternatives',
        subtitle: 'Each point is a complete tree; lower and further left is better. Loss as in Budget, cost as in Parts.',
        x: { label: 'estimated cost (units)', kind: 'number' }, y: { label: 'time-weighted loss', kind: 'power' }, points,
      },
      series: points.map((p) => p.label),
    };
  }
  const rolled = computeRollup(s, plan);
  if (spec.kind === 'rail-windows') {
    const rows = rolled.raw.windows.filter((w) => w.isRail).map((w) => ({
      name: w.name, target: w.target, bandMin: w.allowedMin, bandMax: w.allowedMax, min: w.min, max: w.max, inside: w.inside,
      marks: rolled.raw.modes.flatMap((m) => {
        const n = m.cases.nom.nodes[w.nodeId];
        return n ? [{ mode: m.modeName, v: n.v }] : [];
      }),
    }));
    if (!rows.length) throw new ApiFailure('plot: the tree feeds no rail', 'plot');
    return {
      scene: {
        type: 'windows', title: 'Rail windows against their bands',
        subtitle: 'Bar: worst-case window over every mode and input case (as in the inspector); band: the rail\'s tolerance; marks: the voltage in each mode at V nom.',
        modes: rolled.raw.modes.map((m) => m.modeName), rows,
      },
      series: rows.map((r) => r.name),
    };
  }
  if (spec.kind === 'system-vin') {
    const src = spec.sourceId ? req.sources.find((x) => x.id === spec.sourceId) : req.sources.find((x) => plan.stages.some((st) => st.inputNodeId === x.id)) ?? req.sources[0];
    if (!src) throw new ApiFailure(`sourceId: no source "${spec.sourceId ?? ''}"`, 'sourceId');
    const rails = groupRails(req);
    const series = req.modes.map((m) => ({
      name: m.name,
      points: systemVinSweep(req, rails, plan, m.id, src.id, 21, ENGINE_MODELS).map((p) => ({ x: p.sourceVoltage, y: [p.efficiency, p.loss] })),
    }));
    const markers = rolled.raw.modes.flatMap((m) => (['min', 'nom', 'max'] as const).map((c) => ({
      name: `${m.modeName}, ${CASE_NAME[c]}`, x: m.cases[c].sources[src.id]!.v, y: [m.cases[c].efficiency, m.cases[c].loss],
    })));
    return {
      scene: {
        type: 'line', title: `System efficiency and loss versus ${src.name} voltage`,
        subtitle: `Whole tree, one curve per mode, ${src.name} from ${formatQuantity(src.vMin, 'voltage')} to ${formatQuantity(src.vMax, 'voltage')}${req.sources.length > 1 ? ', other sources at nominal' : ''}; circles: the Budget view's figures.`,
        x: { label: `${src.name} voltage`, kind: 'voltage' },
        panels: [{ label: 'system efficiency', kind: 'ratio' }, { label: 'total loss', kind: 'power', fromZero: true }],
        series, markers,
      },
      series: series.map((x) => x.name),
    };
  }
  const st = plan.stages.find((x) => x.id === spec.stageId);
  if (!st) throw new ApiFailure(`stageId: no stage "${spec.stageId}" in the shown tree`, 'stageId');
  const ids = designOutputOrder(st);
  const rails = groupRails(req);
  const ref = stageReference(rolled.raw, plan, rails, st.id, ids);
  if (!ref) throw new ApiFailure(`stageId: the roll-up has no figures for stage "${st.id}"`, 'stageId');
  const nodeName = (id: string) => rails.find((r) => r.id === id)?.name ?? plan.internalNodes.find((n) => n.id === id)?.name ?? id;
  const many = ids.length > 1;
  const nomFig = rolled.raw.modes.find((m) => m.modeId === ref.modeId)!;
  if (spec.kind === 'stage-load') {
    const cases = (['min', 'nom', 'max'] as const);
    const sweeps = stageLoadSweep(st.design, { iout: cases.map((c) => ref.ioutByCase[c]), vin: cases.map((c) => ref.vin[c]), ambient: req.limits.ambient }, undefined, ENGINE_MODELS);
    const series = sweeps.map((sw, k) => ({
      name: `${CASE_NAME[cases[k]!]} (input ${formatQuantity(sw.vin, 'voltage')})`,
      points: sw.points.map((p) => ({ x: p.iout[0]!, y: [p.efficiency, p.loss] })),
    }));
    const markers = rolled.raw.modes.flatMap((m) => {
      const f = m.cases.nom.stages.find((x) => x.stageId === st.id);
      const o = f?.outputs.find((x) => x.nodeId === ids[0]);
      return f && o ? [{ name: `${m.modeName} at V nom`, x: o.i, y: [f.efficiency, f.loss] }] : [];
    });
    return {
      scene: {
        type: 'line', title: `${st.name}: efficiency and loss versus load`,
        subtitle: `5 % to 100 % of its load in mode "${modeName(ref.modeId)}"${many ? ', every output scaled together' : ''}; circles: the roll-up's figures per mode at V nom.`,
        x: { label: many ? `load current of ${nodeName(ids[0]!)} (first output)` : `load current (${nodeName(ids[0]!)})`, kind: 'current', fromZero: true },
        panels: [{ label: 'efficiency', kind: 'ratio' }, { label: 'loss', kind: 'power', fromZero: true }],
        series, markers,
      },
      series: series.map((x) => x.name),
    };
  }
  const d = st.design as { vinMin?: number; vinMax?: number };
  const vs = [ref.vin.min, ref.vin.nom, ref.vin.max];
  const lo = Math.min(...vs, Number.isFinite(d.vinMin) ? d.vinMin! : Infinity);
  const hi = Math.max(...vs, Number.isFinite(d.vinMax) ? d.vinMax! : -Infinity);
  const pts = stageVinSweep(st.design, { iout: ref.iout, vinMin: lo, vinMax: hi, include: vs, ambient: req.limits.ambient }, 21, ENGINE_MODELS);
  const name = `load of mode "${modeName(ref.modeId)}"`;
  const markers = (['min', 'nom', 'max'] as const).map((c) => {
    const f = nomFig.cases[c].stages.find((x) => x.stageId === st.id)!;
    return { name: `source at ${CASE_NAME[c]}`, x: f.vin, y: [f.efficiency, f.loss] };
  });
  return {
    scene: {
      type: 'line', title: `${st.name}: efficiency and loss versus input voltage`,
      subtitle: `At the ${name} (${ids.map((id, k) => `${nodeName(id)} ${formatQuantity(ref.iout[k]!, 'current')}`).join(', ')}), over its designed input range; circles: the roll-up's figures.`,
      x: { label: 'input voltage', kind: 'voltage' },
      panels: [{ label: 'efficiency', kind: 'ratio' }, { label: 'loss', kind: 'power', fromZero: true }],
      series: [{ name, points: pts.map((p) => ({ x: p.vin, y: [p.efficiency, p.loss] })) }], markers,
    },
    series: [name],
  };
}

export function plotView(s: Session, spec: PlotSpec): PlotView {
  let built;
  try {
    built = buildPlot(s, spec);
  } catch (e) {
    if (e instanceof ApiFailure) throw e;
    throw new ApiFailure(`plot: ${(e as Error).message}`, 'plot');
  }
  return { spec, title: built.scene.title, svg: plotSvg(built.scene), series: built.series };
}

export const plotHandlers = {
  'plots.get': handler('plots.get', z.object({ plot: plotSpecSchema }).strict(), (s: Session, a) => plotView(s, a.plot)),
};
