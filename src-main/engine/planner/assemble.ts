/**
 * Turn a selection of blocks into a complete Plan (stages in upstream-first order, internal
 * nodes, score, reasons), and explain infeasibility when no plan exists.
 */
import type { Id, StageKind } from '../model.ts';
import type { Infeasibility, InternalNode, Plan, PlanLabel, PlanStage, Reason } from '../plan-types.ts';
import { BlockFactory, type Miss } from './candidates.ts';
import { planScore, type Scorer, type SelectionEval } from './score.ts';
import type { Block, BlockShape } from './types.ts';

const KIND_NAME: Record<StageKind, string> = {
  buck: 'its own buck', ldo: 'an LDO', cwbuck: 'a coupled-winding buck', 'iso-module': 'an isolated module', 'load-switch': 'a load switch',
};

export function describeShape(f: BlockFactory, s: BlockShape): string {
  const rails = f.ctx.rails;
  const from = s.input.kind === 'source' ? (f.req.sources.find((x) => x.id === (s.input as { id: Id }).id)?.name ?? 'the source') : rails[s.input.rail]!.name;
  if (s.kind === 'cwbuck') {
    const p = s.primary === null ? `a ${s.busVoltage} V primary bus` : `${rails[s.primary]!.name} as primary`;
    return `a coupled-winding buck from ${from} with ${p} and ${s.secondaries.map((i) => rails[i]!.name).join(', ')} as secondaries`;
  }
  return `${KIND_NAME[s.kind]} from ${from}`;
}

export function assemblePlan(
  f: BlockFactory, id: Id, labels: PlanLabel[], blocks: Block[], sel: SelectionEval, scorer: Scorer,
  allBlocks: readonly Block[], misses: ReadonlyMap<number, Miss[]>,
): Plan {
  const rails = f.ctx.rails;
  const stageIdOfBlock = new Map<number, Id>();
  const stages: PlanStage[] = [];
  const internalNodes: InternalNode[] = [];
  const reasons: Reason[] = [];
  let sn = 0;
  for (const i of sel.order) {
    const b = blocks[i]!;
    const e = sel.evals[i]!;
    const blockTag = `b${i}`;
    const nodeMap = new Map<string, Id>();
    for (const nd of e.internalNodes) {
      const gid = nd.id === 'bus' ? `bus:${blockTag}` : nd.id;
      nodeMap.set(nd.id, gid);
      internalNodes.push({ ...nd, id: gid });
    }
    const inputId: Id = b.shape.input.kind === 'source' ? b.shape.input.id : rails[b.shape.input.rail]!.id;
    for (const st of e.stages) {
      const sid = `st${++sn}`;
      if (st.localId === 's0') stageIdOfBlock.set(i, sid);
      stages.push({
        id: sid, kind: st.kind, name: st.name,
        inputNodeId: st.inputNode === 'input' ? inputId : (nodeMap.get(st.inputNode) ?? st.inputNode),
        outputs: st.outputs.map((o) => ({ ...o, nodeId: nodeMap.get(o.nodeId) ?? o.nodeId })),
        barriers: st.barriers,
        design: st.design,
      });
    }
    for (const r of e.reasons) reasons.push({ ...r, subjectId: r.subjectId === 'bus' ? `bus:${blockTag}` : r.subjectId });
  }
  // Per rail: the alternative that lost, and why (higher score, or a constraint it missed).
  const chosenKeys = new Set(blocks.map((b) => b.key));
  for (let r = 0; r < rails.length; r++) {
    const mine = blocks.find((b) => b.covers.includes(r))!;
    const myShare = scorer.score(mine.base) / mine.covers.length;
    let alt: Block | undefined;
    let altShare = Infinity;
    for (const b of allBlocks) {
      if (chosenKeys.has(b.key) || !b.covers.includes(r) || b.shape.kind === mine.shape.kind) continue;
      const sh = scorer.score(b.base) / b.covers.length;
      if (sh < altShare) { altShare = sh; alt = b; }
    }
    const parts: string[] = [];
    if (alt) {
      parts.push(`${describeShape(f, alt.shape)} was feasible but scores ${altShare.toFixed(3)} per rail against ${myShare.toFixed(3)} ` +
        `(loss ${alt.base.loss.toFixed(3)} W, cost ${alt.base.cost.toFixed(2)}, ${alt.base.parts} parts for ${alt.covers.length} rail(s))`);
    }
    const missByKind = new Map<string, Miss>();
    for (const m of misses.get(r) ?? []) {
      if (m.shape.kind === mine.shape.kind && m.shape.kind !== 'cwbuck') continue;
      const k = m.shape.kind;
      const cur = missByKind.get(k);
      if (!cur || BlockFactory.covers(m.shape).length < BlockFactory.covers(cur.shape).length) missByKind.set(k, m);
    }
    for (const m of missByKind.values()) parts.push(`${describeShape(f, m.shape)} was rejected: ${m.rejection.text}`);
    reasons.push({
      code: 'feed-choice', subjectId: rails[r]!.id,
      text: `${rails[r]!.name} is fed by ${describeShape(f, mine.shape)}` + (parts.length ? `; ${parts.join('; ')}` : '; no other feed was possible'),
      data: { share: myShare, ...(alt ? { alternativeShare: altShare } : {}) },
    });
  }
  return {
    id, labels, stages, internalNodes,
    score: planScore(sel, scorer),
    reasons,
  };
}

