/**
 * Layout adapter: plan → tree view (nodes, edges, domain groups, with their text) → ELK graph
 * → positions back. The ELK instance is passed in (the bundled build in Node, a worker in the
 * window), so this module stays pure. The SVG and PDF writers and the window all draw from
 * the same `LaidOutTree`.
 */
import type { Id, IsolationClass, Rail, Requirements, StageKind } from './model.ts';
import type { Plan } from './plan-types.ts';

// ---------------------------------------------------------------------------------------
// Number formatting for labels (engineering notation at the edge of the engine)

const PREFIXES: Array<[number, string]> = [
  [1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''], [1e-3, 'm'], [1e-6, 'µ'], [1e-9, 'n'], [1e-12, 'p'],
];

/** `fmtQty(0.0123, 'A')` → "12.3 mA"; three significant digits by default. */
export function fmtQty(value: number, unit: string, digits = 3): string {
  if (!Number.isFinite(value)) return `— ${unit}`.trim();
  if (value === 0) return `0 ${unit}`.trim();
  const a = Math.abs(value);
  let [scale, prefix] = PREFIXES[PREFIXES.length - 1]!;
  for (const [s, p] of PREFIXES) {
    if (a >= s * 0.9995) { scale = s; prefix = p; break; }
  }
  const x = value / scale;
  const ax = Math.abs(x);
  const decimals = Math.max(0, digits - (ax >= 100 ? 3 : ax >= 10 ? 2 : 1));
  let text = x.toFixed(decimals);
  if (text.includes('.')) text = text.replace(/0+$/, '').replace(/\.$/, '');
  return `${text} ${prefix}${unit}`.trim();
}

/** Percentage with one decimal: 0.9123 → "91.2 %". */
export function fmtPct(r: number): string {
  return Number.isFinite(r) ? `${(r * 100).toFixed(1)} %` : '— %';
}

/** A tolerance ratio as a percentage without needless zeros: 0.015 → "1.5", 0.05 → "5". */
export function pctText(r: number): string {
  return String(Number.parseFloat((r * 100).toPrecision(3)));
}

/** Readable names for the stage kinds (our own words; trade terms only). */
export const STAGE_KIND_LABEL: Record<StageKind, string> = {
  buck: 'synchronous buck',
  cwbuck: 'coupled-winding buck',
  ldo: 'LDO',
  'iso-module': 'isolated module',
  'load-switch': 'load switch',
};

// ---------------------------------------------------------------------------------------
// The tree view: what is drawn, independent of where

export type TreeNodeKind = 'source' | 'stage' | 'rail' | 'internal';

export interface TreeNode {
  id: Id;
  kind: TreeNodeKind;
  title: string;
  /** Further text lines (V, I, P for rails; kind and η for stages). */
  lines: string[];
  /** Domain group the node sits in; null = outside every group (sources). */
  groupId: Id | null;
  stageKind?: StageKind;
}

export interface TreeEdge {
  id: string;
  from: Id;
  to: Id;
  label: string;
  /** The edge passes a galvanic barrier (a coupled winding into an isolated domain). */
  crossesBarrier: boolean;
}

export interface TreeGroup {
  id: Id;
  title: string;
  isolation: IsolationClass;
  workingVoltage: number;
}

export interface TreeView {
  title: string;
  subtitle: string;
  /** Operating mode whose figures are shown, if any. */
  modeName: string | null;
  nodes: TreeNode[];
  edges: TreeEdge[];
  groups: TreeGroup[];
}

/** Figures shown on the drawing, for one operating mode (from the roll-up). */
export interface TreeFigures {
  modeName: string;
  /** Per rail / internal node / source: voltage, current, power. */
  nodes: Record<Id, { v: number; i: number; p: number }>;
  /** Per stage: efficiency, loss, input current and power. */
  stages: Record<Id, { efficiency: number; loss: number; iin: number; pin: number }>;
}

