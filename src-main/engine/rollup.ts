/**
 * Roll-up of a plan: per operating mode and time-weighted, every stage's input and output
 * power, loss and efficiency; the system's efficiency and source current at Vin min/nom/max;
 * a thermal table of every dissipating part; each rail's worst-case window against its
 * tolerance. Pure; the stage models are passed in (the real engine by default, see
 * rollup-engine.ts) so this module depends only on the stage contract.
 *
 * Method. For one mode and one source-voltage case, stages are evaluated from the leaves up:
 * a stage's output current into a node is the node's load current plus the input currents
 * of the stages fed from that node. A downstream stage's input voltage is the voltage its
 * feeding stage actually delivers at that load, which depends on the downstream current, so
 * the sweep repeats until no node voltage moves (a fixed point, usually 2–4 sweeps). At the
 * fixed point the books balance exactly: each stage has pin = pout + loss, and the power a
 * stage delivers into a node is the power the node's loads and downstream stages take, so
 * source power = Σ load power + Σ stage losses.
 */
import type { Id, Rail, Requirements } from './model.ts';
import type { Plan, PlanStage } from './plan-types.ts';
import type { DissipatingPart, OperatingPoint, OutputWindow, StageEvaluation, StageFlag } from './stages/types.ts';
import type { Amps, Volts } from './units.ts';
import { evaluateStage, evaluatesPerMode, stageWindows, type StageDesign } from './stages/index.ts';
import { batteryRuntime, type BatteryRuntime } from './battery.ts';

/** The stage models the roll-up calls (the real engine satisfies it). */
export interface StageModels {
  evaluate(design: StageDesign, op: OperatingPoint): StageEvaluation;
  /** `opts.magneticSweep: 'full'` asks for every corner of a coupled-winding stage's magnetic. */
  windows(design: StageDesign, corners: { vin: Volts[]; iout: { min: Amps; max: Amps }[] }, opts?: { magneticSweep?: 'full' }): OutputWindow[];
}

/** The real stage engine as the roll-up's models. */
export const STAGE_MODELS: StageModels = {
  evaluate: (design, op) => evaluateStage(design, op),
  windows: (design, corners, opts) => stageWindows(design, corners, opts),
};

export type VinCase = 'min' | 'nom' | 'max';
export const VIN_CASES: readonly VinCase[] = ['min', 'nom', 'max'];

export interface NodeFigures { v: number; i: number; p: number }

export interface StageFigures {
  stageId: Id;
  vin: number;
  iin: number;
  pin: number;
  pout: number;
  loss: number;
  efficiency: number;
  duty: number | null;
  lossBreakdown: Record<string, number>;
  outputs: Array<{ nodeId: Id; v: number; i: number; ripplePP: number }>;
  parts: DissipatingPart[];
  flags: StageFlag[];
}

/** One mode at one source-voltage case. */
export interface CaseRollup {
  vinCase: VinCase;
  stages: StageFigures[];
  /** Per source id: voltage, current, power drawn. */
  sources: Record<Id, NodeFigures>;
  /** Per rail and internal node: voltage delivered, total current out of the node's feeder, power. */
  nodes: Record<Id, NodeFigures>;
  sourcePower: number;
  loadPower: number;
  loss: number;
  efficiency: number;
  /** |source power − (load power + losses)| / source power. */
  balanceError: number;
  sweeps: number;
}

export interface ModeRollup {
  modeId: Id;
  modeName: string;
  share: number;
  cases: Record<VinCase, CaseRollup>;
}

export interface ThermalRow {
  stageId: Id;
  stageName: string;
  role: string;
  power: number;
  thetaJA: number;
  thetaSource: DissipatingPart['thetaSource'];
  tj: number;
  /** tjMax − tjMargin from the design limits. */
  limit: number;
  margin: number;
  /** The mode and input case where this part runs hottest. */
  modeName: string;
  vinCase: VinCase;
}

export interface RailWindowRow {
  nodeId: Id;
  name: string;
  isRail: boolean;
  target: number;
  min: number;
  max: number;
  allowedMin: number;
  allowedMax: number;
  inside: boolean;
  minCorner: string;
  maxCorner: string;
  stageId: Id;
  /**
   * Proved: the stage models evaluated every corner of this window (OutputWindow.exhaustive)
   * and of every window upstream of it that gave its input corners.
   */
  proved: boolean;
}