/** Remedies and shortfalls per rail when no plan exists. */
export function explainInfeasible(
  f: BlockFactory, blocks: readonly Block[], misses: ReadonlyMap<number, Miss[]>,
  leafFailures: ReadonlyMap<string, { count: number; example: NonNullable<SelectionEval['failure']> }>,
): Infeasibility[] {
  const rails = f.ctx.rails;
  const out: Infeasibility[] = [];
  const allowed = new Set(f.req.preferences.allowedKinds);
  const notAllowed = (['buck', 'cwbuck', 'ldo'] as StageKind[]).filter((k) => !allowed.has(k));
  for (let r = 0; r < rails.length; r++) {
    if (blocks.some((b) => b.covers.includes(r))) continue;
    const rail = rails[r]!;
    const ms = misses.get(r) ?? [];
    const remedies: string[] = [];
    for (const k of notAllowed) remedies.push(`allow the ${k === 'cwbuck' ? 'coupled-winding buck (cwbuck)' : k} stage kind`);
    if (!ms.length) {
      const iso = f.isolated(r);
      const text = iso
        ? `${rail.name} is in an isolated domain and no allowed stage can cross the barrier to it`
        : `${rail.name}: no allowed stage kind can make ${rail.voltage} V from the sources or other rails`;
      out.push({ railId: rail.id, constraint: iso ? 'barrier' : 'no-candidate', shortfall: 0, unit: '', text, remedies: remedies.length ? remedies : ['add a source or a rail of the same domain and sign with a larger voltage'] });
      continue;
    }
    // The nearest miss: the smallest shortfall among constraints with a unit; else the first.
    const withUnit = ms.filter((m) => m.rejection.unit !== '' && m.rejection.shortfall > 0);
    const near = (withUnit.length ? withUnit : ms).reduce((a, b) => (normMiss(b, rail.voltage) < normMiss(a, rail.voltage) ? b : a));
    const rj = near.rejection;
    if (rj.constraint === 'window') {
      const need = (Math.abs(rail.voltage) * rail.tolerance + rj.shortfall) / Math.abs(rail.voltage);
      remedies.push(`relax the tolerance of ${rail.name} to ±${(Math.ceil(need * 1000) / 10).toFixed(1)} %`);
      if (!allowed.has('ldo')) remedies.push('allow LDO post-regulation');
      if (near.shape.kind === 'cwbuck' && !/behind a tap winding/.test(rj.text)) {
        remedies.push(`raise maxSecondaries (now ${f.req.preferences.maxSecondaries}) so a tap winding and LDO fit on a shared magnetic`);
      }
    } else if (rj.constraint === 'ripple') {
      remedies.push(`relax the ripple limit of ${rail.name} to ${((rail.rippleLimit + rj.shortfall) * 1e3).toFixed(2)} mV`);
      if (!allowed.has('ldo')) remedies.push('allow LDO post-regulation');
    } else if (rj.constraint === 'tj') {
      remedies.push(`lower the load of ${rail.name} or the ambient temperature (Tj over by ${rj.shortfall.toFixed(1)} K)`);
    } else {
      remedies.push(`lower the load of ${rail.name}`, `relax the tolerance of ${rail.name}`);
    }
    out.push({
      railId: rail.id, constraint: rj.constraint, shortfall: rj.shortfall, unit: rj.unit,
      text: `${rail.name}: every feed fails; the nearest, ${describeShape(f, near.shape)}, fails: ${rj.text}`,
      remedies,
    });
  }
  if (!out.length) {
    for (const [k, v] of leafFailures) {
      const railId = v.example.railIndex !== undefined ? rails[v.example.railIndex]!.id : (rails[0]?.id ?? '');
      const remedies = k === 'source-current'
        ? ['raise the source current limit', 'lower the loads', 'raise the source minimum voltage']
        : ['relax the tolerances', `raise maxSecondaries (now ${f.req.preferences.maxSecondaries})`, 'lower the loads'];
      out.push({ railId, constraint: k, shortfall: v.example.shortfall, unit: v.example.unit, text: `every complete tree fails (${v.count} tried): ${v.example.text}`, remedies });
    }
  }
  if (!out.length && rails.length) {
    out.push({ railId: rails[0]!.id, constraint: 'cover', shortfall: 0, unit: '', text: 'no combination of feasible feeds covers every rail exactly once', remedies: [`raise maxSecondaries (now ${f.req.preferences.maxSecondaries})`, 'allow more stage kinds'] });
  }
  return out;
}

function normMiss(m: Miss, v: number): number {
  const r = m.rejection;
  if (r.unit === 'V') return r.shortfall / Math.max(Math.abs(v), 1e-3);
  if (r.unit === 'K') return r.shortfall / 100;
  return r.shortfall || 1;
}