export function buildTreeView(req: Requirements, rails: Rail[], plan: Plan, figures?: TreeFigures): TreeView {
  const nodes: TreeNode[] = [];
  const edges: TreeEdge[] = [];
  const domainOf = new Map<Id, Id>();
  const isolationOf = new Map(req.domains.map((d) => [d.id, d.isolation] as const));
  for (const r of rails) domainOf.set(r.id, r.domainId);
  for (const n of plan.internalNodes) domainOf.set(n.id, n.domainId);
  const sourceIds = new Set(req.sources.map((s) => s.id));
  const f = figures;

  for (const s of req.sources) {
    const fig = f?.nodes[s.id];
    const lines = [`${fmtQty(s.vMin, 'V')} … ${fmtQty(s.vMax, 'V')} (nom ${fmtQty(s.vNom, 'V')})`];
    if (fig) lines.push(`${fmtQty(fig.i, 'A')} · ${fmtQty(fig.p, 'W')}`);
    nodes.push({ id: s.id, kind: 'source', title: s.name, lines, groupId: null });
  }

  // A stage sits in the domain of its input node; a stage fed straight from a source sits in
  // the first non-isolated domain among its outputs (or outside every group).
  for (const st of plan.stages) {
    let group: Id | null = domainOf.get(st.inputNodeId) ?? null;
    if (sourceIds.has(st.inputNodeId)) {
      group = null;
      for (const o of st.outputs) {
        const d = domainOf.get(o.nodeId);
        if (d && (isolationOf.get(d) ?? 'none') === 'none') { group = d; break; }
      }
    }
    const fig = f?.stages[st.id];
    const lines = [STAGE_KIND_LABEL[st.kind]];
    if (fig) lines.push(`η ${fmtPct(fig.efficiency)} · loss ${fmtQty(fig.loss, 'W')}`);
    nodes.push({ id: st.id, kind: 'stage', title: st.name, lines, groupId: group, stageKind: st.kind });
    if (group !== null) domainOf.set(st.id, group);
    const fin = fig ? `${fmtQty(fig.iin, 'A')} · ${fmtQty(fig.pin, 'W')}` : '';
    edges.push({ id: `e:${st.inputNodeId}>${st.id}`, from: st.inputNodeId, to: st.id, label: fin, crossesBarrier: false });
    // Turns as the stage design chose them (they may refine what the plan recorded).
    const dz = st.design as { primaryTurns?: unknown; secondaries?: Array<{ nodeId?: unknown; turns?: unknown }>; outputs?: Array<{ nodeId?: unknown }> } | null;
    const designTurns = new Map<Id, number>();
    if (dz && typeof dz.primaryTurns === 'number' && Array.isArray(dz.outputs) && typeof dz.outputs[0]?.nodeId === 'string') {
      designTurns.set(dz.outputs[0].nodeId, dz.primaryTurns);
      for (const w of dz.secondaries ?? []) if (typeof w.nodeId === 'string' && typeof w.turns === 'number') designTurns.set(w.nodeId, w.turns);
    }
    for (const o of st.outputs) {
      const toDomain = domainOf.get(o.nodeId);
      const crosses = st.barriers.some((b) => b.toDomainId === toDomain) && toDomain !== group;
      const role = o.role === 'output' ? '' : o.role === 'primary' ? 'primary' : 'secondary';
      const nT = designTurns.get(o.nodeId) ?? o.turns;
      // Turns as a count with the polarity marked in words (a negative count is a reversed winding).
      const turns = nT !== undefined ? `${role ? ' ' : ''}${Math.abs(nT)} T${nT < 0 ? ' reversed' : ''}` : '';
      edges.push({ id: `e:${st.id}>${o.nodeId}`, from: st.id, to: o.nodeId, label: `${role}${turns}`, crossesBarrier: crosses });
    }
  }

  for (const r of rails) {
    const fig = f?.nodes[r.id];
    const lines = fig
      // Four significant digits for rail voltages: reference rails (4.096 V) need them.
      ? [`${fmtQty(fig.v, 'V', 4)} ±${pctText(r.tolerance)} %`, `${fmtQty(fig.i, 'A')} · ${fmtQty(fig.p, 'W')}`]
      : [`${fmtQty(r.voltage, 'V', 4)} ±${pctText(r.tolerance)} %`];
    nodes.push({ id: r.id, kind: 'rail', title: r.name, lines, groupId: r.domainId });
  }
  for (const n of plan.internalNodes) {
    const fig = f?.nodes[n.id];
    const lines = [`${n.kind === 'tap' ? 'winding tap' : 'bus'} ${fmtQty(fig?.v ?? n.voltage, 'V', 4)}`];
    if (fig) lines.push(`${fmtQty(fig.i, 'A')} · ${fmtQty(fig.p, 'W')}`);
    nodes.push({ id: n.id, kind: 'internal', title: n.name, lines, groupId: n.domainId });
  }

  const used = new Set(nodes.map((n) => n.groupId).filter((g): g is Id => g !== null));
  const groups: TreeGroup[] = req.domains
    .filter((d) => used.has(d.id))
    .map((d) => ({
      id: d.id,
      title: d.isolation === 'none'
        ? `${d.name} (galvanically connected)`
        : `${d.name}: ${d.isolation} isolation, ${fmtQty(d.workingVoltage, 'V')} working`,
      isolation: d.isolation,
      workingVoltage: d.workingVoltage,
    }));
  // Nodes whose domain is unknown are drawn outside every group rather than lost.
  const known = new Set(groups.map((g) => g.id));
  for (const n of nodes) if (n.groupId !== null && !known.has(n.groupId)) n.groupId = null;
  // Edges to nodes that do not exist (a broken plan) are dropped rather than crash ELK.
  const ids = new Set(nodes.map((n) => n.id));
  const okEdges = edges.filter((e) => ids.has(e.from) && ids.has(e.to));

  return {
    title: req.meta.name || 'Power tree',
    subtitle: f ? `Figures for operating mode "${f.modeName}"` : 'Nominal voltages (no roll-up figures)',
    modeName: f ? f.modeName : null,
    nodes,
    edges: okEdges,
    groups,
  };
}

