/**
 * The drawing of a laid-out tree as a list of plain primitives (rectangles, polylines, text).
 * The SVG and PDF writers render the same scene, so both files show the same picture.
 * The look is the project's own: kinds are told apart by a coloured side bar and a short
 * kind line, isolated domains by a dashed double outline (the barrier) and a mark on every
 * edge that crosses it.
 */
import { edgeText, entryPoint, groupText, nodeText, type LaidOutTree, type Point, type TextLine } from '../engine/layout.ts';
import { kindColour } from '../engine/layout.ts';

export type Prim =
  | { t: 'rect'; x: number; y: number; w: number; h: number; r: number; fill: string | null; stroke: string | null; width: number; dash?: number[] }
  | { t: 'line'; pts: Point[]; stroke: string; width: number; dash?: number[]; arrow?: boolean }
  | { t: 'text'; x: number; y: number; text: string; size: number; bold?: boolean; fill: string; anchor?: 'start' | 'middle' | 'end'; italic?: boolean };

export interface Scene {
  width: number;
  height: number;
  prims: Prim[];
  /** Ids and kinds of the drawn items, for tests and hit-testing. */
  items: Array<{ id: string; kind: string; title: string }>;
}

export const PALETTE = {
  ink: '#1d2733',
  muted: '#5b6878',
  edge: '#44515f',
  sourceFill: '#243447',
  stageFill: '#ffffff',
  railFill: '#eef5ee',
  railStroke: '#5f8f63',
  internalFill: '#f7f7f2',
  groupFill: '#f4f6f9',
  groupStroke: '#9aa7b6',
  isoFill: '#fbf4ec',
  barrier: '#b5452f',
};

export const SAFETY_LINE =
  'Planning aid only: the tool certifies nothing. Mains and isolation barriers can kill; creepage, clearance and touch current follow the applicable safety standard and local codes.';

function textPrim(l: TextLine, fill: string, italic = false): Prim {
  return { t: 'text', x: l.x, y: l.y, text: l.text, size: l.size, bold: l.bold, fill, ...(italic ? { italic } : {}) };
}

export function buildScene(tree: LaidOutTree): Scene {
  const prims: Prim[] = [];
  const items: Scene['items'] = [];
  const footer = 30;
  const width = Math.max(tree.width, 640);
  const height = tree.height + footer;

  prims.push({ t: 'rect', x: 0, y: 0, w: width, h: height, r: 0, fill: '#ffffff', stroke: null, width: 0 });
  prims.push({ t: 'text', x: 16, y: 22, text: tree.title, size: 14, bold: true, fill: PALETTE.ink });
  prims.push({ t: 'text', x: 16, y: 40, text: tree.subtitle, size: 10, fill: PALETTE.muted });

  for (const g of tree.groups) {
    const iso = g.isolation !== 'none';
    prims.push({ t: 'rect', x: g.x, y: g.y, w: g.width, h: g.height, r: 6, fill: iso ? PALETTE.isoFill : PALETTE.groupFill, stroke: iso ? PALETTE.barrier : PALETTE.groupStroke, width: iso ? 2 : 1, dash: iso ? [7, 4] : undefined });
    if (iso) {
      // The barrier: a second dashed outline just outside the first, a visible band.
      prims.push({ t: 'rect', x: g.x - 4, y: g.y - 4, w: g.width + 8, h: g.height + 8, r: 9, fill: null, stroke: PALETTE.barrier, width: 1, dash: [3, 3] });
    }
    for (const l of groupText(g, 'detail')) prims.push(textPrim(l, iso ? PALETTE.barrier : PALETTE.muted));
    items.push({ id: g.id, kind: iso ? 'isolated-domain' : 'domain', title: g.title });
  }

  for (const e of tree.edges) {
    if (e.points.length < 2) continue;
    prims.push({ t: 'line', pts: e.points, stroke: e.crossesBarrier ? PALETTE.barrier : PALETTE.edge, width: 1.3, arrow: true });
    const el = edgeText(e);
    if (el) {
      const b = el.box;
      prims.push({ t: 'rect', x: b.x - 2, y: b.y - 1, w: b.width + 4, h: b.height + 2, r: 2, fill: '#ffffff', stroke: null, width: 0 });
      prims.push(textPrim(el, PALETTE.muted));
    }
    if (e.crossesBarrier) {
      const target = tree.nodes.find((n) => n.id === e.to);
      const g = tree.groups.find((q) => q.id === target?.groupId);
      const p = g ? entryPoint(e.points, { x: g.x - 4, y: g.y - 4, width: g.width + 8, height: g.height + 8 }) : null;
      if (p) {
        // Two short bars across the edge where it passes the barrier.
        prims.push({ t: 'line', pts: [{ x: p.x - 1, y: p.y - 7 }, { x: p.x - 1, y: p.y + 7 }], stroke: PALETTE.barrier, width: 2 });
        prims.push({ t: 'line', pts: [{ x: p.x + 4, y: p.y - 7 }, { x: p.x + 4, y: p.y + 7 }], stroke: PALETTE.barrier, width: 2 });
      }
    }
  }

  for (const n of tree.nodes) {
    items.push({ id: n.id, kind: n.kind, title: n.title });
    const text = nodeText(n, 'detail');
    const [name, ...rest] = text;
    if (n.kind === 'source') {
      prims.push({ t: 'rect', x: n.x, y: n.y, w: n.width, h: n.height, r: 4, fill: PALETTE.sourceFill, stroke: null, width: 0 });
      prims.push(textPrim(name!, '#ffffff'));
      for (const l of rest) prims.push(textPrim(l, '#d8e0ea'));
      continue;
    }
    if (n.kind === 'stage') {
      const c = kindColour(n.stageKind ?? 'buck');
      prims.push({ t: 'rect', x: n.x, y: n.y, w: n.width, h: n.height, r: 3, fill: PALETTE.stageFill, stroke: c, width: 1.4 });
      prims.push({ t: 'rect', x: n.x, y: n.y, w: 5, h: n.height, r: 0, fill: c, stroke: null, width: 0 });
      prims.push(textPrim(name!, PALETTE.ink));
      rest.forEach((l, i) => prims.push(textPrim(l, i === 0 ? c : PALETTE.ink, i === 0)));
      continue;
    }
    const rail = n.kind === 'rail';
    prims.push({ t: 'rect', x: n.x, y: n.y, w: n.width, h: n.height, r: rail ? 10 : 4, fill: rail ? PALETTE.railFill : PALETTE.internalFill, stroke: rail ? PALETTE.railStroke : PALETTE.muted, width: 1.2, dash: rail ? undefined : [4, 3] });
    for (const l of text) prims.push(textPrim(l, PALETTE.ink));
  }

  prims.push({ t: 'text', x: 16, y: height - 12, text: SAFETY_LINE, size: 8.5, fill: PALETTE.barrier, italic: true });
  return { width, height, prims, items };
}