export interface WeightedStage {
  stageId: Id;
  name: string;
  kind: PlanStage['kind'];
  pin: number;
  pout: number;
  loss: number;
  efficiency: number;
}

export interface Rollup {
  modes: ModeRollup[];
  /** Time-weighted over modes (shares), at nominal input. */
  weighted: {
    stages: WeightedStage[];
    sourcePower: number;
    loadPower: number;
    loss: number;
    efficiency: number;
    /** Time-weighted source current per source at each input case. */
    sourceCurrent: Record<Id, Record<VinCase, number>>;
  };
  thermal: ThermalRow[];
  windows: RailWindowRow[];
  /** Every stage flag met in any mode/case, once per stage and code. */
  flags: Array<{ stageId: Id; flag: StageFlag }>;
  /** Rails that no stage feeds (the plan is incomplete for them). */
  unfed: Id[];
  /** Sources asked for more than their current limit in some mode and input case. */
  sourceOverloads: Array<{ sourceId: Id; modeName: string; vinCase: VinCase; current: number; limit: number; text: string }>;
  worstBalanceError: number;
  /**
   * Battery sources (engine/battery.ts): usable energy to the end-of-discharge voltage over
   * the power drawn from the source at nominal input, per mode and for the mode mix.
   */
  batteries: BatteryRuntime[];
}

export class RollupError extends Error {}

// ---------------------------------------------------------------------------------------
// Evaluation cache: per design object, keyed by the operating point's numbers

// Designs are treated as immutable: a changed design must be a new object (or call
// clearRollupCache after changing one in place).
let cache = new WeakMap<object, Map<string, StageEvaluation>>();

function evaluateCached(models: StageModels, design: StageDesign, op: OperatingPoint): StageEvaluation {
  if (design === null || typeof design !== 'object') return models.evaluate(design, op);
  let m = cache.get(design);
  if (!m) { m = new Map(); cache.set(design, m); }
  const key = `${op.vin}|${op.ambient}|${op.iout.join(',')}${op.mode !== undefined ? `|${op.mode}` : ''}`;
  let ev = m.get(key);
  if (!ev) {
    ev = models.evaluate(design, op);
    if (m.size > 5000) m.clear();
    m.set(key, ev);
  }
  return ev;
}

let windowCache = new WeakMap<object, Map<string, OutputWindow[]>>();

/** Forget every cached stage result (after a design object was changed in place). */
export function clearRollupCache(): void {
  cache = new WeakMap();
  windowCache = new WeakMap();
}

function windowsCached(models: StageModels, design: StageDesign, corners: { vin: Volts[]; iout: { min: Amps; max: Amps }[] }, full = false): OutputWindow[] {
  const run = () => (full ? models.windows(design, corners, { magneticSweep: 'full' }) : models.windows(design, corners));
  if (design === null || typeof design !== 'object') return run();
  let m = windowCache.get(design);
  if (!m) { m = new Map(); windowCache.set(design, m); }
  const key = `${full ? 'full|' : ''}${corners.vin.join(',')}|${corners.iout.map((i) => `${i.min}:${i.max}`).join(',')}`;
  let w = m.get(key);
  if (!w) {
    w = run();
    if (m.size > 200) m.clear();
    m.set(key, w);
  }
  return w;
}

/**
 * Node ids in the order the design lists its outputs (falls back to the plan's order, also
 * for a saved plan whose design lacks its outputs).
 */
export function designOutputOrder(st: PlanStage): Id[] {
  // Widened (no cast): what a design read back from a file may turn out to be.
  const d: { outputs?: ReadonlyArray<{ nodeId?: unknown } | null> } | null | undefined = st.design;
  const ids = Array.isArray(d?.outputs) ? d!.outputs.map((o) => o?.nodeId) : [];
  if (ids.length === st.outputs.length && ids.every((x): x is Id => typeof x === 'string')) return ids;
  return st.outputs.map((o) => o.nodeId);
}

/** The stage's design; a stage without one is refused by name. */
function designOf(st: PlanStage): StageDesign {
  if (st.design === null || st.design === undefined) throw new RollupError(`stage ${st.id} (${st.name}) carries no design to evaluate`);
  return st.design;
}

