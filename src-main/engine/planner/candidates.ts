/**
 * Candidate blocks: every feed decision the planner may take, designed and evaluated with the
 * stage engine. A block covers a set of rails; its evaluation depends on the extra load that
 * downstream blocks put on its outputs (`extra`), which the search supplies at the leaves.
 *
 * Rules encoded here (docs/planner.md explains each):
 * - a buck serves one positive rail from a source (rail in a source-connected domain) or from
 *   a higher positive rail of the same domain; it never crosses a barrier;
 * - an LDO serves one rail from a rail of the same domain with the same sign and a larger |V|;
 * - a coupled-winding buck runs from a source; its regulated primary is a positive rail of a
 *   source-connected domain or an internal primary bus; each secondary is a rail of any
 *   domain (a barrier when that domain is isolated) fed directly, or an internal tap winding
 *   followed by an LDO when the direct winding misses the rail's window or ripple limit;
 *   several rails of one isolated domain and sign may share one tap winding, each through its
 *   own LDO (the tap set for the highest rail);
 * - a quiet rail is never fed directly by a switching output: it ends behind an LDO (common
 *   practice: switching spikes and cross-regulation residue are not in the ripple estimate);
 *   and a quiet rail feeds nothing but other quiet rails through LDOs;
 * - each block is checked for windows in every corner, ripple, duty/on-time and Tj flags of
 *   the engine, and Tj ≤ tjMax − tjMargin.
 */
import type { Amps, Celsius, Hertz, Ratio, Volts } from '../units.ts';
import { DEFAULT_MAX_RECTIFIER_VOLTAGE, DEFAULT_MAX_TURNS_RATIO, isolationRank, type Domain, type Id, type Rail, type Requirements, type Source, type StageKind } from '../model.ts';
import type { Barrier, InternalNode, PlanOutput, Reason } from '../plan-types.ts';
import type { OutputSpec, OutputWindow, StageEvaluation, StageSpec } from '../stages/types.ts';
import type { StageDesign } from '../stages/index.ts';
import { addParts, countParts, emptyParts } from './cost-model.ts';
import { formatQuantity } from '../notation.ts';
import { GENERIC_DEFAULTS } from '../stages/defaults.ts';
import { kindNames } from '../stages/registry.ts';
import type {
  Block, BlockEval, BlockShape, BlockStage, CostModel, FeedInput, PartCounts, PlanContext, Rejection, StageEvaluator,
} from './types.ts';

/**
 * Tap choices tried in order, lowest tap voltage first (a lower tap wastes less in its LDO):
 * the tolerance the tap winding must hold and the headroom (dropout + ripple-rejection knee +
 * margin, common practice) above the rail at the tap's lowest voltage.
 */
export const TAP_VARIANTS: readonly { tolerance: number; headroom: number }[] = [
  { tolerance: 0.1, headroom: 1.0 },
  { tolerance: 0.2, headroom: 1.0 },
  { tolerance: 0.3, headroom: 1.0 },
  { tolerance: 0.4, headroom: 1.0 },
  { tolerance: 0.1, headroom: 2.0 },
  { tolerance: 0.2, headroom: 2.5 },
  { tolerance: 0.4, headroom: 2.5 },
];
/** Kept for callers that only need the tolerances. */
export const TAP_TOLERANCES = TAP_VARIANTS.map((v) => v.tolerance);
/** Ripple allowed on a tap winding, as a share of its voltage (the LDO's PSRR cleans it). */
export const TAP_RIPPLE_SHARE = 0.05;
/**
 * A tap's ripple is also held to this multiple of its rail's ripple limit: 26 dB, well inside
 * the 30–40 dB an LDO rejects at a few hundred kHz with headroom (from memory).
 */
export const TAP_RIPPLE_FACTOR = 20;
/**
 * Most rails one shared tap winding feeds (each through its own LDO): a policy bounding the
 * space (docs/planner.md); beyond a few LDOs on one winding a separate winding or a rail-fed
 * LDO is the usual layout.
 */
export const MAX_SHARED_TAP_RAILS = 4;

export interface GenerationOptions {
  allowRailFeeds: boolean;
  maxSecondaries: number;
  allowed: ReadonlySet<StageKind>;
}

interface StageRun { ok: true; design: StageDesign; perMode: StageEvaluation[]; atMin: StageEvaluation; windows: OutputWindow[]; modeCurrents: number[][] }

/** A rejected candidate and why, kept per rail for reasons and infeasibility reports. */
export interface Miss { shape: BlockShape; rejection: Rejection }

export type BlockResult = { ok: true; eval: BlockEval } | { ok: false; rejections: Rejection[] };

const fmtV = (v: number) => `${Math.round(v * 1000) / 1000} V`;
/** A miss or a limit in volts with three significant digits (0.39 mV prints as 390 µV, not 0 mV). */
const fmtQ = (v: number) => formatQuantity(v, 'voltage', 3);
const fmtA = (v: number) => `${Math.round(v * 1e4) / 1e4} A`;
const fmtW = (v: number) => `${Math.round(v * 1e4) / 1e4} W`;

/** A buck's largest duty, for the reasons ("a buck cannot reach 12 V below 13.3 V input"). */
const BUCK_MAX_DUTY = GENERIC_DEFAULTS.controller.maxDuty;

export function railBand(r: Rail): { min: number; nom: number; max: number } {
  const a = Math.abs(r.voltage);
  return { min: a * (1 - r.tolerance), nom: a, max: a * (1 + r.tolerance) };
}

/** Everything the evaluation of shapes needs about one requirements set. */
export class BlockFactory {
  /** Cost and count of a block: from the parts its designs name when the cost model can, else by category. */
  private price(parts: PartCounts, kind: StageKind, stages: readonly BlockStage[]): { cost: number; parts: number } {
    return this.costModel.priceStages?.(stages) ?? { cost: this.costModel.cost(parts, kind), parts: countParts(parts) };
  }

  readonly ctx: PlanContext;
  private readonly domains: Map<Id, Domain>;
  private readonly sources: Map<Id, Source>;
  private readonly cache = new Map<string, BlockResult>();
  evaluations = 0;
  /**
   * Blocks whose loss, cost or part count fell when their downstream load rose: the bounds of
   * the search assume this never happens, so any entry withdraws the "proved optimal" claim.
   */
  readonly boundViolations: { key: string; text: string }[] = [];

  noteBoundViolation(key: string, base: { loss: number; cost: number; parts: number }, loaded: { loss: number; cost: number; parts: number }): void {
    if (this.boundViolations.length >= 20 || this.boundViolations.some((v) => v.key === key)) return;
    this.boundViolations.push({
      key,
      text: `${key}: with its downstream load the block scores loss ${loaded.loss.toPrecision(4)} W, cost ${loaded.cost.toPrecision(4)}, ${loaded.parts} parts, ` +
        `below its unloaded loss ${base.loss.toPrecision(4)} W, cost ${base.cost.toPrecision(4)}, ${base.parts} parts`,
    });
  }

  constructor(
    readonly req: Requirements,
    rails: Rail[],
    readonly evaluator: StageEvaluator,
    readonly costModel: CostModel,
  ) {
    this.ctx = { rails, modeIds: req.modes.map((m) => m.id), shares: req.modes.map((m) => m.share) };
    this.domains = new Map(req.domains.map((d) => [d.id, d]));
    this.sources = new Map(req.sources.map((s) => [s.id, s]));
  }

  domainOf(rail: number): Domain | undefined {
    return this.domains.get(this.ctx.rails[rail]!.domainId);
  }

  isolated(rail: number): boolean {
    const d = this.domainOf(rail);
    return !!d && d.isolation !== 'none';
  }

  railCurrents(rail: number, extra?: readonly number[]): number[] {
    const r = this.ctx.rails[rail]!;
    return this.ctx.modeIds.map((m, i) => (r.current[m] ?? 0) + (extra?.[i] ?? 0));
  }

  /** Canonical key of a shape (also the block's id stem). */
  static shapeKey(s: BlockShape): string {
    const inp = s.input.kind === 'source' ? `s:${s.input.id}` : `r${s.input.rail}`;
    if (s.kind === 'cwbuck') return `cw[${inp}|p${s.primary ?? `bus${s.busVoltage}`}|${s.secondaries.join(',')}${s.sharedTap ? `|t${s.sharedTap.join(',')}` : ''}]`;
    return `${s.kind}[${inp}>${s.rail}]`;
  }

  static covers(s: BlockShape): number[] {
    if (s.kind === 'cwbuck') return [...(s.primary === null ? [] : [s.primary]), ...s.secondaries].sort((a, b) => a - b);
    return [s.rail];
  }

