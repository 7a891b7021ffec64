// Layout adapter against the real elkjs (bundled build): every node placed, no overlaps,
// every rail present, each domain box contains its nodes, edges end on their nodes.
import { describe, expect, it } from 'vitest';
import ELK from 'elkjs/lib/elk.bundled.js';
import {
  buildTreeView, fmtQty, pctText, layoutTree, entryPoint, labelBoxes, groupText, nodeText, wrapText, shortName,
  type Box, type ElkLike, type LaidOutTree,
} from '../../src-main/engine/layout.ts';
import { figuresForMode, rollupPlan } from '../../src-main/engine/rollup.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { demoHandPlan } from '../export/demo-plan.ts';
import { bigPlan, bigRequirements } from '../export/big-plan.ts';
import { handPlan, handRequirements } from '../export/hand-plan.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES } from '../../src-main/engine/model.ts';
import type { Plan } from '../../src-main/engine/plan-types.ts';
import { groupRails } from '../../src-main/engine/rails.ts';

const elk = new ELK() as unknown as ElkLike;

function overlaps(a: Box, b: Box): boolean {
  return a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
}
function contains(outer: Box, inner: Box): boolean {
  return inner.x >= outer.x - 1e-6 && inner.y >= outer.y - 1e-6 &&
    inner.x + inner.width <= outer.x + outer.width + 1e-6 && inner.y + inner.height <= outer.y + outer.height + 1e-6;
}

/** A larger invented tree: n loads across two domains, one buck per rail (stress shape). */
function bigProject(n: number): { req: Requirements; plan: Plan } {
  const req: Requirements = {
    meta: { name: 'Invented large tree', description: '', revision: 1 },
    sources: [{ id: 'src', name: 'Input', vNom: 24 as never, vMin: 18 as never, vMax: 30 as never, currentLimit: 10 as never }],
    domains: [
      { id: 'a', name: 'A', isolation: 'none', workingVoltage: 0 as never },
      { id: 'b', name: 'B', isolation: 'reinforced', workingVoltage: 250 as never },
    ],
    modes: [{ id: 'm', name: 'M', share: 1 as never }],
    loads: Array.from({ length: n }, (_, i) => ({
      id: `l${i}`, name: `Load ${i}`, domainId: i % 3 === 0 ? 'b' : 'a', voltage: (1 + (i % 12) * 0.5) as never,
      tolerance: 0.05 as never, current: { m: 0.1 as never }, rippleLimit: 0.05 as never, noiseClass: (['rugged', 'standard', 'quiet'] as const)[i % 3]!,
    })),
    limits: DEFAULT_LIMITS, preferences: DEFAULT_PREFERENCES,
  };
  const rails = groupRails(req);
  const stages = rails.map((r, i) => ({
    id: `s${i}`, kind: r.domainId === 'b' ? 'cwbuck' as const : 'buck' as const, name: `Stage ${i}`, inputNodeId: 'src',
    outputs: [{ nodeId: r.id, role: 'output' as const }],
    barriers: r.domainId === 'b' ? [{ fromDomainId: 'a', toDomainId: 'b', isolation: 'reinforced' as const, workingVoltage: 250 as never }] : [],
    design: null,
  }));
  return { req, plan: { id: 'p', labels: ['best'], stages, internalNodes: [], score: { loss: 0 as never, cost: 0, parts: 0, weighted: 0 }, reasons: [] } };
}