/** Stages ordered so every stage comes after the stage that feeds its input node. */
export function topoOrder(plan: Plan): PlanStage[] {
  const feeder = new Map<Id, PlanStage>();
  for (const st of plan.stages) for (const o of st.outputs) {
    if (feeder.has(o.nodeId)) throw new RollupError(`node ${o.nodeId} is fed by two stages (${feeder.get(o.nodeId)!.id} and ${st.id})`);
    feeder.set(o.nodeId, st);
  }
  const out: PlanStage[] = [];
  const state = new Map<Id, 1 | 2>();
  const visit = (st: PlanStage, depth: number) => {
    const s = state.get(st.id);
    if (s === 2) return;
    if (s === 1 || depth > plan.stages.length) throw new RollupError(`the plan has a loop through stage ${st.id}`);
    state.set(st.id, 1);
    const up = feeder.get(st.inputNodeId);
    if (up) visit(up, depth + 1);
    state.set(st.id, 2);
    out.push(st);
  };
  for (const st of plan.stages) visit(st, 0);
  return out;
}

interface Context {
  req: Requirements;
  rails: Rail[];
  plan: Plan;
  models: StageModels;
  order: PlanStage[];
  orderIds: Map<Id, Id[]>;
  railById: Map<Id, Rail>;
  sourceById: Map<Id, Requirements['sources'][number]>;
  nominal: Map<Id, number>;
}

function evaluateCase(ctx: Context, modeId: Id, vinCase: VinCase): CaseRollup {
  const { req, order, models } = ctx;
  const v = new Map<Id, number>(ctx.nominal);
  for (const s of req.sources) v.set(s.id, vinCase === 'min' ? s.vMin : vinCase === 'max' ? s.vMax : s.vNom);
  const loadCurrent = (nodeId: Id) => ctx.railById.get(nodeId)?.current[modeId] ?? 0;
  let evals = new Map<Id, StageEvaluation>();
  let sweeps = 0;
  for (; sweeps < 40; sweeps++) {
    evals = new Map();
    const iinAt = new Map<Id, number>();
    for (let k = order.length - 1; k >= 0; k--) {
      const st = order[k]!;
      const ids = ctx.orderIds.get(st.id)!;
      const iout = ids.map((id) => Math.abs(loadCurrent(id)) + (iinAt.get(id) ?? 0)) as Amps[];
      const vin = v.get(st.inputNodeId);
      if (vin === undefined) throw new RollupError(`stage ${st.id}: its input node ${st.inputNodeId} is neither a source, a rail nor an internal node of the plan`);
      const design = designOf(st);
      let ev: StageEvaluation;
      try {
        // The mode matters to a kind gated per mode (a load switch, off in some modes); the
        // others are evaluated without it, so their cached evaluations serve every mode.
        const mode = evaluatesPerMode(design.kind) ? { mode: modeId } : {};
        ev = evaluateCached(models, design, { vin: vin as Volts, iout, ambient: req.limits.ambient, ...mode });
      } catch (e) {
        throw new RollupError(`stage ${st.id} (${st.name}): ${(e as Error).message}`);
      }
      if (!(Number.isFinite(ev.pin) && Number.isFinite(ev.loss))) throw new RollupError(`stage ${st.id}: the stage model returned a non-finite power at Vin ${vin} V`);
      evals.set(st.id, ev);
      iinAt.set(st.inputNodeId, (iinAt.get(st.inputNodeId) ?? 0) + Math.abs(ev.iin));
    }
    let moved = 0;
    for (const st of order) {
      const ev = evals.get(st.id)!;
      for (const o of ev.outputs) {
        const before = v.get(o.nodeId) ?? 0;
        const after = o.voltage as number;
        moved = Math.max(moved, Math.abs(after - before) / Math.max(1e-9, Math.abs(after)));
        v.set(o.nodeId, after);
      }
    }
    if (moved < 1e-13) break;
  }

  const stages: StageFigures[] = [];
  const nodes: Record<Id, NodeFigures> = {};
  let loss = 0;
  for (const st of order) {
    const ev = evals.get(st.id)!;
    loss += ev.loss;
    stages.push({
      stageId: st.id, vin: ev.vin, iin: Math.abs(ev.iin), pin: ev.pin, pout: ev.pout, loss: ev.loss,
      efficiency: ev.efficiency, duty: ev.duty ?? null, lossBreakdown: { ...ev.lossBreakdown },
      outputs: ev.outputs.map((o) => ({ nodeId: o.nodeId, v: o.voltage, i: Math.abs(o.current), ripplePP: o.ripplePP })),
      parts: ev.parts, flags: ev.flags,
    });
    for (const o of ev.outputs) nodes[o.nodeId] = { v: o.voltage, i: Math.abs(o.current), p: Math.abs(o.voltage * o.current) };
  }
  // Load power: every rail fed by the plan, at the voltage its feeder delivers.
  let loadPower = 0;
  for (const r of ctx.rails) {
    const n = nodes[r.id];
    if (n) loadPower += Math.abs(n.v) * Math.abs(r.current[modeId] ?? 0);
  }
  const sources: Record<Id, NodeFigures> = {};
  let sourcePower = 0;
  for (const s of req.sources) {
    const vs = v.get(s.id)!;
    let p = 0;
    for (const st of order) if (st.inputNodeId === s.id) p += evals.get(st.id)!.pin;
    sources[s.id] = { v: vs, i: p / vs, p };
    sourcePower += p;
  }
  const balanceError = sourcePower > 0 ? Math.abs(sourcePower - (loadPower + loss)) / sourcePower : Math.abs(loadPower + loss);
  return {
    vinCase, stages, sources, nodes, sourcePower, loadPower, loss,
    efficiency: sourcePower > 0 ? loadPower / sourcePower : 0, balanceError, sweeps: sweeps + 1,
  };
}