  /** Evaluate a shape with `extra[rail]` per-mode downstream currents on its outputs. Cached. */
  evaluate(shape: BlockShape, extra?: ReadonlyMap<number, readonly number[]>): BlockResult {
    const covers = BlockFactory.covers(shape);
    let key = BlockFactory.shapeKey(shape);
    if (extra) {
      for (const r of covers) {
        const e = extra.get(r);
        if (e && e.some((x) => x > 0)) key += `|${r}:${e.map((x) => x.toExponential(9)).join(',')}`;
      }
    }
    const hit = this.cache.get(key);
    if (hit) return hit;
    let res: BlockResult;
    try {
      res = this.evaluateUncached(shape, extra);
    } catch (e) {
      res = { ok: false, rejections: [{ constraint: 'engine-error', shortfall: 0, unit: '', text: `the stage engine failed: ${(e as Error)?.message ?? String(e)}` }] };
    }
    if (!res.ok) res = { ok: false, rejections: res.rejections.map((r) => ({ ...r, text: this.readable(r.text) })) };
    this.cache.set(key, res);
    return res;
  }

  /** Engine messages quote node ids; a reviewer reads rail names. */
  readable(text: string): string {
    if (!text.includes('rail:')) return text;
    let out = text;
    for (const r of this.ctx.rails) {
      out = out.split(`tap:${r.id}`).join(`the tap for ${r.name}`).split(r.id).join(r.name);
    }
    return out;
  }

  private inputWindow(input: FeedInput): { min: number; nom: number; max: number; ripple: number; sign: number } {
    if (input.kind === 'source') {
      const s = this.sources.get(input.id)!;
      return { min: s.vMin, nom: s.vNom, max: s.vMax, ripple: 0, sign: 1 };
    }
    const r = this.ctx.rails[input.rail]!;
    return { ...railBand(r), ripple: r.rippleLimit, sign: Math.sign(r.voltage) || 1 };
  }

  private baseSpec(kind: StageKind, vin: { min: number; nom: number; max: number; ripple: number; sign?: number }, outputs: OutputSpec[]): StageSpec {
    const p = this.req.preferences;
    const l = this.req.limits;
    // Inputs are signed like the rail that feeds them (a negative LDO runs from a negative rail).
    // For a negative input, vinMin is the most negative value (vinMin ≤ vinNom ≤ vinMax).
    const sg = vin.sign ?? 1;
    const [lo, hi] = sg < 0 ? [-vin.max, -vin.min] : [vin.min, vin.max];
    return {
      kind,
      vinMin: lo as Volts, vinNom: (sg * vin.nom) as Volts, vinMax: hi as Volts,
      vinRipple: vin.ripple as Volts,
      outputs,
      fsw: p.switchingFrequency as Hertz,
      ambient: l.ambient as Celsius,
      // Parts are chosen against the limit with its margin (tjMax − tjMargin).
      tjMax: (l.tjMax - l.tjMargin) as Celsius,
      ceramicDerating: l.ceramicDerating as Ratio,
    };
  }

  private railOutput(rail: number, currents: number[], sign = 1): OutputSpec {
    const r = this.ctx.rails[rail]!;
    return {
      nodeId: r.id,
      voltage: (r.voltage * sign) as Volts,
      tolerance: r.tolerance,
      currentMin: Math.min(...currents) as Amps,
      currentMax: Math.max(...currents) as Amps,
      rippleLimit: r.rippleLimit,
    };
  }

  /**
   * Design one stage and check it: windows over vin {min, nom, max} × each output at its
   * min/max current, evaluations at every mode (vin nominal) and at vin min/max with the
   * largest currents; engine error flags, ripple, Tj margin.
   */
  /** Tap choice (index into TAP_VARIANTS, −1 = direct) each secondary needed on a primary. */
  private readonly tapHints = new Map<string, number>();
  private readonly stageCache = new Map<string, { ok: true; design: StageDesign; atMin: StageEvaluation; windows: OutputWindow[] } | { ok: false; rejections: Rejection[] }>();

  /**
   * Design and check one stage. The design is made for the outputs' current range rounded
   * outward to two significant digits (max up, min down: a conservative corner set), so that
   * the small changes of downstream load during the search reuse the same design; the losses
   * of each mode are then evaluated at the exact currents.
   */
  private runStage(
    spec0: StageSpec, modeCurrents: number[][], railOf: (i: number) => number | undefined, mirror: number,
  ): StageRun | { ok: false; rejections: Rejection[] } {
    this.evaluations++;
    const spec: StageSpec = {
      ...spec0,
      outputs: spec0.outputs.map((o) => ({ ...o, currentMax: gridUp(o.currentMax) as Amps, currentMin: gridDown(o.currentMin) as Amps })),
    };
    const key = JSON.stringify(spec);
    let heavy = this.stageCache.get(key);
    if (!heavy) {
      heavy = this.designAndCheck(spec, railOf, mirror);
      this.stageCache.set(key, heavy);
    }
    if (!heavy.ok) return heavy;
    return this.modeLosses(spec, heavy, modeCurrents, railOf);
  }

  private check(spec: StageSpec, rej: Rejection[], ev: StageEvaluation, where: string, railOf: (i: number) => number | undefined): void {
    const tjLimit = this.req.limits.tjMax - this.req.limits.tjMargin;
    for (const f of ev.flags) {
      if (f.severity === 'error' && !rej.some((r) => r.constraint === f.code)) {
        rej.push({ constraint: f.code, shortfall: numberFrom(f.data), unit: '', text: `${f.text} (${where})`, rail: railOf(0) });
      }
    }
    for (const p of ev.parts) {
      if (p.tj > tjLimit + 1e-9 && !rej.some((r) => r.constraint === 'tj')) {
        rej.push({
          constraint: 'tj', shortfall: p.tj - tjLimit, unit: 'K', rail: railOf(0),
          text: `${p.role} reaches Tj ${+p.tj.toPrecision(4)} °C ${where}, above the ${tjLimit} °C limit (tjMax − margin) by ${+(p.tj - tjLimit).toPrecision(3)} K`,
        });
      }
    }
    ev.outputs.forEach((o, i) => {
      const lim = spec.outputs[i]?.rippleLimit ?? Infinity;
      if (o.ripplePP > lim * (1 + 1e-9) && !rej.some((r) => r.constraint === 'ripple' && r.rail === railOf(i))) {
        rej.push({
          constraint: 'ripple', shortfall: o.ripplePP - lim, unit: 'V', rail: railOf(i),
          text: `ripple ${fmtQ(o.ripplePP)} p-p ${where} exceeds the ${fmtQ(lim)} limit by ${fmtQ(o.ripplePP - lim)}`,
        });
      }
    });
  }

  private modeLosses(
    spec: StageSpec, heavy: { design: StageDesign; atMin: StageEvaluation; windows: OutputWindow[] }, modeCurrents: number[][], railOf: (i: number) => number | undefined,
  ): StageRun | { ok: false; rejections: Rejection[] } {
    const ambient = this.req.limits.ambient as Celsius;
    const rej: Rejection[] = [];
    const perMode: StageEvaluation[] = [];
    for (let m = 0; m < modeCurrents.length; m++) {
      // A load switch is off in some modes (the op's mode decides); other kinds ignore it.
      const mode = spec.kind === 'load-switch' ? { mode: this.ctx.modeIds[m]! } : {};
      const ev = this.evaluator.evaluate(heavy.design, { vin: spec.vinNom, iout: modeCurrents[m]! as Amps[], ambient, ...mode });
      perMode.push(ev);
      this.check(spec, rej, ev, `in mode ${this.req.modes[m]?.name ?? m} at Vin nominal`, railOf);
    }
    if (rej.length) return { ok: false, rejections: rej };
    return { ok: true, design: heavy.design, perMode, atMin: heavy.atMin, windows: heavy.windows, modeCurrents };
  }

  /** The expensive part: design, the two full-load corners, the windows. */
  private designAndCheck(
    spec: StageSpec, railOf: (i: number) => number | undefined, mirror: number,
  ): { ok: true; design: StageDesign; atMin: StageEvaluation; windows: OutputWindow[] } | { ok: false; rejections: Rejection[] } {
    const d = this.evaluator.design(spec);
    if (!d.ok) {
      return {
        ok: false,
        rejections: d.flags.filter((f) => f.severity === 'error').map((f) => ({
          constraint: f.code, shortfall: numberFrom(f.data), unit: '', text: f.text, rail: railOf(0),
        })),
      };
    }
    const rej: Rejection[] = [];
    const ambient = this.req.limits.ambient as Celsius;
    const maxI = spec.outputs.map((o) => o.currentMax);
    const check = (ev: StageEvaluation, where: string) => this.check(spec, rej, ev, where, railOf);
    // Cheapest checks first: the two full-load corners, then the windows.
    const atMin = this.evaluator.evaluate(d.design, { vin: spec.vinMin, iout: maxI, ambient });
    check(atMin, 'at Vin min and full load');
    const atMax = this.evaluator.evaluate(d.design, { vin: spec.vinMax, iout: maxI, ambient });
    check(atMax, 'at Vin max and full load');
    if (rej.length) return { ok: false, rejections: rej };
    const windows = this.evaluator.windows(d.design, {
      vin: [spec.vinMin, spec.vinNom, spec.vinMax],
      iout: spec.outputs.map((o) => ({ min: o.currentMin, max: o.currentMax })),
    });
    windows.forEach((w, i) => {
      if (!w.inside) {
        const miss = Math.max(w.allowedMin - w.min, w.max - w.allowedMax, 0);
        const lo = mirror * w.min, hi = mirror * w.max;
        const [a, b] = lo <= hi ? [lo, hi] : [hi, lo];
        const tol = spec.outputs[i]!.tolerance;
        rej.push({
          constraint: 'window', shortfall: miss, unit: 'V', rail: railOf(i),
          text: `window ${fmtV(a)}…${fmtV(b)} exceeds ±${+(tol * 100).toFixed(2)} % of ${fmtV(mirror * spec.outputs[i]!.voltage)} by ${fmtQ(miss)} (${w.minCorner} / ${w.maxCorner})`,
        });
      }
    });
    if (rej.length) return { ok: false, rejections: rej };
    return { ok: true, design: d.design, atMin, windows };
  }