// ---------------------------------------------------------------------------------------
// ELK adapter

/** The part of the ELK API this adapter needs (elkjs's `ELK` satisfies it). */
export interface ElkNodeLike {
  id: string;
  x?: number;
  y?: number;
  width?: number;
  height?: number;
  children?: ElkNodeLike[];
  edges?: ElkEdgeLike[];
  labels?: Array<{ text?: string; x?: number; y?: number; width?: number; height?: number }>;
  layoutOptions?: Record<string, string>;
}
export interface ElkEdgeLike {
  id: string;
  sources: string[];
  targets: string[];
  container?: string;
  labels?: Array<{ text?: string; x?: number; y?: number; width?: number; height?: number }>;
  sections?: Array<{ startPoint: Point; endPoint: Point; bendPoints?: Point[] }>;
}
export interface ElkLike {
  layout(graph: ElkNodeLike): Promise<ElkNodeLike>;
}

export interface Point { x: number; y: number }
export interface Box { x: number; y: number; width: number; height: number }

export interface LaidOutNode extends TreeNode, Box {}
export interface LaidOutEdge extends TreeEdge {
  points: Point[];
  labelBox: Box | null;
}
export interface LaidOutGroup extends TreeGroup, Box {}

export interface LaidOutTree {
  title: string;
  subtitle: string;
  modeName: string | null;
  width: number;
  height: number;
  nodes: LaidOutNode[];
  edges: LaidOutEdge[];
  groups: LaidOutGroup[];
}

/** Text metrics the drawing uses (sans-serif); widths are estimates, generous on purpose. */
export const TEXT = {
  titleSize: 11.5,
  lineSize: 10,
  labelSize: 9,
  groupSize: 10.5,
  /** Average advance per character as a fraction of the font size. */
  advance: 0.6,
  lineGap: 1.35,
  pad: 8,
} as const;

export function textWidth(text: string, size: number): number {
  return text.length * size * TEXT.advance;
}

export function nodeSize(n: TreeNode): { width: number; height: number } {
  // Bold titles run about 10 % wider than the regular lines.
  const w = Math.max(textWidth(n.title, TEXT.titleSize) * 1.12, ...n.lines.map((l) => textWidth(l, TEXT.lineSize)));
  const width = Math.ceil(Math.min(300, Math.max(n.kind === 'stage' ? 120 : 96, w + 2 * TEXT.pad)));
  const height = Math.ceil(TEXT.pad * 2 + TEXT.titleSize * TEXT.lineGap + n.lines.length * TEXT.lineSize * TEXT.lineGap);
  return { width, height };
}

const GROUP_HEADER = 24;