function makeContext(req: Requirements, rails: Rail[], plan: Plan, models: StageModels): Context {
  const order = topoOrder(plan);
  for (const st of order) {
    designOf(st);
  }
  const nominal = new Map<Id, number>();
  for (const r of rails) nominal.set(r.id, r.voltage);
  for (const n of plan.internalNodes) nominal.set(n.id, n.voltage);
  return {
    req, rails, plan, models, order,
    orderIds: new Map(order.map((st) => [st.id, designOutputOrder(st)])),
    railById: new Map(rails.map((r) => [r.id, r])),
    sourceById: new Map(req.sources.map((s) => [s.id, s])),
    nominal,
  };
}

/**
 * One mode with the given sources at the given voltages (the others at nominal), by the
 * same leaves-up evaluation as every case of `rollupPlan` (engine/curves.ts sweeps it).
 */
export function rollupCaseAt(req: Requirements, rails: Rail[], plan: Plan, modeId: Id, sourceVolts: Record<Id, number>, models: StageModels = STAGE_MODELS): CaseRollup {
  const moved: Requirements = { ...req, sources: req.sources.map((s) => (Object.prototype.hasOwnProperty.call(sourceVolts, s.id) ? { ...s, vNom: sourceVolts[s.id]! as Volts } : s)) };
  return evaluateCase(makeContext(moved, rails, plan, models), modeId, 'nom');
}