  private weighted(values: number[]): number {
    let s = 0;
    values.forEach((v, i) => { s += v * (this.ctx.shares[i] ?? 0); });
    return s;
  }

  private evaluateUncached(shape: BlockShape, extra?: ReadonlyMap<number, readonly number[]>): BlockResult {
    if (shape.kind === 'cwbuck') return this.evalCoupled(shape, extra);
    const rail = shape.rail;
    const r = this.ctx.rails[rail]!;
    const currents = this.railCurrents(rail, extra?.get(rail));
    const vin = this.inputWindow(shape.input);
    const mirror = 1;
    let spec = this.baseSpec(shape.kind, vin, [this.railOutput(rail, currents)]);
    const barriers: Barrier[] = [];
    if (shape.kind === 'iso-module') {
      // The module is the barrier: its class and working voltage must cover the domain's.
      const iso = this.strongestIsolation([rail]);
      spec = { ...spec, isolation: iso };
      const dom = this.domainOf(rail);
      if (dom && iso) barriers.push({ fromDomainId: this.inputDomain(shape.input), toDomainId: dom.id, isolation: dom.isolation as Barrier['isolation'], workingVoltage: dom.workingVoltage });
    }
    if (shape.kind === 'load-switch') spec = { ...spec, loadSwitch: { offModes: [...shape.offModes] } };
    const run = this.runStage(spec, currents.map((c) => [c]), () => rail, mirror);
    if (!run.ok) return run;
    const parts = stageParts(shape.kind, 0);
    const stage: BlockStage = {
      localId: 's0', kind: shape.kind, name: `${kindNames(shape.kind).title} ${r.name}`,
      inputNode: 'input', outputs: [{ nodeId: r.id, role: 'output' }], barriers, design: run.design, spec,
      modeCurrents: run.modeCurrents, lossPerMode: run.perMode.map((e) => e.loss),
    };
    const lossPerMode: number[] = run.perMode.map((e) => e.loss);
    const inputName = shape.input.kind === 'source' ? (this.sources.get(shape.input.id)?.name ?? shape.input.id) : this.ctx.rails[shape.input.rail]!.name;
    const w = run.windows[0]!;
    const lo = Math.min(mirror * w.min, mirror * w.max), hi = Math.max(mirror * w.min, mirror * w.max);
    const reasons: Reason[] = [{
      code: `feed-${shape.kind}`,
      subjectId: r.id,
      text: this.singleReason(shape, r, inputName, vin, run, this.weighted(lossPerMode), lo, hi),
      data: { loss: this.weighted(lossPerMode), windowMin: lo, windowMax: hi, tolerance: r.tolerance },
    }];
    return {
      ok: true,
      eval: {
        loss: this.weighted(lossPerMode),
        lossPerMode,
        iinPerMode: run.perMode.map((e) => Math.abs(e.iin)),
        iinAtMin: run.perMode.map((e) => Math.abs(e.iin) * (vin.nom / Math.max(vin.min, 1e-9))),
        pinPerMode: run.perMode.map((e) => Math.abs(e.pin)),
        ...this.price(parts, shape.kind, [stage]),
        partCounts: parts,
        stages: [stage],
        internalNodes: [],
        windows: [{ ...w, min: lo as Volts, max: hi as Volts }],
        reasons,
        notes: { duty: run.atMin.duty ?? NaN },
      },
    };
  }

  /** The domain a feed draws from: the rail's, or for a source the galvanically connected one. */
  private inputDomain(input: FeedInput): Id {
    if (input.kind === 'rail') return this.ctx.rails[input.rail]!.domainId;
    return this.req.domains.find((d) => d.isolation === 'none')?.id ?? '';
  }

  /** Why a one-rail feed was chosen, with the numbers that decide it. */
  private singleReason(
    shape: BlockShape & { rail: number }, r: Rail, inputName: string, vin: { min: number; max: number; sign: number },
    run: StageRun, loss: number, lo: number, hi: number,
  ): string {
    const a = Math.abs(r.voltage);
    const band = railBand(r);
    const tail = `mode-weighted loss ${fmtW(loss)}, window ${fmtV(lo)}…${fmtV(hi)} inside ±${+(r.tolerance * 100).toFixed(2)} %`;
    const range = `${fmtV(vin.min)}…${fmtV(vin.max)}`;
    // A buck's output stays below its input times its largest duty (the generic controller's).
    const buckReach = a / BUCK_MAX_DUTY;
    switch (shape.kind) {
      case 'ldo':
        return `${r.name} comes from an LDO on ${inputName}: headroom ${fmtV(vin.min - a)} at the input's lowest ${fmtV(vin.min * vin.sign)}, ${tail}`;
      case 'buck':
        return `${r.name} gets its own buck from ${inputName}: duty ${pct(run.atMin.duty)} at Vin min, ${tail}`;
      case 'boost':
        return `${r.name} (${fmtV(a)}) from ${inputName} (${range}): boost, because the rail's lowest ${fmtV(band.min)} is above the input's highest ${fmtV(vin.max)} ` +
          `(a buck or an LDO cannot step up); duty ${pct(run.atMin.duty)} at Vin min ${fmtV(vin.min)}, ${tail}`;
      case 'buck-boost-4s': {
        const tb = run.design.kind === 'buck-boost-4s' ? run.design.transitionBand : undefined;
        return `${fmtV(a)} from a ${range} input (${inputName} to ${r.name}): four-switch buck-boost, because a buck cannot reach ${fmtV(a)} below ` +
          `${fmtV(buckReach)} input (${+(BUCK_MAX_DUTY * 100).toFixed(0)} % largest duty) and the input falls to ${fmtV(vin.min)}, ` +
          `while a boost cannot step down to it from the input's highest ${fmtV(vin.max)}` +
          (tb ? `; boost region below ${fmtV(tb[0])}, both legs switch up to ${fmtV(tb[1])}, buck region above` : '') + `; ${tail}`;
      }
      case 'inverting':
        return `${r.name} (${fmtV(r.voltage)}) is a negative rail without isolation: inverting buck-boost from ${inputName} (${range}), ` +
          `duty ${pct(run.atMin.duty)} at Vin min ${fmtV(vin.min)}; ${tail}`;
      case 'iso-module': {
        const m = run.design.kind === 'iso-module' ? run.design.module : undefined;
        const dom = this.domainOf(this.ctx.rails.indexOf(r));
        return `${r.name} is a small isolated load (${fmtA(Math.max(...Object.values(r.current), 0))} peak, ${fmtW(a * Math.max(...Object.values(r.current), 0))}): ` +
          `a fixed-ratio isolated module from ${inputName} (${range})` +
          (m ? ` rated ${fmtW(m.pRated)}, ratio ${+m.ratio.toPrecision(3)}, ${m.isolation} isolation for ${fmtV(m.workingVoltage)} working` : '') +
          (dom ? ` (the domain asks ${dom.isolation}, ${fmtV(dom.workingVoltage)})` : '') +
          `, instead of a custom coupled winding; unregulated output ${tail}`;
      }
      case 'load-switch': {
        const off = shape.kind === 'load-switch' ? shape.offModes : [];
        const names = off.map((id) => this.req.modes.find((m) => m.id === id)?.name ?? id);
        return `${r.name} is a gated copy of ${inputName} (${range}, inside its ${fmtV(band.min)}…${fmtV(band.max)} band): a load switch, ` +
          `off in ${names.join(', ')} where the rail draws nothing, so it needs no regulator of its own; ${tail}`;
      }
      default:
        return `${r.name} from ${inputName}: ${tail}`;
    }
  }

  private strongestIsolation(rails: number[]): { class: Domain['isolation']; workingVoltage: Volts } | null {
    let best: { class: Domain['isolation']; workingVoltage: Volts } | null = null;
    for (const s of rails) {
      const d = this.domainOf(s);
      if (!d || d.isolation === 'none') continue;
      if (!best || isolationRank(d.isolation) > isolationRank(best.class) || (d.isolation === best.class && d.workingVoltage > best.workingVoltage)) {
        best = { class: d.isolation, workingVoltage: d.workingVoltage };
      }
    }
    return best;
  }

