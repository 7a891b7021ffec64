/**
 * Layout adapter: plan → tree view (nodes, edges, domain groups, with their text) → ELK graph
 * → positions back. The ELK instance is passed in (the bundled build in Node, a worker in the
 * window), so this module stays pure. The SVG and PDF writers and the window all draw from
 * the same `LaidOutTree`.
 */
import type { Id, IsolationClass, Rail, Requirements, StageKind } from './model.ts';
import type { Plan } from './plan-types.ts';
import { formatUnit } from './notation.ts';
import { kindModuleOf } from './stages/registry.ts';

// ---------------------------------------------------------------------------------------
// Number formatting for labels (engineering notation at the edge of the engine)

/**
 * `fmtQty(0.0123, 'A')` → "12.3 mA"; three significant digits by default. The one quantity
 * formatter (`formatUnit`, engine/notation.ts) with a unit symbol; not finite: "— A".
 */
export function fmtQty(value: number, unit: string, digits = 3): string {
  if (!Number.isFinite(value)) return `— ${unit}`.trim();
  return formatUnit(value, unit, digits);
}

/** Percentage with one decimal: 0.9123 → "91.2 %". */
export function fmtPct(r: number): string {
  return Number.isFinite(r) ? `${(r * 100).toFixed(1)} %` : '— %';
}

/** A tolerance ratio as a percentage without needless zeros: 0.015 → "1.5", 0.05 → "5". */
export function pctText(r: number): string {
  return String(Number.parseFloat((r * 100).toPrecision(3)));
}

/** A stage kind's colour in the drawing: its `colour` in stages/registry.ts (a kind no module registers: the buck's). */
export function kindColour(kind: StageKind): string {
  return (kindModuleOf(kind) ?? kindModuleOf('buck')!).colour;
}

/** A stage kind's name in the drawing and the report: its `label` in stages/registry.ts. */
export function stageKindLabel(kind: StageKind): string {
  // A kind no module registers (a saved plan written by hand) is shown by its own word.
  return kindModuleOf(kind)?.label ?? String(kind);
}

// ---------------------------------------------------------------------------------------
// The tree view: what is drawn, independent of where

export type TreeNodeKind = 'source' | 'stage' | 'rail' | 'internal';

export interface TreeNode {
  id: Id;
  kind: TreeNodeKind;
  /** The full name (inspector, hover, the list of drawn items). */
  title: string;
  /** The name as drawn: inside a domain box the domain's name is left out (the box says it). */
  name: string;
  /** The one figure shown at a glance (Fit): load current, efficiency, input power. */
  key: string;
  /** Further text lines (V, I, P for rails; kind and η for stages), shown when zoomed in. */
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
  const winding = new Map<Id, string>();

  for (const s of req.sources) {
    const fig = f?.nodes[s.id];
    const lines = [`${fmtQty(s.vMin, 'V')} … ${fmtQty(s.vMax, 'V')} (nom ${fmtQty(s.vNom, 'V')})`];
    if (fig) lines.push(`${fmtQty(fig.i, 'A')} · ${fmtQty(fig.p, 'W')}`);
    const key = fig ? `${fmtQty(fig.p, 'W')} in` : `${fmtQty(s.vMin, 'V')} … ${fmtQty(s.vMax, 'V')}`;
    nodes.push({ id: s.id, kind: 'source', title: s.name, name: s.name, key, lines, groupId: null });
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
    const lines = [stageKindLabel(st.kind)];
    if (fig) lines.push(`η ${fmtPct(fig.efficiency)} · loss ${fmtQty(fig.loss, 'W')}`);
    const key = fig ? `η ${fmtPct(fig.efficiency)}` : stageKindLabel(st.kind);
    nodes.push({ id: st.id, kind: 'stage', title: st.name, name: st.name, key, lines, groupId: group, stageKind: st.kind });
    if (group !== null) domainOf.set(st.id, group);
    // The input current and power are the stage's own lines (edge labels crowd the drawing).
    if (fig) lines.push(`in ${fmtQty(fig.iin, 'A')} · ${fmtQty(fig.pin, 'W')}`);
    edges.push({ id: `e:${st.inputNodeId}>${st.id}`, from: st.inputNodeId, to: st.id, label: '', crossesBarrier: false });
    // Turns as the stage design chose them (they may refine what the plan recorded).
    // The typeof checks also hold for a saved design that is incomplete (plan-types.ts).
    const dz = st.design;
    const designTurns = new Map<Id, number>();
    if (dz?.kind === 'cwbuck' && typeof dz.primaryTurns === 'number' && Array.isArray(dz.outputs) && typeof dz.outputs[0]?.nodeId === 'string') {
      designTurns.set(dz.outputs[0].nodeId, dz.primaryTurns);
      for (const w of dz.secondaries ?? []) if (typeof w.nodeId === 'string' && typeof w.turns === 'number') designTurns.set(w.nodeId, w.turns);
    }
    for (const o of st.outputs) {
      const toDomain = domainOf.get(o.nodeId);
      const crosses = st.barriers.some((b) => b.toDomainId === toDomain) && toDomain !== group;
      const role = o.role === 'output' ? '' : o.role === 'primary' ? 'primary' : 'secondary';
      const nT = designTurns.get(o.nodeId) ?? o.turns;
      // The winding's turns are a line of the node it feeds (not an edge label), as a count with
      // the polarity marked in words (a negative count is a reversed winding).
      if (nT !== undefined) winding.set(o.nodeId, `${role || 'winding'} ${Math.abs(nT)} T${nT < 0 ? ' reversed' : ''}`);
      edges.push({ id: `e:${st.id}>${o.nodeId}`, from: st.id, to: o.nodeId, label: '', crossesBarrier: crosses });
    }
  }