export function rollupPlan(req: Requirements, rails: Rail[], plan: Plan, models: StageModels = STAGE_MODELS): Rollup {
  const ctx = makeContext(req, rails, plan, models);
  const order = ctx.order;

  const modes: ModeRollup[] = req.modes.map((m) => ({
    modeId: m.id, modeName: m.name, share: m.share,
    cases: { min: evaluateCase(ctx, m.id, 'min'), nom: evaluateCase(ctx, m.id, 'nom'), max: evaluateCase(ctx, m.id, 'max') },
  }));

  // Time-weighted figures at nominal input.
  const shareSum = req.modes.reduce((a, m) => a + m.share, 0) || 1;
  const wStages: WeightedStage[] = order.map((st) => {
    let pin = 0, pout = 0, loss = 0;
    for (const mr of modes) {
      const f = mr.cases.nom.stages.find((x) => x.stageId === st.id)!;
      const w = mr.share / shareSum;
      pin += w * f.pin; pout += w * f.pout; loss += w * f.loss;
    }
    return { stageId: st.id, name: st.name, kind: st.kind, pin, pout, loss, efficiency: pin > 0 ? pout / pin : 0 };
  });
  let sourcePower = 0, loadPower = 0, loss = 0;
  const sourceCurrent: Record<Id, Record<VinCase, number>> = {};
  for (const s of req.sources) sourceCurrent[s.id] = { min: 0, nom: 0, max: 0 };
  for (const mr of modes) {
    const w = mr.share / shareSum;
    sourcePower += w * mr.cases.nom.sourcePower;
    loadPower += w * mr.cases.nom.loadPower;
    loss += w * mr.cases.nom.loss;
    for (const s of req.sources) for (const c of VIN_CASES) sourceCurrent[s.id]![c] += w * mr.cases[c].sources[s.id]!.i;
  }

  // Thermal table: each part at its hottest mode and input case.
  const limit = req.limits.tjMax - req.limits.tjMargin;
  const hottest = new Map<string, ThermalRow>();
  const stageName = new Map(plan.stages.map((s) => [s.id, s.name]));
  const flagSeen = new Set<string>();
  const flags: Rollup['flags'] = [];
  for (const mr of modes) for (const c of VIN_CASES) for (const f of mr.cases[c].stages) {
    for (const p of f.parts) {
      const key = `${f.stageId}\u0000${p.role}`;
      const prev = hottest.get(key);
      if (!prev || p.tj > prev.tj) {
        hottest.set(key, {
          stageId: f.stageId, stageName: stageName.get(f.stageId) ?? f.stageId, role: p.role, power: p.power,
          thetaJA: p.thetaJA, thetaSource: p.thetaSource, tj: p.tj, limit, margin: limit - p.tj, modeName: mr.modeName, vinCase: c,
        });
      }
    }
    for (const fl of f.flags) {
      const key = `${f.stageId}\u0000${fl.code}`;
      if (!flagSeen.has(key)) { flagSeen.add(key); flags.push({ stageId: f.stageId, flag: fl }); }
    }
  }
  const thermal = [...hottest.values()];

  const windows = computeWindows(ctx, modes);
  const fed = new Set(plan.stages.flatMap((s) => s.outputs.map((o) => o.nodeId)));
  const worstBalanceError = Math.max(0, ...modes.flatMap((m) => VIN_CASES.map((c) => m.cases[c].balanceError)));
  const batteries: BatteryRuntime[] = req.sources.filter((s) => s.battery).map((s) =>
    batteryRuntime(s.id, s.battery!, req.modes, (modeId) => modes.find((m) => m.modeId === modeId)!.cases.nom.sources[s.id]!.p));
  const sourceOverloads: Rollup['sourceOverloads'] = [];
  for (const s of req.sources) {
    let worst: Rollup['sourceOverloads'][number] | null = null;
    for (const mr of modes) for (const c of VIN_CASES) {
      const i = mr.cases[c].sources[s.id]!.i;
      if (i > s.currentLimit && (!worst || i > worst.current)) {
        worst = { sourceId: s.id, modeName: mr.modeName, vinCase: c, current: i, limit: s.currentLimit,
          text: `${s.name} must deliver ${i.toPrecision(3)} A in mode "${mr.modeName}" at Vin ${c} (${(c === 'min' ? s.vMin : c === 'max' ? s.vMax : s.vNom)} V), above its ${s.currentLimit} A limit` };
      }
    }
    if (worst) sourceOverloads.push(worst);
  }
  return {
    modes,
    weighted: { stages: wStages, sourcePower, loadPower, loss, efficiency: sourcePower > 0 ? loadPower / sourcePower : 0, sourceCurrent },
    thermal, windows, flags,
    unfed: rails.filter((r) => !fed.has(r.id)).map((r) => r.id),
    sourceOverloads,
    worstBalanceError,
    batteries,
  };
}

/**
 * Worst-case windows, top-down: a stage's input corners are its feeding node's window, its
 * load corners each output's smallest and largest current over `modes` and every input case.
 * `full`: every magnetic corner of a coupled-winding stage (else at the nominal extremes).
 */