  /**
   * One tap winding and the LDO behind it of each rail it feeds (one rail, or a shared tap's
   * group). The tap is set for the highest |V| of the group, `(|V| + headroom) / (1 − tolerance)`
   * rounded up to 0.1 V, so that rail's LDO has its headroom at the tap's lowest voltage and
   * every lower rail more; its ripple is held to TAP_RIPPLE_FACTOR × the smallest ripple limit
   * of the group; the winding carries the sum of the LDOs' input currents.
   */
  private designTap(group: readonly number[], currentsOf: (s: number) => number[], variant: { tolerance: number; headroom: number }): TapRun | { ok: false; rejections: Rejection[] } {
    const rails = this.ctx.rails;
    const lead = tapLead(rails, group);
    const r = rails[lead]!;
    const tapTol = variant.tolerance;
    const tapMag = Math.ceil(((Math.abs(r.voltage) + variant.headroom) / (1 - tapTol)) * 10) / 10;
    const tapRipple = Math.min(tapMag * TAP_RIPPLE_SHARE, Math.min(...group.map((g) => rails[g]!.rippleLimit)) * TAP_RIPPLE_FACTOR);
    const sign = Math.sign(r.voltage) || 1;
    const ldoVin = { min: tapMag * (1 - tapTol), nom: tapMag, max: tapMag * (1 + tapTol), ripple: tapRipple, sign };
    const ldos = new Map<number, TapLdo>();
    const nModes = this.ctx.modeIds.length;
    const iinPerMode = new Array<number>(nModes).fill(0);
    let peak = 0;
    for (const g of group) {
      const currents = currentsOf(g);
      const spec = this.baseSpec('ldo', ldoVin, [this.railOutput(g, currents)]);
      const run = this.runStage(spec, currents.map((c) => [c]), () => g, 1);
      if (!run.ok) return { ok: false, rejections: run.rejections.map((x) => ({ ...x, rail: g })) };
      const iin = run.perMode.map((e) => Math.abs(e.iin));
      iin.forEach((x, m) => { iinPerMode[m]! += x; });
      peak += Math.max(...iin, Math.abs(run.atMin.iin));
      const w = run.windows[0]!;
      ldos.set(g, { spec, design: run.design, perMode: run.perMode, modeCurrents: run.modeCurrents, window: { ...w, min: Math.min(w.min, w.max) as Volts, max: Math.max(w.min, w.max) as Volts }, headroom: ldoVin.min - Math.abs(rails[g]!.voltage) });
    }
    const tapOutput: OutputSpec = {
      nodeId: `tap:${r.id}`,
      voltage: (sign * tapMag) as Volts,
      tolerance: tapTol as Ratio,
      currentMin: Math.min(...iinPerMode) as Amps,
      // Every LDO at its largest input current at once: the winding's design current (conservative).
      currentMax: Math.max(...iinPerMode, peak) as Amps,
      rippleLimit: tapRipple as Volts,
    };
    return { ok: true, tapV: tapMag * sign, tapLow: ldoVin.min, lead, rails: [...group], variant, tapOutput, iinPerMode, ldos };
  }

  private evalCoupled(shape: BlockShape & { kind: 'cwbuck' }, extra?: ReadonlyMap<number, readonly number[]>): BlockResult {
    const src = this.sources.get(shape.input.id)!;
    const vin = this.inputWindow(shape.input);
    const nModes = this.ctx.modeIds.length;
    const primaryName = shape.primary === null ? `primary bus ${fmtV(shape.busVoltage ?? 0)}` : this.ctx.rails[shape.primary]!.name;
    const windings = windingsOf(this.ctx.rails, shape);
    const byLead = new Map(windings.map((w) => [w.lead, w]));
    // Which windings are a tap + LDO (keyed by the winding's lead rail): a shared tap and
    // quiet rails always; others after a direct miss.
    const useTap = new Map<number, number>(); // lead rail → index into TAP_VARIANTS
    const directMiss = new Map<number, Rejection>();
    const primaryKey = `${shape.input.id}|${shape.primary ?? `bus${shape.busVoltage}`}`;
    // Start each one-rail winding from what it needed on this primary before (its one-secondary
    // block): saves the engine the designs of choices already known to miss. A shared tap
    // starts from the first tap choice.
    for (const w of windings) {
      if (w.shared) { useTap.set(w.lead, 0); continue; }
      const h = this.tapHints.get(`${primaryKey}|${w.lead}`);
      if (h !== undefined && h >= 0) useTap.set(w.lead, h);
      else if (this.ctx.rails[w.lead]!.noiseClass === 'quiet') useTap.set(w.lead, 0);
    }
    const currentsOf = (s: number) => this.railCurrents(s, extra?.get(s));
    for (let attempt = 0; attempt < 2 + 2 * TAP_VARIANTS.length; attempt++) {
      const taps = new Map<number, TapRun>();
      let tapFail: Rejection[] | null = null;
      for (const [lead, ti] of useTap) {
        const w = byLead.get(lead)!;
        // An LDO behind a tap fails on its own: try the next tap choice for that winding.
        let t = this.designTap(w.rails, currentsOf, TAP_VARIANTS[ti]!);
        let k = ti;
        while (!t.ok && k + 1 < TAP_VARIANTS.length) {
          k++;
          t = this.designTap(w.rails, currentsOf, TAP_VARIANTS[k]!);
        }
        useTap.set(lead, k);
        if (!t.ok) {
          const where = w.shared ? 'behind the shared tap winding' : 'behind a tap winding';
          tapFail = t.rejections.map((x) => ({ ...x, rail: x.rail ?? lead, text: `${where}, ${x.text}` }));
          break;
        }
        taps.set(lead, t);
      }
      if (tapFail) return { ok: false, rejections: tapFail };
      const outputs: OutputSpec[] = [];
      const railOf: (number | undefined)[] = [];
      const modeCurrents: number[][] = Array.from({ length: nModes }, () => []);
      if (shape.primary === null) {
        const bus = shape.busVoltage ?? 5;
        outputs.push({ nodeId: 'bus', voltage: bus as Volts, tolerance: 0.05 as Ratio, currentMin: 0 as Amps, currentMax: 0 as Amps, rippleLimit: (bus * 0.02) as Volts });
        railOf.push(undefined);
        for (let m = 0; m < nModes; m++) modeCurrents[m]!.push(0);
      } else {
        const c = currentsOf(shape.primary);
        outputs.push(this.railOutput(shape.primary, c));
        railOf.push(shape.primary);
        for (let m = 0; m < nModes; m++) modeCurrents[m]!.push(c[m]!);
      }
      for (const w of windings) {
        const t = taps.get(w.lead);
        if (t) {
          outputs.push(t.tapOutput);
          for (let m = 0; m < nModes; m++) modeCurrents[m]!.push(t.iinPerMode[m]!);
        } else {
          const c = currentsOf(w.lead);
          outputs.push(this.railOutput(w.lead, c));
          for (let m = 0; m < nModes; m++) modeCurrents[m]!.push(c[m]!);
        }
        railOf.push(w.lead);
      }
      // The engine records the barrier on the magnetic and checks the winding count.
      const iso = this.strongestIsolation(shape.secondaries);
      const spec = Object.assign(this.baseSpec('cwbuck', vin, outputs), {
        maxSecondaries: this.req.preferences.maxSecondaries,
        isolation: iso,
      });
      const run = this.runStage(spec, modeCurrents, (i) => railOf[i], 1);
      if (!run.ok) {
        // Windings that missed their window or ripple directly get a tap + LDO next time;
        // a tap that missed gets the looser tap tolerance.
        let changed = false;
        for (const rj of run.rejections) {
          const s = rj.rail;
          if (s === undefined || s === shape.primary || !byLead.has(s)) continue;
          if (rj.constraint !== 'window' && rj.constraint !== 'ripple') continue;
          const cur = useTap.get(s);
          if (cur === undefined) { useTap.set(s, 0); directMiss.set(s, rj); changed = true; }
          else {
            // A tap that missed its own window: the next choice whose tolerance covers the miss.
            const tapV = Math.abs(taps.get(s)?.tapV ?? 1);
            const need = TAP_VARIANTS[cur]!.tolerance + (rj.shortfall / tapV) * 1.1;
            let k = cur + 1;
            while (k < TAP_VARIANTS.length && (TAP_VARIANTS[k]!.tolerance < need || TAP_VARIANTS[k]!.headroom < TAP_VARIANTS[cur]!.headroom)) k++;
            if (k < TAP_VARIANTS.length) { useTap.set(s, k); changed = true; }
          }
        }
        if (!changed || !this.req.preferences.allowedKinds.includes('ldo')) return run;
        continue;
      }
      const stress = this.windingStress(run.design, shape, (i) => railOf[i]);
      if (stress) return { ok: false, rejections: [stress] };
      // The hint is the choice of the unloaded one-secondary block only (a loaded evaluation
      // must not change where later sets start: the design of a block is a function of it).
      const loaded = !!extra && [...extra.values()].some((e) => e.some((x) => x > 0));
      if (shape.secondaries.length === 1 && !shape.sharedTap && !loaded) {
        for (const s of shape.secondaries) this.tapHints.set(`${primaryKey}|${s}`, useTap.get(s) ?? -1);
      }
      return { ok: true, eval: this.assembleCoupled(shape, src, vin, spec, run, windings, taps, directMiss, primaryName) };
    }
    return { ok: false, rejections: [{ constraint: 'window', shortfall: 0, unit: 'V', text: 'no tap voltage keeps every secondary inside its window' }] };
  }