  for (const r of rails) {
    const fig = f?.nodes[r.id];
    const lines = fig
      // Four significant digits for rail voltages: reference rails (4.096 V) need them.
      ? [`${fmtQty(fig.v, 'V', 4)} ±${pctText(r.tolerance)} %`, `${fmtQty(fig.i, 'A')} · ${fmtQty(fig.p, 'W')}`]
      : [`${fmtQty(r.voltage, 'V', 4)} ±${pctText(r.tolerance)} %`];
    if (winding.has(r.id)) lines.push(winding.get(r.id)!);
    const key = fig ? fmtQty(fig.i, 'A') : `${fmtQty(r.voltage, 'V', 4)} ±${pctText(r.tolerance)} %`;
    nodes.push({ id: r.id, kind: 'rail', title: r.name, name: r.name, key, lines, groupId: r.domainId });
  }
  for (const n of plan.internalNodes) {
    const fig = f?.nodes[n.id];
    // One number per quantity: the name carries the planned (nominal) voltage; when the
    // roll-up computes another, the line says which is which.
    const kindWord = n.kind === 'tap' ? 'winding tap' : 'bus';
    const differs = fig !== undefined && fmtQty(fig.v, 'V', 4) !== fmtQty(n.voltage, 'V', 4);
    const lines = [differs ? `${kindWord}: nominal ${fmtQty(n.voltage, 'V', 4)}, computed ${fmtQty(fig!.v, 'V', 4)}` : `${kindWord} ${fmtQty(n.voltage, 'V', 4)}`];
    if (fig) lines.push(`${fmtQty(fig.i, 'A')} · ${fmtQty(fig.p, 'W')}`);
    if (winding.has(n.id)) lines.push(winding.get(n.id)!);
    const key = fig ? fmtQty(fig.i, 'A') : fmtQty(n.voltage, 'V', 4);
    nodes.push({ id: n.id, kind: 'internal', title: n.name, name: n.name, key, lines, groupId: n.domainId });
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
  // Inside a domain box the domain's name is said once, by the box.
  const domainName = new Map(req.domains.map((d) => [d.id, d.name] as const));
  for (const n of nodes) {
    const dn = n.groupId !== null ? domainName.get(n.groupId) : undefined;
    if (dn) n.name = shortName(n.title, dn);
  }
  // Edges to nodes that do not exist (a broken plan) are dropped rather than crash ELK.
  const ids = new Set(nodes.map((n) => n.id));
  const okEdges = edges.filter((e) => ids.has(e.from) && ids.has(e.to));

  return {
    title: req.meta.name || 'Power tree',
    subtitle: f ? `Figures for operating mode "${f.modeName}" at nominal input${req.sources.length === 1 ? ` (${fmtQty(req.sources[0]!.vNom, 'V')})` : ''}` : 'Nominal voltages (no roll-up figures)',
    modeName: f ? f.modeName : null,
    nodes,
    edges: okEdges,
    groups,
  };
}

/** `title` without the words `domain` (a whole-word run), when something is left. */
export function shortName(title: string, domain: string): string {
  const d = domain.trim();
  if (!d) return title;
  const i = title.indexOf(d);
  if (i < 0) return title;
  const before = title.slice(0, i);
  const after = title.slice(i + d.length);
  if ((before && !/\s$/.test(before)) || (after && !/^\s/.test(after))) return title;
  const left = `${before}${after}`.replace(/\s+/g, ' ').trim();
  return left.length > 0 ? left : title;
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

/**
 * Text metrics the drawing uses (sans-serif). Widths come from a fixed per-character model,
 * generous on purpose: a character advances `advance` (regular) or `boldAdvance` (bold) times
 * the font size; the widest common sans-serif faces (DejaVu Sans: digits 0.64 em regular,
 * 0.70 em bold, from the font's own metrics table) stay inside it for the labels drawn here.
 *
 * Two levels of detail share one layout. "Glance" (the whole tree in view): each node shows
 * its name and one key figure in large type. "Detail" (zoomed in, and in the printed files):
 * the name and every V / I / P / η line in small type. Every box is sized to hold both.
 */
export const TEXT = {
  titleSize: 11.5,
  lineSize: 10,
  labelSize: 9,
  groupSize: 10.5,
  glanceTitle: 20,
  glanceKey: 20,
  glanceGroup: 20,
  /** Characters per line of a wrapped name at a glance. */
  glanceWrap: 10,
  advance: 0.62,
  boldAdvance: 0.7,
  lineGap: 1.3,
  pad: 8,
} as const;

export type Detail = 'glance' | 'detail';

export function textWidth(text: string, size: number, bold = false): number {
  return [...text].length * size * (bold ? TEXT.boldAdvance : TEXT.advance);
}

/**
 * Break `text` into lines of at most `max` characters at spaces or after a hyphen (a longer
 * word stays whole); a number keeps its unit ("7.5 V") on its line.
 */
export function wrapText(text: string, max: number): string[] {
  const words = text.replace(/(\d) (?=[a-zµ]?[VAWT%]\b)/gi, '$1\u00a0').split(/[ \t\n]+/).filter(Boolean)
    .flatMap((w) => w.length > max && /-./.test(w.slice(1)) ? w.replace(/(?<=.)-(?=.)/g, '-\n').split('\n') : [w]);
  const out: string[] = [];
  let cur = '';
  for (const w of words) {
    const glue = cur.endsWith('-') ? '' : ' ';
    if (!cur) cur = w;
    else if (cur.length + glue.length + w.length <= max) cur += glue + w;
    else { out.push(cur); cur = w; }
  }
  if (cur) out.push(cur);
  return out.length ? out.map((l) => l.replace(/\u00a0/g, ' ')) : [''];
}

/** One line of text inside a node: where its baseline starts, its size, and the box it takes. */
export interface TextLine {
  text: string;
  x: number;
  /** Baseline. */
  y: number;
  size: number;
  bold: boolean;
  role: 'name' | 'key' | 'line';
  box: Box;
}

/** Left inset of a node's text (stages have a coloured side bar). */
const inset = (n: TreeNode) => TEXT.pad + (n.kind === 'stage' ? 4 : 0);

/** The lines a node shows at a level of detail, relative to the node's top-left corner. */
export function nodeTextLocal(n: TreeNode, detail: Detail): TextLine[] {
  const rows: Array<{ text: string; size: number; bold: boolean; role: TextLine['role'] }> = detail === 'glance'
    ? [
        ...wrapText(n.name, TEXT.glanceWrap).map((t) => ({ text: t, size: TEXT.glanceTitle, bold: true, role: 'name' as const })),
        { text: n.key, size: TEXT.glanceKey, bold: false, role: 'key' as const },
      ]
    : [
        { text: n.name, size: TEXT.titleSize, bold: true, role: 'name' as const },
        ...n.lines.map((t) => ({ text: t, size: TEXT.lineSize, bold: false, role: 'line' as const })),
      ];
  const out: TextLine[] = [];
  let y = TEXT.pad;
  const x = inset(n);
  for (const r of rows) {
    const h = r.size * TEXT.lineGap;
    // Baseline at 80 % of the em box below the line's top, centred in the line's height.
    const base = y + (h - r.size) / 2 + r.size * 0.8;
    out.push({ ...r, x, y: base, box: { x, y: y + (h - r.size) / 2 - r.size * 0.05, width: textWidth(r.text, r.size, r.bold), height: r.size * 1.1 } });
    y += h;
  }
  return out;
}

/** The lines of a laid-out node at a level of detail, in page coordinates. */
export function nodeText(n: LaidOutNode, detail: Detail): TextLine[] {
  return nodeTextLocal(n, detail).map((l) => ({ ...l, x: l.x + n.x, y: l.y + n.y, box: { ...l.box, x: l.box.x + n.x, y: l.box.y + n.y } }));
}

/** Sizes by the text they come from (the edit path asks for every node's size twice). */
const sizes = new Map<string, { width: number; height: number }>();

export function nodeSize(n: TreeNode): { width: number; height: number } {
  const key = `${n.kind}\u0000${n.name}\u0000${n.key}\u0000${n.lines.join('\u0000')}`;
  const hit = sizes.get(key);
  if (hit) return { ...hit };
  const size = measureNode(n);
  if (sizes.size > 5000) sizes.clear();
  sizes.set(key, size);
  return { ...size };
}

function measureNode(n: TreeNode): { width: number; height: number } {
  let w = 0;
  let h = 0;
  for (const d of ['glance', 'detail'] as const) {
    const ls = nodeTextLocal(n, d);
    for (const l of ls) w = Math.max(w, l.box.x + l.box.width);
    const last = ls[ls.length - 1]!;
    h = Math.max(h, last.box.y + last.box.height);
  }
  return { width: Math.ceil(Math.max(n.kind === 'stage' ? 110 : 90, w + TEXT.pad)), height: Math.ceil(h + TEXT.pad) };
}

/**
 * A domain box's title at a level of detail (page coordinates): at a glance the domain's
 * name on one line and its isolation on the next; in detail one line.
 */
export function groupText(g: TreeGroup & Partial<Box>, detail: Detail): TextLine[] {
  const gx = g.x ?? 0;
  const gy = g.y ?? 0;
  const parts = detail === 'glance' ? splitGroupTitle(g.title) : [g.title];
  const out: TextLine[] = [];
  let top = gy + 8;
  parts.forEach((text, i) => {
    const size = detail === 'glance' ? (i === 0 ? TEXT.glanceGroup : TEXT.glanceKey) : TEXT.groupSize;
    const bold = i === 0;
    out.push({ text, x: gx + 12, y: top + size * 0.85, size, bold, role: i === 0 ? 'name' : 'key', box: { x: gx + 12, y: top, width: textWidth(text, size, bold), height: size * 1.1 } });
    top += size * TEXT.lineGap;
  });
  return out;
}

/** "Front end: basic isolation, 250 V working" → ["Front end", "basic isolation, 250 V working"]. */
function splitGroupTitle(title: string): string[] {
  const m = /^(.*?)(?:: | \()(.*?)\)?$/.exec(title);
  return m && m[1] && m[2] ? [m[1], m[2]] : [title];
}

/** Height of a domain box's header (the glance title, the taller of the two). */
export const GROUP_HEADER = Math.ceil(8 + TEXT.glanceGroup * TEXT.lineGap + TEXT.glanceKey * TEXT.lineGap);

/** Where an edge's label sits (detail only): the box ELK reserved for it. */
export function edgeText(e: LaidOutEdge): TextLine | null {
  if (!e.labelBox || !e.label) return null;
  const lb = e.labelBox;
  const w = textWidth(e.label, TEXT.labelSize);
  return { text: e.label, x: lb.x + (lb.width - w) / 2, y: lb.y + lb.height - 3, size: TEXT.labelSize, bold: false, role: 'line', box: { x: lb.x + (lb.width - w) / 2, y: lb.y + lb.height - 3 - TEXT.labelSize * 0.85, width: w, height: TEXT.labelSize * 1.1 } };
}

/** Every text box drawn at a level of detail, with what owns it (for overlap checks). */
export function labelBoxes(tree: LaidOutTree, detail: Detail): Array<{ owner: string; container: Box | null; line: TextLine }> {
  const out: Array<{ owner: string; container: Box | null; line: TextLine }> = [];
  for (const g of tree.groups) for (const l of groupText(g, detail)) out.push({ owner: `group:${g.id}`, container: g, line: l });
  for (const n of tree.nodes) for (const l of nodeText(n, detail)) out.push({ owner: n.id, container: n, line: l });
  if (detail === 'detail') for (const e of tree.edges) {
    const l = edgeText(e);
    if (l) out.push({ owner: e.id, container: null, line: l });
  }
  return out;
}


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
        'elk.padding': `[top=${GROUP_HEADER + 8},left=14,bottom=14,right=14]`,
        'elk.nodeSize.constraints': 'MINIMUM_SIZE',
        'elk.nodeSize.minimum': `(${Math.ceil(Math.max(...(['glance', 'detail'] as const).flatMap((d) => groupText(g, d).map((l) => l.box.width))) + 28)}, 60)`,
      },
    });
  }
  const edges: ElkEdgeLike[] = view.edges.map((e) => ({
    id: e.id,
    sources: [e.from],
    targets: [e.to],
    labels: e.label ? [{ text: e.label, width: Math.ceil(textWidth(e.label, TEXT.labelSize) + 6), height: Math.ceil(TEXT.labelSize * 1.5) }] : [],
  }));
  return {
    id: 'root',
    layoutOptions: {
      'elk.algorithm': 'layered',
      'elk.direction': 'RIGHT',
      'elk.hierarchyHandling': 'INCLUDE_CHILDREN',
      'elk.edgeRouting': 'ORTHOGONAL',
      'elk.layered.spacing.nodeNodeBetweenLayers': '40',
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
