/**
 * Build what the window draws from the session: requirements, rails, and the chosen plan
 * with its roll-up, layout and BOM. Each computed part is optional: when one cannot be
 * computed the view carries a note saying what and why, never made-up numbers.
 */
import ELK from 'elkjs/lib/elk.bundled.js';
import { groupRails } from '../engine/rails.ts';
import { buildTreeView, entryPoint, groupText, layoutTree, nodeSize, nodeText, type LaidOutTree, type TreeFigures, type TreeView } from '../engine/layout.ts';
import type { Plan } from '../engine/plan-types.ts';
import type { AlternativeFigures, LayoutView, PlanView, Snapshot, BomView } from './contract.ts';
import { projectProblems } from './requirements.ts';
import type { Session } from './session.ts';
import { computeRollup, computeBom, treeFigures, type ComputedRollup } from './figures.ts';

let elk: InstanceType<typeof ELK> | null = null;
function elkInstance(): InstanceType<typeof ELK> {
  elk ??= new ELK();
  return elk;
}

/**
 * The last layout, keyed by the tree's structure. An edit that only changes figures (a
 * load current) keeps the positions and refreshes the text, so the edit → roll-up path
 * does not wait for ELK; any change of nodes, titles, edges or groups lays out again.
 */
let cache: { key: string; tree: LaidOutTree } | null = null;

function structureKey(v: TreeView): string {
  return JSON.stringify([v.nodes.map((n) => [n.id, n.kind, n.title, n.groupId, nodeSize(n)]), v.edges.map((e) => [e.id, e.crossesBarrier, !!e.label]), v.groups.map((g) => [g.id, g.title])]);
}

async function laidOut(view: TreeView): Promise<LaidOutTree> {
  const key = structureKey(view);
  if (cache && cache.key === key) {
    const byNode = new Map(view.nodes.map((n) => [n.id, n]));
    const byEdge = new Map(view.edges.map((e) => [e.id, e]));
    return {
      ...cache.tree,
      title: view.title,
      subtitle: view.subtitle,
      nodes: cache.tree.nodes.map((n) => ({ ...n, lines: byNode.get(n.id)?.lines ?? n.lines, key: byNode.get(n.id)?.key ?? n.key })),
      edges: cache.tree.edges.map((e) => ({ ...e, label: byEdge.get(e.id)?.label ?? e.label })),
    };
  }
  const tree = await layoutTree(view, elkInstance());
  cache = { key, tree };
  return tree;
}

export async function computeLayout(s: Session, plan: Plan, figures: TreeFigures | undefined): Promise<LayoutView> {
  const rails = groupRails(s.requirements);
  const view = buildTreeView(s.requirements, rails, plan, figures);
  const t = await laidOut(view);
  const nodes = t.nodes.map((n) => ({
    id: n.id, kind: n.kind, label: n.title, sub: n.lines, key: n.key, domainId: n.groupId,
    glance: nodeText(n, 'glance'), detail: nodeText(n, 'detail'),
    x: n.x, y: n.y, width: n.width, height: n.height,
  }));
  const groups = t.groups.map((g) => ({
    domainId: g.id, label: g.title, isolation: g.isolation, glance: groupText(g, 'glance'), detail: groupText(g, 'detail'), x: g.x, y: g.y, width: g.width, height: g.height,
  }));
  const barriers: LayoutView['barriers'] = [];
  for (const e of t.edges) {
    if (!e.crossesBarrier) continue;
    const target = t.nodes.find((n) => n.id === e.to);
    const g = t.groups.find((x) => x.id === target?.groupId);
    if (!g) continue;
    const p = entryPoint(e.points, g);
    if (!p) continue;
    barriers.push({ x1: p.x, y1: p.y - 14, x2: p.x, y2: p.y + 14, label: g.isolation });
  }
  return {
    width: t.width,
    height: t.height,
    nodes,
    edges: t.edges.map((e) => ({ id: e.id, from: e.from, to: e.to, label: e.label, points: e.points, crossesBarrier: e.crossesBarrier })),
    groups,
    barriers,
  };
}

export async function buildPlanView(s: Session): Promise<PlanView | null> {
  const result = s.planResult;
  if (!result) return null;
  const selected = result.alternatives.find((p) => p.id === s.selectedId) ?? result.best ?? result.alternatives[0] ?? null;
  const notes: string[] = [];
  let rollup: ComputedRollup | null = null;
  let layout: LayoutView | null = null;
  let bom: BomView | null = null;
  if (selected) {
    try {
      rollup = computeRollup(s, selected);
    } catch (e) {
      notes.push(`Roll-up: ${(e as Error).message}`);
    }
    try {
      bom = computeBom(s, selected);
    } catch (e) {
      notes.push(`BOM: ${(e as Error).message}`);
    }
    try {
      const mode = s.drawingModeId && s.requirements.modes.some((m) => m.id === s.drawingModeId) ? s.drawingModeId : undefined;
      layout = await computeLayout(s, selected, treeFigures(s, rollup, mode));
    } catch (e) {
      notes.push(`Drawing: ${(e as Error).message}`);
    }
  }
  if (rollup) notes.push(...rollup.view.messages);
  // Every alternative through the same roll-up and BOM as the chosen one (one number per quantity).
  const alternatives: AlternativeFigures[] = result.alternatives.map((p) => {
    const why: string[] = [];
    let weightedLoss: number | null = null;
    let cost: number | null = null;
    let parts: number | null = null;
    try {
      weightedLoss = (p === selected && rollup ? rollup : computeRollup(s, p)).view.weightedLoss;
    } catch (e) {
      why.push(`roll-up: ${(e as Error).message}`);
    }
    try {
      const b = p === selected && bom ? bom : computeBom(s, p);
      cost = b.total;
      parts = b.parts;
    } catch (e) {
      why.push(`BOM: ${(e as Error).message}`);
    }
    return { planId: p.id, weightedLoss, cost, parts, note: why.length ? why.join('; ') : null };
  });
  return { alternatives, result, selectedId: selected?.id ?? null, selected, stale: s.planStale(), rollup: rollup?.view ?? null, layout, bom, notes, drawingModeId: s.drawingModeId };
}

export async function buildSnapshot(s: Session): Promise<Snapshot> {
  return {
    state: s.state(),
    requirements: s.requirements,
    rails: groupRails(s.requirements),
    plan: await buildPlanView(s),
    problems: projectProblems(s.requirements),
  };
}