describe('layout adapter (real elkjs output)', () => {
  it('places every node without overlap and keeps each domain box around its nodes', async () => {
    const req = handRequirements();
    const pr = handPlan(req);
    const view = buildTreeView(req, pr.rails, pr.best!);
    const laid = await layoutTree(view, elk);
    // Every rail of the plan is on the drawing (common practice: nothing silently dropped).
    for (const r of pr.rails) expect(laid.nodes.some((n) => n.id === r.id && n.kind === 'rail')).toBe(true);
    expect(laid.nodes).toHaveLength(1 + 3 + pr.rails.length + 1);
    for (const n of laid.nodes) {
      expect(Number.isFinite(n.x) && Number.isFinite(n.y) && n.width > 0 && n.height > 0).toBe(true);
      expect(contains({ x: 0, y: 0, width: laid.width, height: laid.height }, n)).toBe(true);
    }
    for (let i = 0; i < laid.nodes.length; i++)
      for (let j = i + 1; j < laid.nodes.length; j++)
        expect(overlaps(laid.nodes[i]!, laid.nodes[j]!), `${laid.nodes[i]!.id} vs ${laid.nodes[j]!.id}`).toBe(false);
    expect(laid.groups.map((g) => g.id).sort()).toEqual(['main', 'sense']);
    for (const g of laid.groups) {
      for (const n of laid.nodes.filter((q) => q.groupId === g.id)) expect(contains(g, n), `${n.id} in ${g.id}`).toBe(true);
      for (const n of laid.nodes.filter((q) => q.groupId !== g.id)) expect(overlaps(g, n), `${n.id} outside ${g.id}`).toBe(false);
    }
    expect(overlaps(laid.groups[0]!, laid.groups[1]!)).toBe(false);
  });

  // Item 2 of issue 15: at both levels of detail no two text boxes intersect and every text
  // box lies inside its node or domain box (text widths from the fixed per-character model,
  // whose advance is at least the widest DejaVu Sans glyph class drawn here: from the font's
  // metrics table, from memory). On the demo (hand plan, rolled-up figures) and on a generated
  // project of 40 rails.
  const trees: Array<[string, () => Promise<LaidOutTree>]> = [
    ['demo', async () => {
      const req = demoDocument().requirements;
      const result = demoHandPlan(req);
      const rollup = rollupPlan(req, result.rails, result.best!);
      return layoutTree(buildTreeView(req, result.rails, result.best!, figuresForMode(req, rollup)), elk);
    }],
    ['40 rails', async () => {
      const req = bigRequirements(120, 3, 5);
      const result = bigPlan(req);
      expect(result.rails.length).toBe(40);
      const rollup = rollupPlan(req, result.rails, result.best!);
      return layoutTree(buildTreeView(req, result.rails, result.best!, figuresForMode(req, rollup)), elk);
    }],
  ];
  for (const [name, make] of trees) {
    it(`no text box overlaps another or leaves its box (${name})`, async () => {
      const laid = await make();
      for (const detail of ['glance', 'detail'] as const) {
        const boxes = labelBoxes(laid, detail);
        expect(boxes.length).toBeGreaterThan(laid.nodes.length);
        for (const b of boxes) {
          if (b.container) expect(contains(b.container, b.line.box), `${detail}: "${b.line.text}" inside ${b.owner}`).toBe(true);
        }
        for (let i = 0; i < boxes.length; i++)
          for (let j = i + 1; j < boxes.length; j++)
            expect(overlaps(boxes[i]!.line.box, boxes[j]!.line.box), `${detail}: "${boxes[i]!.line.text}" (${boxes[i]!.owner}) vs "${boxes[j]!.line.text}" (${boxes[j]!.owner})`).toBe(false);
        // A domain's title stays clear of the nodes inside the domain (not over a block).
        for (const g of laid.groups)
          for (const l of groupText(g, detail))
            for (const n of laid.nodes) expect(overlaps(l.box, n), `${g.id} title over ${n.id}`).toBe(false);
      }
      // At a glance each node shows its name and exactly one key figure.
      for (const n of laid.nodes) {
        const g = nodeText(n, 'glance');
        expect(g.filter((l) => l.role === 'key').map((l) => l.text)).toEqual([n.key]);
        expect(g.filter((l) => l.role === 'name').map((l) => l.text).join(' ').replace(/- /g, '-')).toBe(n.name);
      }
    });
  }

  it('writes a winding\'s turns on the node it feeds, and wraps names at spaces and hyphens', async () => {
    const req = handRequirements();
    const pr = handPlan(req);
    const view = buildTreeView(req, pr.rails, pr.best!);
    expect(view.edges.every((e) => e.label === '')).toBe(true);
    expect(view.nodes.some((n) => n.lines.some((l) => /^(primary|secondary|winding) -?\d+ T$/.test(l)))).toBe(true);
    expect(wrapText('Coupled-winding buck 1V8', 10)).toEqual(['Coupled-', 'winding', 'buck 1V8']);
    expect(wrapText('Tap 14.5 V for 12V quiet', 10)).toEqual(['Tap 14.5 V', 'for 12V', 'quiet']);
    expect(shortName('Isolated front end 12V quiet', 'Isolated front end')).toBe('12V quiet');
    expect(shortName('Tap 7.5 V for Isolated fieldbus 5V', 'Isolated fieldbus')).toBe('Tap 7.5 V for 5V');
    expect(shortName('Mainline 5V', 'Main')).toBe('Mainline 5V');
  });

  it('routes every edge from its source node to its target node', async () => {
    const req = handRequirements();
    const pr = handPlan(req);
    const laid = await layoutTree(buildTreeView(req, pr.rails, pr.best!), elk);
    const box = new Map(laid.nodes.map((n) => [n.id, n as Box]));
    const near = (p: { x: number; y: number }, b: Box) =>
      p.x >= b.x - 2 && p.x <= b.x + b.width + 2 && p.y >= b.y - 2 && p.y <= b.y + b.height + 2;
    expect(laid.edges).toHaveLength(3 + 1 + 4 + 1); // three input edges, six outputs
    for (const e of laid.edges) {
      expect(e.points.length).toBeGreaterThanOrEqual(2);
      expect(near(e.points[0]!, box.get(e.from)!), `${e.id} start`).toBe(true);
      expect(near(e.points.at(-1)!, box.get(e.to)!), `${e.id} end`).toBe(true);
    }
    // The three windings into the isolated domain cross the barrier; the primary does not.
    const crossing = laid.edges.filter((e) => e.crossesBarrier).map((e) => e.to).sort();
    expect(crossing).toHaveLength(3);
    const sense = laid.groups.find((g) => g.id === 'sense')!;
    for (const e of laid.edges.filter((q) => q.crossesBarrier)) expect(entryPoint(e.points, sense)).not.toBeNull();
  });

  it('lays out a 150-node tree with no overlapping nodes', async () => {
    const { req, plan } = bigProject(120);
    const rails = groupRails(req);
    const view = buildTreeView(req, rails, plan);
    const laid = await layoutTree(view, elk);
    expect(laid.nodes.length).toBe(1 + 2 * rails.length);
    const ns = laid.nodes;
    for (let i = 0; i < ns.length; i++)
      for (let j = i + 1; j < ns.length; j++) expect(overlaps(ns[i]!, ns[j]!)).toBe(false);
    for (const g of laid.groups)
      for (const n of ns.filter((q) => q.groupId === g.id)) expect(contains(g, n)).toBe(true);
  });

  it('formats quantities in engineering notation', () => {
    // Engineering notation, three significant digits (common practice).
    expect(fmtQty(0.0123, 'A')).toBe('12.3 mA');
    expect(fmtQty(3.3, 'V')).toBe('3.3 V');
    expect(fmtQty(-12, 'V')).toBe('-12 V');
    expect(fmtQty(4.7e-6, 'F')).toBe('4.7 µF');
    expect(fmtQty(0.9996, 'W')).toBe('1 W');
    expect(fmtQty(400e3, 'Hz')).toBe('400 kHz');
    expect(fmtQty(4.096, 'V', 4)).toBe('4.096 V');
    expect(pctText(0.015)).toBe('1.5');
    expect(pctText(0.05)).toBe('5');
    expect(pctText(0.001)).toBe('0.1');
  });
});