function computeWindows(ctx: Context, modes: ModeRollup[], full = false): RailWindowRow[] {
  const { req, order } = ctx;
  const nodeWindow = new Map<Id, { min: number; nom: number; max: number; proved: boolean }>();
  for (const s of req.sources) nodeWindow.set(s.id, { min: s.vMin, nom: s.vNom, max: s.vMax, proved: true });
  const internal = new Map(ctx.plan.internalNodes.map((n) => [n.id, n]));
  const rows: RailWindowRow[] = [];
  for (const st of order) {
    const ids = ctx.orderIds.get(st.id)!;
    const w = nodeWindow.get(st.inputNodeId);
    if (!w) throw new RollupError(`stage ${st.id}: no window known for its input node ${st.inputNodeId}`);
    const vin = [...new Set([w.min, w.nom, w.max])] as Volts[];
    const iout = ids.map((id) => {
      let lo = Infinity, hi = 0;
      for (const mr of modes) for (const c of VIN_CASES) {
        const f = mr.cases[c].nodes[id];
        const i = f ? f.i : 0;
        lo = Math.min(lo, i); hi = Math.max(hi, i);
      }
      return { min: (Number.isFinite(lo) ? lo : 0) as Amps, max: hi as Amps };
    });
    const design = designOf(st);
    let ws: OutputWindow[];
    try {
      ws = windowsCached(ctx.models, design, { vin, iout }, full);
    } catch (e) {
      throw new RollupError(`stage ${st.id} (${st.name}) windows: ${(e as Error).message}`);
    }
    for (const ow of ws) {
      const proved = w.proved && ow.exhaustive === true;
      nodeWindow.set(ow.nodeId, { min: ow.min, nom: ow.target, max: ow.max, proved });
      const rail = ctx.railById.get(ow.nodeId);
      const target = rail ? rail.voltage : ow.target;
      const tol = rail ? rail.tolerance : null;
      const allowedMin = tol !== null ? target - tol * Math.abs(target) : ow.allowedMin;
      const allowedMax = tol !== null ? target + tol * Math.abs(target) : ow.allowedMax;
      const lo = Math.min(ow.min, ow.max);
      const hi = Math.max(ow.min, ow.max);
      rows.push({
        nodeId: ow.nodeId,
        name: rail?.name ?? internal.get(ow.nodeId)?.name ?? ow.nodeId,
        isRail: !!rail, target, min: ow.min, max: ow.max, allowedMin, allowedMax,
        inside: lo >= Math.min(allowedMin, allowedMax) - 1e-12 && hi <= Math.max(allowedMin, allowedMax) + 1e-12,
        minCorner: ow.minCorner, maxCorner: ow.maxCorner, stageId: st.id, proved,
      });
    }
  }
  return rows;
}

export interface ModeWindows {
  modeId: Id;
  modeName: string;
  /** Every node's window with the load corners of this mode only (source at min…max). */
  rows: RailWindowRow[];
}

/**
 * Windows per operating mode: the roll-up's worst-case windows (computeWindows, the rows the
 * inspector shows over every mode) with each output's load corners taken from one mode's
 * input cases only, and every magnetic corner of a coupled-winding stage evaluated, so each
 * row is proved unless a model says otherwise. `rollup` must be `rollupPlan` of the same
 * requirements and plan (its per-case node currents give the load corners).
 */
export function modeWindows(req: Requirements, rails: Rail[], plan: Plan, rollup: Rollup, models: StageModels = STAGE_MODELS): ModeWindows[] {
  const ctx = makeContext(req, rails, plan, models);
  return rollup.modes.map((m) => ({ modeId: m.modeId, modeName: m.modeName, rows: computeWindows(ctx, [m], true) }));
}

/** The mode with the most load power at nominal input (the drawing's default). */
export function heaviestMode(r: Rollup): ModeRollup | undefined {
  let best: ModeRollup | undefined;
  for (const m of r.modes) if (!best || m.cases.nom.loadPower > best.cases.nom.loadPower) best = m;
  return best;
}

/** Figures for the drawing (layout.ts TreeFigures) from one mode at nominal input. */
export function figuresForMode(req: Requirements, r: Rollup, modeId?: Id) {
  const m = (modeId ? r.modes.find((x) => x.modeId === modeId) : undefined) ?? heaviestMode(r);
  if (!m) return undefined;
  const c = m.cases.nom;
  const nodes: Record<Id, NodeFigures> = { ...c.nodes };
  for (const s of req.sources) { const f = c.sources[s.id]; if (f) nodes[s.id] = f; }
  const stages: Record<Id, { efficiency: number; loss: number; iin: number; pin: number }> = {};
  for (const f of c.stages) stages[f.stageId] = { efficiency: f.efficiency, loss: f.loss, iin: f.iin, pin: f.pin };
  return { modeName: m.modeName, nodes, stages };
}