  /**
   * Engineering limits on a coupled-winding design (design limits, defaults from common
   * practice): the turns ratio |Ns/Np| of every secondary and its rectifier's reverse voltage.
   */
  private windingStress(d: StageDesign, shape: BlockShape & { kind: 'cwbuck' }, railOf: (i: number) => number | undefined): Rejection | null {
    if (d.kind !== 'cwbuck') return null;
    const vpri = Math.abs(d.outputs[0]?.voltage ?? 0);
    const maxRatio = this.req.limits.maxTurnsRatio ?? DEFAULT_MAX_TURNS_RATIO;
    const maxVr = this.req.limits.maxRectifierVoltage ?? DEFAULT_MAX_RECTIFIER_VOLTAGE;
    for (let k = 0; k < d.secondaries.length; k++) {
      const w = d.secondaries[k]!;
      const rail = railOf(k + 1) ?? shape.secondaries[k];
      const name = rail !== undefined ? this.ctx.rails[rail]!.name : w.nodeId;
      const ratio = Math.abs(w.turns) / d.primaryTurns;
      if (ratio > maxRatio * (1 + 1e-9)) {
        return {
          constraint: 'turns-ratio', shortfall: ratio - maxRatio, unit: '', rail,
          text: `the winding for ${name} needs turns ${d.primaryTurns}:${Math.abs(w.turns)} (ratio 1:${+ratio.toPrecision(3)}), above the 1:${maxRatio} limit of the design limits`,
        };
      }
      // The limit is on the winding's steady reverse voltage n·(Vin,max − Vpri) + |Vout|, the
      // stress the secondary circuit is built for; the turn-on spike above it is met by the
      // chosen rectifier's rating (or a snubber) in the stage design.
      const vout = Math.abs(d.outputs[k + 1]?.voltage ?? 0);
      const steady = ratio * (d.vinMax - vpri) + vout;
      if (steady > maxVr * (1 + 1e-9)) {
        return {
          constraint: 'rectifier-voltage', shortfall: steady - maxVr, unit: 'V', rail,
          text: `the rectifier of ${name} sees ${fmtQ(steady)} steady reverse voltage at Vin max (turn-on spike ${fmtQ(w.rectifierReverseVoltage)}), above the ${fmtQ(maxVr)} limit of the design limits by ${fmtQ(steady - maxVr)}`,
        };
      }
    }
    return null;
  }

  private assembleCoupled(
    shape: BlockShape & { kind: 'cwbuck' }, src: Source, vin: { min: number; nom: number; max: number },
    spec: StageSpec,
    run: { design: StageDesign; perMode: StageEvaluation[]; atMin: StageEvaluation; windows: OutputWindow[]; modeCurrents: number[][] },
    windings: readonly Winding[], taps: ReadonlyMap<number, TapRun>,
    directMiss: Map<number, Rejection>, primaryName: string,
  ): BlockEval {
    const rails = this.ctx.rails;
    const nModes = this.ctx.modeIds.length;
    const internalNodes: InternalNode[] = [];
    const stages: BlockStage[] = [];
    const reasons: Reason[] = [];
    const turns = turnsOf(run.design);
    const outputs: PlanOutput[] = [];
    const srcDomain = this.req.domains.find((d) => d.isolation === 'none')?.id ?? '';
    if (shape.primary === null) {
      internalNodes.push({ id: 'bus', name: `Primary bus ${fmtV(shape.busVoltage ?? 0)}`, domainId: srcDomain, voltage: (shape.busVoltage ?? 0) as Volts, kind: 'bus' });
      outputs.push({ nodeId: 'bus', role: 'primary', ...(turns[0] !== undefined ? { turns: turns[0] } : {}) });
    } else {
      outputs.push({ nodeId: rails[shape.primary]!.id, role: 'primary', ...(turns[0] !== undefined ? { turns: turns[0] } : {}) });
    }
    const barriers: Barrier[] = [];
    windings.forEach((w, k) => {
      const t = taps.get(w.lead);
      const nodeId = t ? t.tapOutput.nodeId : rails[w.lead]!.id;
      const tk = turns[k + 1];
      outputs.push({ nodeId, role: 'secondary', ...(tk !== undefined ? { turns: tk } : {}) });
      for (const s of w.rails) {
        const dom = this.domainOf(s);
        if (dom && dom.isolation !== 'none' && !barriers.some((b) => b.toDomainId === dom.id)) {
          barriers.push({ fromDomainId: srcDomain, toDomainId: dom.id, isolation: dom.isolation, workingVoltage: dom.workingVoltage });
        }
      }
    });
    stages.push({
      localId: 's0', kind: 'cwbuck', name: `Coupled-winding buck ${primaryName}`, inputNode: 'input', outputs, barriers, design: run.design, spec,
      modeCurrents: run.modeCurrents, lossPerMode: run.perMode.map((e) => e.loss),
    });
    let parts = stageParts('cwbuck', windings.length);
    parts.barrier = barriers.length;
    const lossPerMode: number[] = run.perMode.map((e) => e.loss);
    const windows: OutputWindow[] = [];
    run.windows.forEach((w, i) => { if (i === 0 ? shape.primary !== null : !taps.has(windings[i - 1]!.lead)) windows.push(w); });
    for (const t of taps.values()) {
      const nodeId = t.tapOutput.nodeId;
      const names = t.rails.map((g) => rails[g]!.name);
      internalNodes.push({ id: nodeId, name: `Tap ${fmtV(t.tapV)} for ${names.join(', ')}`, domainId: rails[t.lead]!.domainId, voltage: t.tapV as Volts, kind: 'tap' });
      for (const g of t.rails) {
        const l = t.ldos.get(g)!;
        stages.push({
          localId: `ldo:${g}`, kind: 'ldo', name: `LDO ${rails[g]!.name}`, inputNode: nodeId, outputs: [{ nodeId: rails[g]!.id, role: 'output' }], barriers: [], design: l.design, spec: l.spec,
          modeCurrents: l.modeCurrents, lossPerMode: l.perMode.map((e) => e.loss),
        });
        parts = addParts(parts, stageParts('ldo', 0));
        for (let m = 0; m < nModes; m++) lossPerMode[m]! += l.perMode[m]!.loss;
        windows.push(l.window);
      }
    }
    const loss = this.weighted(lossPerMode);
    const pinPerMode = run.perMode.map((e) => Math.abs(e.pin));
    const iinPerMode = run.perMode.map((e) => Math.abs(e.iin));
    const secNames = shape.secondaries.map((s) => rails[s]!.name);
    const isoDomains = barriers.map((b) => this.domains.get(b.toDomainId)?.name ?? b.toDomainId);
    const shared = windings.find((w) => w.shared);
    reasons.push({
      code: 'shared-magnetic',
      subjectId: shape.primary === null ? 'bus' : rails[shape.primary]!.id,
      text: `${secNames.join(', ')} ${secNames.length === 1 ? 'shares' : 'share'} one coupled-winding magnetic with the ${primaryName} primary (from ${src.name}): ` +
        `duty ${pct(run.atMin.duty)} at Vin min ${fmtV(vin.min)}, turns ${turns.length ? turns.join(':') : 'n/a'}, mode-weighted loss ${fmtW(loss)}` +
        (shared ? `; ${windings.length} secondary winding${windings.length === 1 ? '' : 's'}, ${shared.rails.map((g) => rails[g]!.name).join(' and ')} on one shared tap winding` : '') +
        (isoDomains.length ? `; the windings cross the barrier into ${isoDomains.join(', ')}` : ''),
      data: { loss, secondaries: windings.length, duty: run.atMin.duty ?? NaN },
    });
    for (const b of barriers) {
      reasons.push({
        code: 'barrier', subjectId: b.toDomainId,
        text: `${this.domains.get(b.toDomainId)?.name ?? b.toDomainId} is reached only through the magnetic's ${b.isolation} isolation (working voltage ${fmtV(b.workingVoltage)}); ` +
          'creepage, clearance and the insulation system follow the applicable safety standard and are for a qualified engineer and the test lab to confirm',
        data: { workingVoltage: b.workingVoltage, isolation: b.isolation },
      });
    }
    windings.forEach((wd, k) => {
      const t = taps.get(wd.lead);
      const w = run.windows[k + 1];
      if (!t) {
        const r = rails[wd.lead]!;
        reasons.push({
          code: 'winding-direct', subjectId: r.id,
          text: `${r.name} is a secondary winding (${turns[k + 1] ?? '?'} turns): window ${fmtV(w?.min ?? NaN)}…${fmtV(w?.max ?? NaN)} stays inside ±${+(r.tolerance * 100).toFixed(2)} %, so no LDO is needed`,
          data: { windowMin: w?.min ?? NaN, windowMax: w?.max ?? NaN },
        });
        return;
      }
      if (!wd.shared) {
        const r = rails[wd.lead]!;
        const l = t.ldos.get(wd.lead)!;
        const miss = directMiss.get(wd.lead);
        const why = r.noiseClass === 'quiet'
          ? 'it is a quiet rail, which never takes a switching output directly'
          : miss ? `the direct winding missed: ${miss.text}` : 'the direct winding misses its window';
        const pLdo = this.weighted(l.perMode.map((e) => e.loss));
        reasons.push({
          code: 'winding-tap-ldo', subjectId: r.id,
          text: `${r.name} is an LDO behind a ${fmtV(t.tapV)} tap winding (${turns[k + 1] ?? '?'} turns) because ${why}; LDO loss ${fmtW(pLdo)}, window ${fmtV(l.window.min)}…${fmtV(l.window.max)}`,
          data: { tap: t.tapV, ldoLoss: pLdo },
        });
        return;
      }
      // A shared tap: one winding, one LDO per rail; the tap is set for the highest rail.
      const lead = rails[t.lead]!;
      const peak = t.tapOutput.currentMax;
      for (const g of t.rails) {
        const r = rails[g]!;
        const l = t.ldos.get(g)!;
        const others = t.rails.filter((x) => x !== g).map((x) => rails[x]!.name);
        const pLdo = this.weighted(l.perMode.map((e) => e.loss));
        reasons.push({
          code: 'winding-tap-ldo', subjectId: r.id,
          text: `${r.name} is an LDO behind a ${fmtV(t.tapV)} tap winding (${turns[k + 1] ?? '?'} turns) shared with ${others.join(', ')}: ` +
            `the tap is set for ${lead.name} (${fmtV(Math.abs(lead.voltage))} plus ${fmtV(t.variant.headroom)} headroom at the tap's lowest ${fmtV(t.tapLow)}, ±${+(t.variant.tolerance * 100).toFixed(0)} % tap tolerance), ` +
            `one winding instead of ${t.rails.length} carries the LDOs' sum (${fmtA(peak)} design current); this LDO has ${fmtV(l.headroom)} headroom at the tap's lowest, loss ${fmtW(pLdo)}, window ${fmtV(l.window.min)}…${fmtV(l.window.max)}`,
          data: { tap: t.tapV, ldoLoss: pLdo, shared: t.rails.length, headroom: l.headroom },
        });
      }
    });
    return {
      loss, lossPerMode, iinPerMode,
      iinAtMin: iinPerMode.map((i) => i * (vin.nom / Math.max(vin.min, 1e-9))),
      pinPerMode,
      ...this.price(parts, 'cwbuck', stages), partCounts: parts,
      stages, internalNodes, windows, reasons,
      notes: { duty: run.atMin.duty ?? NaN, taps: taps.size, windings: windings.length },
    };
  }
}

