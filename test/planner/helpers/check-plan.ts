/**
 * Independent feasibility checker for planner output. It reads only the PlanResult and the
 * requirements (not the planner's internal blocks) and re-evaluates every stage's design with
 * the given evaluator: every rail fed exactly once, every internal node fed once and used,
 * no cycles, a barrier on the path of every isolated rail, windows inside tolerance at the
 * corners, Tj within tjMax − tjMargin.
 */
import type { Requirements } from '../../../src-main/engine/model.ts';
import type { Plan, PlanResult } from '../../../src-main/engine/plan-types.ts';
import type { OutputSpec } from '../../../src-main/engine/stages/types.ts';
import type { StageEvaluator } from '../../../src-main/engine/planner/types.ts';
import type { Amps, Volts } from '../../../src-main/engine/units.ts';

function designOutputs(design: unknown): OutputSpec[] {
  const d = design as { outputs?: OutputSpec[]; spec?: { outputs: OutputSpec[] } };
  return d.outputs ?? d.spec?.outputs ?? [];
}
function designVin(design: unknown): { min: number; nom: number; max: number } {
  const d = design as { vinMin?: number; vinNom?: number; vinMax?: number; spec?: { vinMin: number; vinNom: number; vinMax: number } };
  const s = d.spec ?? (d as { vinMin: number; vinNom: number; vinMax: number });
  return { min: s.vinMin, nom: s.vinNom, max: s.vinMax };
}

export function checkPlan(req: Requirements, result: PlanResult, plan: Plan, ev: StageEvaluator): string[] {
  const problems: string[] = [];
  const rails = new Map(result.rails.map((r) => [r.id, r]));
  const internal = new Map(plan.internalNodes.map((n) => [n.id, n]));
  const sources = new Set(req.sources.map((s) => s.id));
  const fedBy = new Map<string, string[]>();
  for (const st of plan.stages) {
    for (const o of st.outputs) fedBy.set(o.nodeId, [...(fedBy.get(o.nodeId) ?? []), st.id]);
    if (!sources.has(st.inputNodeId) && !rails.has(st.inputNodeId) && !internal.has(st.inputNodeId)) problems.push(`${st.id}: input ${st.inputNodeId} does not exist`);
  }
  for (const r of result.rails) {
    const n = fedBy.get(r.id)?.length ?? 0;
    if (n !== 1) problems.push(`${r.name} fed ${n} times`);
  }
  for (const nd of plan.internalNodes) {
    if ((fedBy.get(nd.id)?.length ?? 0) !== 1) problems.push(`internal node ${nd.id} fed ${(fedBy.get(nd.id)?.length ?? 0)} times`);
  }
  const stageOf = new Map<string, (typeof plan.stages)[number]>();
  for (const st of plan.stages) for (const o of st.outputs) stageOf.set(o.nodeId, st);
  // Walk from each rail up to a source: no cycles, and a barrier into isolated domains.
  for (const r of result.rails) {
    const dom = req.domains.find((d) => d.id === r.domainId);
    const iso = dom && dom.isolation !== 'none';
    let node = r.id;
    let crossed = false;
    const seen = new Set<string>();
    for (;;) {
      if (sources.has(node)) break;
      if (seen.has(node)) { problems.push(`${r.name}: feed loop`); break; }
      seen.add(node);
      const st = stageOf.get(node);
      if (!st) { problems.push(`${r.name}: ${node} has no feeding stage`); break; }
      if (st.barriers.some((b) => b.toDomainId === r.domainId && b.isolation === dom?.isolation)) crossed = true;
      if (st.kind === 'buck' && iso && sources.has(st.inputNodeId)) problems.push(`${r.name}: a buck crosses the barrier`);
      node = st.inputNodeId;
    }
    if (iso && !crossed) problems.push(`${r.name}: isolated rail without a barrier on its path`);
  }
  // Re-evaluate every stage's design at its corners.
  const tjLimit = req.limits.tjMax - req.limits.tjMargin;
  for (const st of plan.stages) {
    const design = st.design;
    if (!design) { problems.push(`${st.id}: no design`); continue; }
    const outs = designOutputs(design);
    const vin = designVin(design);
    const w = ev.windows(design, { vin: [vin.min, vin.nom, vin.max] as Volts[], iout: outs.map((o) => ({ min: o.currentMin, max: o.currentMax })) });
    outs.forEach((o, i) => {
      const win = w[i]!;
      const rail = rails.get(o.nodeId);
      const tol = rail ? rail.tolerance : o.tolerance;
      const v = rail ? rail.voltage : o.voltage;
      const lo = Math.min(win.min, win.max), hi = Math.max(win.min, win.max);
      const a = Math.min(v * (1 - tol), v * (1 + tol)), b = Math.max(v * (1 - tol), v * (1 + tol));
      if (lo < a - 1e-9 || hi > b + 1e-9) problems.push(`${st.id} output ${o.nodeId}: window ${lo}…${hi} outside ${a}…${b}`);
    });
    for (const v of [vin.min, vin.max]) {
      const e = ev.evaluate(design, { vin: v as Volts, iout: outs.map((o) => o.currentMax) as Amps[], ambient: req.limits.ambient });
      for (const p of e.parts) if (p.tj > tjLimit + 1e-6) problems.push(`${st.id} ${p.role}: Tj ${p.tj} above ${tjLimit}`);
      if (e.flags.some((f) => f.severity === 'error')) problems.push(`${st.id}: engine error flag ${e.flags.find((f) => f.severity === 'error')!.code}`);
    }
  }
  return problems;
}
