/**
 * Turn a selection of blocks into a complete Plan (stages in upstream-first order, internal
 * nodes, score, reasons), and explain infeasibility when no plan exists.
 */
import { DEFAULT_MAX_MAGNETICS_PER_DOMAIN, DEFAULT_WINDOW_MARGIN, STAGE_KINDS, type Id, type Requirements, type StageKind } from '../model.ts';
import { formatQuantity } from '../notation.ts';
import { kindNames, kindSettingName } from '../stages/registry.ts';
import type { Infeasibility, InternalNode, Plan, PlanLabel, PlanStage, Reason } from '../plan-types.ts';
import { BlockFactory, type Miss } from './candidates.ts';
import { planScore, type Scorer, type SelectionEval } from './score.ts';
import type { Block, BlockShape } from './types.ts';

export function describeShape(f: BlockFactory, s: BlockShape): string {
  const rails = f.ctx.rails;
  const from = s.input.kind === 'source' ? (f.req.sources.find((x) => x.id === (s.input as { id: Id }).id)?.name ?? 'the source') : rails[s.input.rail]!.name;
  if (s.kind === 'cwbuck') {
    const p = s.primary === null ? `a ${s.busVoltage} V primary bus` : `${rails[s.primary]!.name} as primary`;
    const tap = s.sharedTap ? ` (${s.sharedTap.map((i) => rails[i]!.name).join(', ')} through LDOs on one shared tap winding)` : '';
    return `a coupled-winding buck from ${from} with ${p} and ${s.secondaries.map((i) => rails[i]!.name).join(', ')} as secondaries${tap}`;
  }
  return `${kindNames(s.kind).feeding} from ${from}`;
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
  // Margins: a rail whose worst-case window comes within windowMargin × its band half-width
  // of a band edge is reported as marginal.
  const share = f.req.limits.windowMargin ?? DEFAULT_WINDOW_MARGIN;
  sel.evals.forEach((e) => {
    for (const w of e.windows) {
      const rail = rails.find((x) => x.id === w.nodeId);
      if (!rail) continue;
      const a = Math.abs(rail.voltage);
      const half = a * rail.tolerance;
      const lo = Math.min(Math.abs(w.min), Math.abs(w.max)), hi = Math.max(Math.abs(w.min), Math.abs(w.max));
      const margin = Math.min(lo - (a - half), a + half - hi);
      if (margin < share * half) {
        const side = lo - (a - half) <= a + half - hi ? 'lower' : 'upper';
        reasons.push({
          code: 'marginal', subjectId: rail.id,
          text: `${rail.name} is marginal: its worst-case window ${formatQuantity(lo, 'voltage', 4)}…${formatQuantity(hi, 'voltage', 4)} comes within ` +
            `${formatQuantity(Math.max(0, margin), 'voltage', 3)} of the ${side} edge of its ±${+(rail.tolerance * 100).toPrecision(3)} % band ` +
            `(${+(100 * Math.max(0, margin) / half).toPrecision(2)} % of the ${formatQuantity(half, 'voltage', 3)} half-width; the margin asked is ${+(share * 100).toPrecision(3)} %)`,
          data: { margin, halfWidth: half, share },
        });
      }
    }
  });
  return {
    id, labels, stages, internalNodes,
    score: planScore(sel, scorer),
    reasons,
  };
}

/**
 * A remedy to try: its text (with its target numbers) and the change to the requirements it
 * stands for. The solver offers it only when re-planning with the change applied makes the
 * rail feasible (or, for a tree-level failure, gives a plan): docs/planner.md.
 */
export interface RemedyCandidate {
  text: string;
  apply: (req: Requirements) => void;
}

export interface InfeasibleEntry {
  inf: Infeasibility;
  /** The rail to make feasible (index), or undefined for a tree-level failure. */
  railIndex?: number;
  candidates: RemedyCandidate[];
}

const v3 = (x: number) => formatQuantity(x, 'voltage', 3);