/** One LDO behind a tap winding. */
interface TapLdo { spec: StageSpec; design: StageDesign; perMode: StageEvaluation[]; modeCurrents: number[][]; window: OutputWindow; headroom: number }
/** A designed tap winding: its output spec on the magnetic and the LDO of each rail it feeds. */
interface TapRun {
  ok: true; tapV: number; tapLow: number; lead: number; rails: number[]; variant: { tolerance: number; headroom: number };
  tapOutput: OutputSpec; iinPerMode: number[]; ldos: Map<number, TapLdo>;
}
/** One secondary winding: a rail (direct or tap + LDO), or a shared tap's rails (led by the highest |V|). */
interface Winding { lead: number; rails: number[]; shared: boolean }

/** The rail a tap is set for: the highest |V| of its group (the lowest index on a tie). */
function tapLead(rails: readonly Rail[], group: readonly number[]): number {
  let best = group[0]!;
  for (const g of group) if (Math.abs(rails[g]!.voltage) > Math.abs(rails[best]!.voltage)) best = g;
  return best;
}

/** The windings of a coupled-winding shape in secondaries order (a shared tap at its first rail's place). */
function windingsOf(rails: readonly Rail[], shape: BlockShape & { kind: 'cwbuck' }): Winding[] {
  const group = shape.sharedTap ?? [];
  const out: Winding[] = [];
  for (const s of shape.secondaries) {
    if (!group.includes(s)) out.push({ lead: s, rails: [s], shared: false });
    else if (s === group[0]) out.push({ lead: tapLead(rails, group), rails: [...group], shared: true });
  }
  return out;
}

/** Round a current up (gridUp) or down (gridDown) to two significant digits. */
export function gridUp(x: number): number {
  if (!(x > 0)) return 0;
  const step = 10 ** (Math.floor(Math.log10(x)) - 1);
  return Math.ceil(x / step - 1e-9) * step;
}
export function gridDown(x: number): number {
  if (!(x > 0)) return 0;
  const step = 10 ** (Math.floor(Math.log10(x)) - 1);
  return Math.floor(x / step + 1e-9) * step;
}

function pct(x: number | undefined): string {
  return x === undefined || !Number.isFinite(x) ? 'n/a' : `${(x * 100).toFixed(1)} %`;
}

function numberFrom(data?: Record<string, number | string>): number {
  if (!data) return 0;
  for (const k of ['shortfall', 'excess', 'margin', 'by']) {
    const v = data[k];
    if (typeof v === 'number' && Number.isFinite(v)) return Math.abs(v);
  }
  return 0;
}

/** Turns per output from a coupled-winding design, when the design exposes them. */
function turnsOf(d: StageDesign): number[] {
  return d.kind === 'cwbuck' ? [d.primaryTurns, ...d.secondaries.map((w) => w.turns)] : [];
}

/** Parts implied by a stage's topology (controller, switches, magnetic, rectifiers, caps, resistors). */
export function stageParts(kind: StageKind, secondaries: number): PartCounts {
  const p = emptyParts();
  if (kind === 'buck') {
    Object.assign(p, { controller: 1, switch: 2, magnetic: 1, capacitor: 4, resistor: 2 });
  } else if (kind === 'cwbuck') {
    // Per secondary: a rectifier, an output capacitor pair and a preload resistor.
    Object.assign(p, { controller: 1, switch: 2, coupledMagnetic: 1, rectifier: secondaries, capacitor: 4 + 2 * secondaries, resistor: 2 + secondaries });
  } else if (kind === 'ldo') {
    Object.assign(p, { ldo: 1, capacitor: 2, resistor: 2 });
  } else if (kind === 'boost' || kind === 'inverting') {
    Object.assign(p, { controller: 1, switch: 2, magnetic: 1, capacitor: 4, resistor: 2 });
  } else if (kind === 'buck-boost-4s') {
    // Four switches, a current-sense resistor beside the divider.
    Object.assign(p, { controller: 1, switch: 4, magnetic: 1, capacitor: 4, resistor: 3 });
  } else if (kind === 'iso-module') {
    // The module is one bought part (counted as a controller), its input and output capacitors and a preload.
    Object.assign(p, { controller: 1, capacitor: 2, resistor: 1 });
  } else if (kind === 'load-switch') {
    Object.assign(p, { switch: 1, capacitor: 1 });
  }
  return p;
}