export function toElkGraph(view: TreeView): ElkNodeLike {
  const groupChildren = new Map<Id, ElkNodeLike[]>();
  const root: ElkNodeLike[] = [];
  for (const g of view.groups) groupChildren.set(g.id, []);
  for (const n of view.nodes) {
    const { width, height } = nodeSize(n);
    const en: ElkNodeLike = { id: n.id, width, height };
    const list = n.groupId !== null ? groupChildren.get(n.groupId) : undefined;
    (list ?? root).push(en);
  }
  for (const g of view.groups) {
    const kids = groupChildren.get(g.id)!;
    if (kids.length === 0) continue;
    root.push({
      id: `group:${g.id}`,
      children: kids,
      layoutOptions: {
        'elk.padding': `[top=${GROUP_HEADER + 10},left=14,bottom=14,right=14]`,
        'elk.nodeSize.constraints': 'MINIMUM_SIZE',
        'elk.nodeSize.minimum': `(${Math.ceil(textWidth(g.title, TEXT.groupSize) * 1.12 + 28)}, 60)`,
      },
    });
  }
  const edges: ElkEdgeLike[] = view.edges.map((e) => ({
    id: e.id,
    sources: [e.from],
    targets: [e.to],
    labels: e.label ? [{ text: e.label, width: Math.ceil(textWidth(e.label, TEXT.labelSize) + 6), height: Math.ceil(TEXT.labelSize * 1.4) }] : [],
  }));
  return {
    id: 'root',
    layoutOptions: {
      'elk.algorithm': 'layered',
      'elk.direction': 'RIGHT',
      'elk.hierarchyHandling': 'INCLUDE_CHILDREN',
      'elk.edgeRouting': 'ORTHOGONAL',
      'elk.layered.spacing.nodeNodeBetweenLayers': '46',
      'elk.spacing.nodeNode': '22',
      'elk.spacing.edgeLabel': '3',
      'elk.edgeLabels.placement': 'CENTER',
      'elk.layered.edgeLabels.sideSelection': 'ALWAYS_UP',
      // Default node placement, no model-order pass, light crossing minimisation: several
      // times faster on trees with many domains and stages, and power trees (few crossings
      // by nature) read as well.
      'elk.layered.thoroughness': '1',
      'elk.layered.crossingMinimization.greedySwitch.type': 'OFF',
      'elk.padding': '[top=56,left=16,bottom=16,right=16]',
    },
    children: root,
    edges,
  };
}

/** Lay the tree out with the ELK instance given; positions are absolute (page coordinates). */
export async function layoutTree(view: TreeView, elk: ElkLike): Promise<LaidOutTree> {
  const out = await elk.layout(toElkGraph(view));
  const abs = new Map<string, Box>();
  const allEdges: ElkEdgeLike[] = [];
  const walk = (n: ElkNodeLike, ox: number, oy: number) => {
    const x = ox + (n.x ?? 0);
    const y = oy + (n.y ?? 0);
    abs.set(n.id, { x, y, width: n.width ?? 0, height: n.height ?? 0 });
    for (const e of n.edges ?? []) allEdges.push(e);
    for (const c of n.children ?? []) walk(c, x, y);
  };
  walk(out, 0, 0);
  const byId = new Map(view.edges.map((e) => [e.id, e]));
  const nodes: LaidOutNode[] = view.nodes.map((n) => ({ ...n, ...abs.get(n.id)! }));
  const groups: LaidOutGroup[] = view.groups
    .filter((g) => abs.has(`group:${g.id}`))
    .map((g) => ({ ...g, ...abs.get(`group:${g.id}`)! }));
  const edges: LaidOutEdge[] = [];
  for (const e of allEdges) {
    const te = byId.get(e.id);
    if (!te) continue;
    const c = abs.get(e.container ?? 'root') ?? { x: 0, y: 0, width: 0, height: 0 };
    const points: Point[] = [];
    for (const s of e.sections ?? []) {
      points.push({ x: c.x + s.startPoint.x, y: c.y + s.startPoint.y });
      for (const b of s.bendPoints ?? []) points.push({ x: c.x + b.x, y: c.y + b.y });
      points.push({ x: c.x + s.endPoint.x, y: c.y + s.endPoint.y });
    }
    const l = e.labels?.[0];
    const labelBox = l && te.label
      ? { x: c.x + (l.x ?? 0), y: c.y + (l.y ?? 0), width: l.width ?? 0, height: l.height ?? 0 }
      : null;
    edges.push({ ...te, points, labelBox });
  }
  const root = abs.get('root')!;
  return { title: view.title, subtitle: view.subtitle, modeName: view.modeName, width: root.width, height: root.height, nodes, edges, groups };
}

/** Where a polyline first enters a box (for drawing the barrier mark on a crossing edge). */
export function entryPoint(points: Point[], box: Box): Point | null {
  const inside = (p: Point) => p.x > box.x && p.x < box.x + box.width && p.y > box.y && p.y < box.y + box.height;
  for (let i = 1; i < points.length; i++) {
    const a = points[i - 1]!;
    const b = points[i]!;
    if (inside(a) || !inside(b)) continue;
    // Orthogonal routing: segments are horizontal or vertical; bisect for generality.
    let lo = a;
    let hi = b;
    for (let k = 0; k < 40; k++) {
      const m = { x: (lo.x + hi.x) / 2, y: (lo.y + hi.y) / 2 };
      if (inside(m)) hi = m; else lo = m;
    }
    return hi;
  }
  return null;
}