/** Remedies and shortfalls per rail when no plan exists (remedies still to verify). */
export function explainInfeasible(
  f: BlockFactory, blocks: readonly Block[], misses: ReadonlyMap<number, Miss[]>,
  leafFailures: ReadonlyMap<string, { count: number; example: NonNullable<SelectionEval['failure']> }>,
): InfeasibleEntry[] {
  const rails = f.ctx.rails;
  const out: InfeasibleEntry[] = [];
  const allowed = new Set(f.req.preferences.allowedKinds);
  const notAllowed = STAGE_KINDS.filter((k) => !allowed.has(k));
  const loadsOf = (req: Requirements, railId: string) => req.loads.filter((l) => rails.find((x) => x.id === railId)?.loadIds.includes(l.id));
  const allowKind = (k: StageKind): RemedyCandidate => ({
    text: `allow the ${kindSettingName(k)} stage kind`,
    apply: (req) => { if (!req.preferences.allowedKinds.includes(k)) req.preferences.allowedKinds = [...req.preferences.allowedKinds, k]; },
  });
  for (let r = 0; r < rails.length; r++) {
    if (blocks.some((b) => b.covers.includes(r))) continue;
    const rail = rails[r]!;
    const ms = misses.get(r) ?? [];
    const cands: RemedyCandidate[] = notAllowed.map(allowKind);
    if (!ms.length) {
      const iso = f.isolated(r);
      const a = Math.abs(rail.voltage);
      // The headroom a buck from each source would have, and what it needs (output below input).
      const heads = f.req.sources.map((s) => `${s.name} lowest ${v3(s.vMin)}, headroom ${v3(s.vMin - a)}`);
      const text = iso
        ? `${rail.name} (${v3(rail.voltage)}) is in an isolated domain and no allowed stage can cross the barrier to it`
        : `${rail.name} (${v3(rail.voltage)} ±${+(rail.tolerance * 100).toPrecision(3)} %): no allowed stage can make it: ` +
          `a buck needs its output below the lowest input (${heads.join('; ')}), an LDO needs a rail of the same domain and sign above ${v3(a)} plus its dropout` +
          (allowed.has('boost') || allowed.has('buck-boost-4s') || allowed.has('inverting') ? '; the boost, four-switch and inverting feeds serve only non-quiet rails of a non-isolated domain with a positive input there' : '');
      const short = iso ? 0 : Math.max(0, a - Math.max(...f.req.sources.map((s) => s.vMin)));
      out.push({ inf: { railId: rail.id, constraint: iso ? 'barrier' : 'headroom', shortfall: short, unit: iso ? '' : 'V', text, remedies: [] }, railIndex: r, candidates: cands });
      continue;
    }
    // The nearest miss: the smallest shortfall among constraints with a unit; else the first.
    const withUnit = ms.filter((m) => m.rejection.unit !== '' && m.rejection.shortfall > 0);
    const near = (withUnit.length ? withUnit : ms).reduce((a, b) => (normMiss(b, rail.voltage) < normMiss(a, rail.voltage) ? b : a));
    const rj = near.rejection;
    const relaxTol = (need: number): RemedyCandidate => {
      const tol = Math.ceil(need * 1000 - 1e-9) / 1000;
      return {
        text: `relax the tolerance of ${rail.name} to ±${+(tol * 100).toPrecision(3)} % (now ±${+(rail.tolerance * 100).toPrecision(3)} %)`,
        apply: (req) => { for (const l of loadsOf(req, rail.id)) if (l.tolerance < tol) l.tolerance = tol as never; },
      };
    };
    if (rj.constraint === 'window') {
      const need = (Math.abs(rail.voltage) * rail.tolerance + rj.shortfall) / Math.abs(rail.voltage);
      cands.push(relaxTol(need));
      if (near.shape.kind === 'cwbuck' && !/behind a tap winding/.test(rj.text)) {
        const m = f.req.preferences.maxSecondaries;
        cands.push({ text: `raise maxSecondaries to ${m + 1} (now ${m})`, apply: (req) => { req.preferences.maxSecondaries = m + 1; } });
      }
    } else if (rj.constraint === 'ripple') {
      const lim = rail.rippleLimit + rj.shortfall;
      cands.push({
        text: `relax the ripple limit of ${rail.name} to ${v3(lim)} (now ${v3(rail.rippleLimit)})`,
        apply: (req) => { for (const l of loadsOf(req, rail.id)) if (l.rippleLimit < lim) l.rippleLimit = lim as never; },
      });
    }
    if (rj.constraint === 'tj') {
      const amb = f.req.limits.ambient - Math.ceil(rj.shortfall);
      cands.push({ text: `lower the ambient to ${amb} °C (now ${f.req.limits.ambient} °C; Tj over by ${+rj.shortfall.toPrecision(3)} K)`, apply: (req) => { req.limits.ambient = amb as never; } });
    }
    cands.push({
      text: `lower the load of ${rail.name} to half (${formatQuantity(Math.max(...Object.values(rail.current)) / 2, 'current', 3)} at most)`,
      apply: (req) => { for (const l of loadsOf(req, rail.id)) for (const k of Object.keys(l.current)) l.current[k] = (l.current[k]! / 2) as never; },
    });
    out.push({
      inf: {
        railId: rail.id, constraint: rj.constraint, shortfall: rj.shortfall, unit: rj.unit,
        text: `${rail.name}: every feed fails; the nearest, ${describeShape(f, near.shape)}, fails: ${rj.text}`,
        remedies: [],
      },
      railIndex: r, candidates: cands,
    });
  }
  if (!out.length) {
    for (const [k, v] of leafFailures) {
      const railId = v.example.railIndex !== undefined ? rails[v.example.railIndex]!.id : (rails[0]?.id ?? '');
      const cands: RemedyCandidate[] = [];
      if (k === 'source-current') {
        for (const s of f.req.sources) {
          const lim = +(s.currentLimit + v.example.shortfall * 1.05).toPrecision(3);
          cands.push({ text: `raise the current limit of ${s.name} to ${formatQuantity(lim, 'current', 3)} (now ${formatQuantity(s.currentLimit, 'current', 3)})`, apply: (req) => { const x = req.sources.find((y) => y.id === s.id); if (x && x.currentLimit < lim) x.currentLimit = lim as never; } });
        }
      } else if (k === 'magnetics-per-domain') {
        // The count the failing trees needed: the limit plus the excess of the example.
        const now = f.req.limits.maxMagneticsPerIsolatedDomain ?? DEFAULT_MAX_MAGNETICS_PER_DOMAIN;
        const want = now + Math.max(1, Math.round(v.example.shortfall));
        const dom = v.example.railIndex !== undefined ? f.req.domains.find((d) => d.id === rails[v.example.railIndex!]!.domainId) : undefined;
        cands.push({
          text: `allow ${want} magnetics into each isolated domain${dom ? ` (${dom.name} needs them)` : ''} in the design limits (now ${now})`,
          apply: (req) => { req.limits.maxMagneticsPerIsolatedDomain = want; },
        });
      } else {
        const m = f.req.preferences.maxSecondaries;
        cands.push({ text: `raise maxSecondaries to ${m + 1} (now ${m})`, apply: (req) => { req.preferences.maxSecondaries = m + 1; } });
      }
      for (const kind of notAllowed) cands.push(allowKind(kind));
      out.push({ inf: { railId, constraint: k, shortfall: v.example.shortfall, unit: v.example.unit, text: `every complete tree fails (${v.count} tried): ${v.example.text}`, remedies: [] }, candidates: cands });
    }
  }
  if (!out.length && rails.length) {
    const m = f.req.preferences.maxSecondaries;
    out.push({
      inf: { railId: rails[0]!.id, constraint: 'cover', shortfall: 0, unit: '', text: 'no combination of feasible feeds covers every rail exactly once', remedies: [] },
      candidates: [{ text: `raise maxSecondaries to ${m + 1} (now ${m})`, apply: (req) => { req.preferences.maxSecondaries = m + 1; } }, ...notAllowed.map(allowKind)],
    });
  }
  return out;
}

function normMiss(m: Miss, v: number): number {
  const r = m.rejection;
  if (r.unit === 'V') return r.shortfall / Math.max(Math.abs(v), 1e-3);
  if (r.unit === 'K') return r.shortfall / 100;
  return r.shortfall || 1;
}