/** Enumerate the candidate shapes of a requirements set (before evaluation). */
export function enumerateShapes(f: BlockFactory, opts: GenerationOptions): {
  singles: BlockShape[]; coupled: (size: number) => Generator<BlockShape>; primaries: { primary: number | null; busVoltage?: number; source: Source }[];
  /** Shapes with a shared tap: `alone` the tap winding only, else with 1…m − 1 other secondaries. */
  shared: (alone: boolean) => Generator<BlockShape>; groups: number[][];
} {
  const rails = f.ctx.rails;
  const req = f.req;
  const singles: BlockShape[] = [];
  const n = rails.length;
  for (let i = 0; i < n; i++) {
    const r = rails[i]!;
    const iso = f.isolated(i);
    const quiet = r.noiseClass === 'quiet';
    if (opts.allowed.has('buck') && r.voltage > 0 && !quiet) {
      if (!iso) {
        for (const s of req.sources) if (r.voltage < s.vMin) singles.push({ kind: 'buck', input: { kind: 'source', id: s.id }, rail: i });
      }
      if (opts.allowRailFeeds) {
        for (let j = 0; j < n; j++) {
          const u = rails[j]!;
          // Never from a quiet rail: the switching current would pollute it (common practice).
          if (j !== i && u.domainId === r.domainId && u.voltage > r.voltage && u.noiseClass !== 'quiet') singles.push({ kind: 'buck', input: { kind: 'rail', rail: j }, rail: i });
        }
      }
    }
    if (opts.allowed.has('ldo') && opts.allowRailFeeds) {
      for (let j = 0; j < n; j++) {
        const u = rails[j]!;
        // A quiet rail feeds only quiet rails: other loads would put their noise on it (common practice).
        if (j !== i && u.domainId === r.domainId && Math.sign(u.voltage) === Math.sign(r.voltage) && Math.abs(u.voltage) > Math.abs(r.voltage) &&
          (u.noiseClass !== 'quiet' || quiet)) {
          singles.push({ kind: 'ldo', input: { kind: 'rail', rail: j }, rail: i });
        }
      }
    }
    singles.push(...newKindShapes(f, opts, i));
  }
  const primaries: { primary: number | null; busVoltage?: number; source: Source }[] = [];
  if (opts.allowed.has('cwbuck') && opts.maxSecondaries >= 1) {
    for (const s of req.sources) {
      for (let i = 0; i < n; i++) {
        const r = rails[i]!;
        if (!f.isolated(i) && r.voltage > 0 && r.voltage < s.vMin && r.noiseClass !== 'quiet') primaries.push({ primary: i, source: s });
      }
      const needsBus = rails.some((r, i) => f.isolated(i) || r.voltage < 0);
      if (needsBus) {
        const bus = busVoltageFor(s.vMin);
        if (bus > 0) primaries.push({ primary: null, busVoltage: bus, source: s });
      }
    }
  }
  /** Every shape with `size` secondaries on each primary, one at a time (no list in memory). */
  const coupled = function* (size: number): Generator<BlockShape> {
    if (size > opts.maxSecondaries || size < 1) return;
    if (size === 1) {
      // One secondary: rail by rail, every primary for it (internal buses first: a bus feeds
      // no rail of its own, so its stage never competes with another for a primary). A budget
      // cut then leaves each rail several primaries to choose from, which an exact cover of
      // the rails needs when several isolated rails each want a stage of their own.
      const order = [...primaries.filter((p) => p.primary === null), ...primaries.filter((p) => p.primary !== null)];
      for (let j = 0; j < n; j++) for (const p of order) if (j !== p.primary) yield cw(p, [j]);
      return;
    }
    for (const p of primaries) {
      const cand: number[] = [];
      for (let j = 0; j < n; j++) if (j !== p.primary) cand.push(j);
      if (size > cand.length) continue;
      // Lexicographic combinations of `size` indices into cand.
      const idx = Array.from({ length: size }, (_, k) => k);
      for (;;) {
        yield cw(p, idx.map((k) => cand[k]!));
        let k = size - 1;
        while (k >= 0 && idx[k] === cand.length - size + k) k--;
        if (k < 0) break;
        idx[k]!++;
        for (let q = k + 1; q < size; q++) idx[q] = idx[q - 1]! + 1;
      }
    }
  };
  const groups = opts.allowed.has('ldo') ? sharedTapGroups(f) : [];
  /** Every shared-tap shape on each primary: the group's winding and 1…m − 1 other windings (or none when `alone`). */
  const shared = function* (alone: boolean): Generator<BlockShape> {
    if (opts.maxSecondaries < 1 || !groups.length) return;
    for (const p of primaries) {
      for (const g of groups) {
        if (alone) { yield cw(p, g, g); continue; }
        const cand: number[] = [];
        for (let j = 0; j < n; j++) if (j !== p.primary && !g.includes(j)) cand.push(j);
        for (let size = 1; size <= Math.min(opts.maxSecondaries - 1, cand.length); size++) {
          const idx = Array.from({ length: size }, (_, k) => k);
          for (;;) {
            yield cw(p, [...g, ...idx.map((k) => cand[k]!)].sort((a, b) => a - b), g);
            let k = size - 1;
            while (k >= 0 && idx[k] === cand.length - size + k) k--;
            if (k < 0) break;
            idx[k]!++;
            for (let q = k + 1; q < size; q++) idx[q] = idx[q - 1]! + 1;
          }
        }
      }
    }
  };
  return { singles, coupled, primaries, shared, groups };
}

/**
 * The rail sets that may share one tap winding: 2…MAX_SHARED_TAP_RAILS rails of one isolated
 * domain with the same sign (docs/planner.md). Each rail gets its own LDO from the tap, which
 * is set for the highest of them; the engine decides whether each LDO holds (headroom, Tj).
 */
export function sharedTapGroups(f: BlockFactory): number[][] {
  const rails = f.ctx.rails;
  const byKey = new Map<string, number[]>();
  rails.forEach((r, i) => {
    if (!f.isolated(i) || r.voltage === 0) return;
    const k = `${r.domainId}|${Math.sign(r.voltage)}`;
    byKey.set(k, [...(byKey.get(k) ?? []), i]);
  });
  const out: number[][] = [];
  for (const list of byKey.values()) {
    const m = list.length;
    if (m < 2) continue;
    for (let bits = 1; bits < 1 << m; bits++) {
      const g = list.filter((_, k) => (bits >> k) & 1);
      if (g.length >= 2 && g.length <= MAX_SHARED_TAP_RAILS) out.push(g);
    }
  }
  // Smaller groups first, then by rail index: a stable order.
  return out.sort((a, b) => a.length - b.length || a.join(',').localeCompare(b.join(','), 'en', { numeric: true }));
}

/**
 * Feeds of rail i by the boost, four-switch buck-boost, inverting, isolated-module and
 * load-switch kinds (docs/planner.md, "Decision space"). Inputs are the sources and, with rail
 * feeds, the other rails of the domain (for a module: of a non-isolated domain); the engine
 * decides the rest (duty limits, ratings, windows).
 * - boost: a positive non-isolated rail whose lowest value (band minimum) is above the
 *   input's highest (source vMax, or the feeding rail's band maximum);
 * - four-switch buck-boost: a positive non-isolated rail a buck cannot be sure to serve (it is
 *   not below the generic largest duty × the input's lowest) and a boost cannot either (it is
 *   not above the input's highest);
 * - inverting: a negative non-isolated rail from a positive input;
 * - isolated module: a rail of an isolated domain from a positive input of a non-isolated one;
 * - load switch: a rail that draws nothing in some mode (gated per mode), from an input of the
 *   same domain whose whole range lies inside the rail's band (the switch passes its input).
 * Quiet rails take none of the switching kinds directly (common practice, as for the buck) and
 * feed nothing but quiet rails; no switching stage runs from a quiet rail.
 */
function newKindShapes(f: BlockFactory, opts: GenerationOptions, i: number): BlockShape[] {
  const rails = f.ctx.rails;
  const r = rails[i]!;
  const out: BlockShape[] = [];
  const iso = f.isolated(i);
  const quiet = r.noiseClass === 'quiet';
  const band = railBand(r);
  type In = { input: FeedInput; min: number; max: number; positive: boolean; isolated: boolean; quiet: boolean; domainId: Id | null };
  const inputs: In[] = f.req.sources.map((s) => ({ input: { kind: 'source', id: s.id }, min: s.vMin, max: s.vMax, positive: s.vMin > 0, isolated: false, quiet: false, domainId: null }));
  if (opts.allowRailFeeds) {
    rails.forEach((u, j) => {
      if (j === i) return;
      const b = railBand(u);
      inputs.push({ input: { kind: 'rail', rail: j }, min: b.min, max: b.max, positive: u.voltage > 0, isolated: f.isolated(j), quiet: u.noiseClass === 'quiet', domainId: u.domainId });
    });
  }
  const sameDomain = (x: In) => x.domainId === null ? !iso : x.domainId === r.domainId;
  if (!quiet && !iso && r.voltage > 0) {
    for (const x of inputs) {
      if (!x.positive || x.quiet || !sameDomain(x)) continue;
      if (opts.allowed.has('boost') && band.min > x.max) out.push({ kind: 'boost', input: x.input, rail: i });
      // A buck reaches at most Dmax·Vin: from the generic largest duty up, only a step-up-and-down
      // stage is sure to serve the rail (a library buck with a larger duty may compete).
      const buckCan = r.voltage < BUCK_MAX_DUTY * x.min;
      if (opts.allowed.has('buck-boost-4s') && !buckCan && !(band.min > x.max) && !(x.input.kind === 'rail' && rails[x.input.rail]!.voltage === r.voltage)) {
        out.push({ kind: 'buck-boost-4s', input: x.input, rail: i });
      }
    }
  }
  if (opts.allowed.has('inverting') && !quiet && !iso && r.voltage < 0) {
    for (const x of inputs) if (x.positive && !x.quiet && sameDomain(x)) out.push({ kind: 'inverting', input: x.input, rail: i });
  }
  if (opts.allowed.has('iso-module') && !quiet && iso) {
    for (const x of inputs) if (x.positive && !x.quiet && !x.isolated) out.push({ kind: 'iso-module', input: x.input, rail: i });
  }
  if (opts.allowed.has('load-switch') && r.voltage > 0) {
    const peak = Math.max(...f.ctx.modeIds.map((m) => r.current[m] ?? 0));
    const offModes = f.ctx.modeIds.filter((m) => !((r.current[m] ?? 0) > 0));
    if (peak > 0 && offModes.length) {
      for (const x of inputs) {
        if (!x.positive || !sameDomain(x) || (x.quiet && !quiet)) continue;
        if (x.min >= band.min - 1e-12 && x.max <= band.max + 1e-12) out.push({ kind: 'load-switch', input: x.input, rail: i, offModes });
      }
    }
  }
  return out;
}

/** Size of the decision space: candidate feeds and coupled-winding primaries (counted, not listed). */
export function spaceSize(f: BlockFactory, opts: GenerationOptions): { candidates: number; primaries: number } {
  const { singles, primaries, groups } = enumerateShapes(f, opts);
  const n = f.ctx.rails.length;
  let candidates = singles.length;
  for (const p of primaries) {
    const m = n - (p.primary === null ? 0 : 1);
    for (let k = 1; k <= Math.min(opts.maxSecondaries, m); k++) candidates += binomial(m, k);
    // A shared tap's winding and 0…m − 1 other secondaries.
    if (opts.maxSecondaries >= 1) {
      for (const g of groups) {
        const others = m - g.length;
        for (let k = 0; k <= Math.min(opts.maxSecondaries - 1, others); k++) candidates += binomial(others, k);
      }
    }
  }
  return { candidates, primaries: primaries.length };
}

function binomial(m: number, k: number): number {
  let c = 1;
  for (let i = 1; i <= k; i++) c = (c * (m - k + i)) / i;
  return Math.round(c);
}

function cw(p: { primary: number | null; busVoltage?: number; source: Source }, secondaries: number[], sharedTap?: number[]): BlockShape {
  return {
    kind: 'cwbuck', input: { kind: 'source', id: p.source.id }, primary: p.primary,
    ...(p.busVoltage !== undefined ? { busVoltage: p.busVoltage } : {}), secondaries,
    ...(sharedTap ? { sharedTap: [...sharedTap] } : {}),
  };
}

/**
 * Voltage of an internal primary bus: the largest of 3.3, 5 and 12 V that keeps the duty at
 * Vin min ≤ 0.6 (DESIGN §4: regulation of the secondaries collapses at high duty; common practice).
 */
export function busVoltageFor(vinMin: number): number {
  let best = 0;
  for (const v of [3.3, 5, 12]) if (v <= 0.6 * vinMin) best = v;
  return best;
}

/**
 * Generate and evaluate every candidate block, one shape per `yield` (so a solver can step
 * through it and stop at its budget). Returns the feasible blocks and each rail's misses.
 */
export function* generateBlocks(
  f: BlockFactory, opts: GenerationOptions,
  /** Filled as generation goes, so a caller that stops early keeps what was designed. */
  /** `uncoveredOnly`, set by the caller mid-way, skips every shape that serves no rail still without a feasible feed. */
  into: { blocks: Block[]; misses: Map<number, Miss[]>; designed?: number; uncoveredOnly?: boolean } = { blocks: [], misses: new Map() },
): Generator<void, { blocks: Block[]; misses: Map<number, Miss[]> }> {
  const blocks = into.blocks;
  const misses = into.misses;
  const noteMiss = (shape: BlockShape, rej: Rejection[]) => {
    for (const r of rej) {
      const rail = r.rail ?? BlockFactory.covers(shape)[0];
      if (rail === undefined) continue;
      const list = misses.get(rail) ?? [];
      list.push({ shape, rejection: r });
      misses.set(rail, list);
    }
  };
  into.designed = 0;
  // Rails with a feasible feed so far.
  const covered = new Set<number>();
  for (const b of blocks) for (const r of b.covers) covered.add(r);
  const servesUncovered = (s: BlockShape) => BlockFactory.covers(s).some((r) => !covered.has(r));
  /** In the caller's rescue mode, shapes that serve only covered rails are passed over. */
  const skip = (s: BlockShape) => into.uncoveredOnly === true && !servesUncovered(s);
  const add = (shape: BlockShape): boolean => {
    const res = f.evaluate(shape);
    into.designed = (into.designed ?? 0) + 1;
    if (!res.ok) { noteMiss(shape, res.rejections); return false; }
    const covers = BlockFactory.covers(shape);
    blocks.push({ index: blocks.length, key: BlockFactory.shapeKey(shape), shape, covers, base: res.eval, score: 0 });
    for (const r of covers) covered.add(r);
    return true;
  };
  const { singles, coupled, shared, primaries, groups } = enumerateShapes(f, opts);
  for (const s of singles) { if (skip(s)) continue; add(s); yield; }
  // Every winding set from 1 to maxSecondaries secondaries on every primary. No set is
  // skipped: a set whose subsets all miss can still be feasible (a ±12 V pair on a 5 V primary
  // where each winding alone misses its window), so no subset rule is sound for the engine
  // (docs/planner.md). The subset rule only orders the work, so that a budget cut keeps the
  // likeliest sets: first every one-secondary set, then by size the sets whose subsets of one
  // fewer secondary all designed, then by size every other set.
  const feasible = new Set<string>();
  const designed = new Set<string>();
  const key = (s: BlockShape) => BlockFactory.shapeKey(s);
  const promising = (s: BlockShape & { kind: 'cwbuck' }) =>
    s.secondaries.every((_, d) => feasible.has(key({ ...s, secondaries: s.secondaries.filter((__, k) => k !== d) })));
  // Rails with a feasible feed so far. A rail that none of the one-secondary sets serves may
  // still be served by a pair (a winding that misses alone can fit beside another), so the
  // pairs and triples that serve a rail still without a feed go before the rest, so that a
  // budget cut leaves a tree whenever one is reachable. This only orders the work: every set
  // is still designed when the budget allows.
  const design = (s: BlockShape) => { designed.add(key(s)); if (add(s)) feasible.add(key(s)); };
  for (const s of coupled(1)) { if (skip(s)) continue; design(s); yield; }
  // Under the magnetics-per-domain limit (default one) an isolated domain's rails must share
  // few magnetics, so the sets whose secondaries all lie in one isolated domain go next
  // (largest first: one magnetic then serves most of the domain), so that a budget cut still
  // leaves a tree within the limit. This only orders the work.
  for (const s of withinIsolatedDomains(f, opts, primaries, groups)) {
    if (designed.has(key(s)) || skip(s)) continue;
    design(s);
    yield;
  }
  // A shared tap alone (one winding, an LDO per rail) is a one-winding block too.
  for (const s of shared(true)) { if (designed.has(key(s)) || skip(s)) continue; design(s); yield; }
  for (let size = 2; size <= Math.min(3, opts.maxSecondaries); size++) {
    for (const s of coupled(size)) {
      if (designed.has(key(s)) || !servesUncovered(s)) continue;
      design(s);
      yield;
    }
  }
  for (let size = 2; size <= opts.maxSecondaries; size++) {
    for (const s of coupled(size)) {
      if (s.kind !== 'cwbuck' || designed.has(key(s)) || skip(s) || !promising(s)) continue;
      design(s);
      yield;
    }
  }
  for (let size = 2; size <= opts.maxSecondaries; size++) {
    for (const s of coupled(size)) {
      if (designed.has(key(s)) || skip(s)) continue;
      design(s);
      yield;
    }
  }
  // A shared tap beside other windings, last: every one of them is designed when the budget allows.
  // (Passed-over shapes also yield now and then, so that a caller keeps its clock.)
  let passed = 0;
  for (const s of shared(false)) {
    if (designed.has(key(s)) || skip(s)) { if (++passed % 2000 === 0) yield; continue; }
    design(s);
    yield;
  }
  return { blocks, misses };
}

/**
 * The winding sets whose rails all lie in one isolated domain: 2…m one-rail windings, and a
 * shared tap with 1…m − 1 further windings of the same domain, on every primary (generated
 * from each domain's rails, not filtered from every set).
 */
function* withinIsolatedDomains(
  f: BlockFactory, opts: GenerationOptions, primaries: { primary: number | null; busVoltage?: number; source: Source }[], groups: number[][],
): Generator<BlockShape> {
  const byDomain = new Map<Id, number[]>();
  f.ctx.rails.forEach((r, i) => { if (f.isolated(i)) byDomain.set(r.domainId, [...(byDomain.get(r.domainId) ?? []), i]); });
  const combos = function* (xs: number[], k: number): Generator<number[]> {
    if (k > xs.length || k < 1) return;
    const idx = Array.from({ length: k }, (_, q) => q);
    for (;;) {
      yield idx.map((q) => xs[q]!);
      let q = k - 1;
      while (q >= 0 && idx[q] === xs.length - k + q) q--;
      if (q < 0) return;
      idx[q]!++;
      for (let z = q + 1; z < k; z++) idx[z] = idx[z - 1]! + 1;
    }
  };
  for (let size = opts.maxSecondaries; size >= 2; size--) {
    for (const p of primaries) for (const list of byDomain.values()) for (const c of combos(list, size)) yield cw(p, c);
  }
  for (const p of primaries) {
    for (const g of groups) {
      const rest = (byDomain.get(f.ctx.rails[g[0]!]!.domainId) ?? []).filter((x) => !g.includes(x));
      for (let k = 1; k <= opts.maxSecondaries - 1; k++) for (const c of combos(rest, k)) yield cw(p, [...g, ...c].sort((a, b) => a - b), g);
    }
  }
}

/** Run generateBlocks to the end. */
export function buildBlocks(f: BlockFactory, opts: GenerationOptions): { blocks: Block[]; misses: Map<number, Miss[]> } {
  const g = generateBlocks(f, opts);
  for (;;) {
    const r = g.next();
    if (r.done) return r.value;
  }
}
