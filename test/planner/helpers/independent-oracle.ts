/**
 * Test-only independent oracle (issue 11 item 5). It shares no code with the planner's
 * candidate generator, search or selection evaluation: it enumerates every assignment of a
 * feed to each rail in the decision space stated in docs/planner.md, keeps the assignments
 * that form a tree (every magnetic has its primary and 1…maxSecondaries secondaries, no feed
 * loops), designs each stage of each tree directly through the stage engine (designStage,
 * evaluateStage, stageWindows) with the load of the stages it feeds, and returns the best
 * weighted score. It re-implements the documented per-block design rules (design currents
 * rounded outward to two significant digits, tap + LDO after a direct miss, tap choices in
 * order; the turns-ratio and rectifier-voltage limits; every block must also design without
 * its downstream load; one tap winding shared by 2–4 rails of one isolated domain and sign,
 * each through its own LDO, the tap set for the highest; at most
 * limits.maxMagneticsPerIsolatedDomain magnetics into each isolated domain) from the text, not from
 * the planner's code. Small cases only (≤ 6 rails).
 *
 * Shared with the planner only what defines the problem: the requirements, the rails
 * (groupRails), the objective (makeScorer: the weighted score of docs/planner.md), the
 * cost model's prices and the tap choices (TAP_VARIANTS, a table of the stated space).
 */
import { designStage, evaluateStage, stageWindows, type StageDesign } from '../../../src-main/engine/stages/index.ts';
import type { OutputSpec, OutputWindow, StageEvaluation, StageSpec } from '../../../src-main/engine/stages/types.ts';
import { DEFAULT_MAX_MAGNETICS_PER_DOMAIN, DEFAULT_MAX_RECTIFIER_VOLTAGE, DEFAULT_MAX_TURNS_RATIO, type Domain, type Rail, type Requirements, type StageKind } from '../../../src-main/engine/model.ts';
import { groupRails } from '../../../src-main/engine/rails.ts';
import { makeScorer, type Objective } from '../../../src-main/engine/planner/score.ts';
import { TAP_VARIANTS } from '../../../src-main/engine/planner/candidates.ts';
import { countParts, emptyParts } from '../../../src-main/engine/planner/cost-model.ts';
import type { CostModel, PartCounts } from '../../../src-main/engine/planner/types.ts';
import type { Amps, Celsius, Hertz, Ratio, Volts } from '../../../src-main/engine/units.ts';

export const INDEPENDENT_ORACLE_MAX_RAILS = 6;

/** One magnetic of the space: a source and a primary (rail index, or null = internal bus). */
interface Magnetic { source: number; primary: number | null; bus: number }

type Feed =
  | { kind: 'buck-src'; source: number }
  | { kind: 'buck-rail'; from: number }
  | { kind: 'ldo'; from: number }
  /** A boost, four-switch buck-boost or inverting stage for this rail alone, from a source or a rail. */
  | { kind: 'step-src'; stage: StepKind; source: number }
  | { kind: 'step-rail'; stage: StepKind; from: number }
  | { kind: 'primary'; mag: number }
  /** `group`: which of the magnetics on an internal bus (a bus primary may carry several). */
  | { kind: 'secondary'; mag: number; group: number }
  /** Behind the magnetic's one shared tap winding, through an LDO of its own. */
  | { kind: 'shared'; mag: number; group: number };

/** Largest number of rails on one shared tap winding [the stated space, docs/planner.md]. */
const SHARED_TAP_MAX = 4;

type StepKind = 'boost' | 'buck-boost-4s' | 'inverting';
/** Largest duty of the generic buck controller [the planner's stated space, docs/planner.md]. */
const BUCK_DMAX = 0.9;

interface StageResult { loss: number[]; iin: number[]; iinAtMin: number[]; cost: number; parts: number }

export interface IndependentOracleResult {
  bestScore: number;
  /** Trees (valid assignments) designed. */
  trees: number;
  /** False when stopped by the time cap (then bestScore is only an upper bound). */
  complete: boolean;
  /** Describes the best tree: one entry per rail, its feed. */
  bestFeeds: string[] | null;
}

const gridUp = (x: number) => { if (!(x > 0)) return 0; const st = 10 ** (Math.floor(Math.log10(x)) - 1); return Math.ceil(x / st - 1e-9) * st; };
const gridDown = (x: number) => { if (!(x > 0)) return 0; const st = 10 ** (Math.floor(Math.log10(x)) - 1); return Math.floor(x / st + 1e-9) * st; };

export class IndependentOracle {
  readonly rails: Rail[];
  private readonly domains: Map<string, Domain>;
  private readonly mags: Magnetic[] = [];
  private readonly designs = new Map<string, { ok: true; design: StageDesign } | { ok: false }>();
  private readonly blockCache = new Map<string, StageResult | null>();
  private readonly hint = new Map<string, number>();
  private readonly kinds: Set<StageKind>;
  private readonly shares: number[];
  private readonly modeIds: string[];

  constructor(readonly req: Requirements, readonly costModel: CostModel, readonly railFeeds = true) {
    this.rails = groupRails(req);
    if (this.rails.length > INDEPENDENT_ORACLE_MAX_RAILS) throw new RangeError(`the independent oracle handles up to ${INDEPENDENT_ORACLE_MAX_RAILS} rails`);
    this.domains = new Map(req.domains.map((d) => [d.id, d]));
    this.kinds = new Set(req.preferences.allowedKinds);
    this.shares = req.modes.map((m) => m.share);
    this.modeIds = req.modes.map((m) => m.id);
    if (this.kinds.has('cwbuck') && req.preferences.maxSecondaries >= 1) {
      const needsBus = this.rails.some((r) => this.iso(r) || r.voltage < 0);
      req.sources.forEach((s, si) => {
        this.rails.forEach((r, i) => {
          if (!this.iso(r) && r.voltage > 0 && r.voltage < s.vMin && r.noiseClass !== 'quiet') this.mags.push({ source: si, primary: i, bus: 0 });
        });
        let bus = 0;
        for (const v of [3.3, 5, 12]) if (v <= 0.6 * s.vMin) bus = v;
        if (needsBus && bus > 0) this.mags.push({ source: si, primary: null, bus });
      });
    }
  }

  private iso(r: Rail): boolean { return (this.domains.get(r.domainId)?.isolation ?? 'none') !== 'none'; }

  /** Every feed a rail may take in the stated space. */
  private feedsOf(i: number): Feed[] {
    const r = this.rails[i]!;
    const out: Feed[] = [];
    const quiet = r.noiseClass === 'quiet';
    if (this.kinds.has('buck') && r.voltage > 0 && !quiet) {
      if (!this.iso(r)) this.req.sources.forEach((s, si) => { if (r.voltage < s.vMin) out.push({ kind: 'buck-src', source: si }); });
      if (this.railFeeds) {
        this.rails.forEach((u, j) => {
          if (j !== i && u.domainId === r.domainId && u.voltage > r.voltage && u.noiseClass !== 'quiet') out.push({ kind: 'buck-rail', from: j });
        });
      }
    }
    if (this.kinds.has('ldo') && this.railFeeds) {
      this.rails.forEach((u, j) => {
        if (j !== i && u.domainId === r.domainId && Math.sign(u.voltage) === Math.sign(r.voltage) && Math.abs(u.voltage) > Math.abs(r.voltage) && (u.noiseClass !== 'quiet' || quiet)) {
          out.push({ kind: 'ldo', from: j });
        }
      });
    }
    // The one-rail step kinds, from the table of docs/planner.md ("Decision space"), written
    // from that text: inputs are the sources (for a non-isolated rail) and, with rail feeds,
    // the positive non-quiet rails of the same domain.
    if (!quiet && !this.iso(r)) {
      const lo = Math.abs(r.voltage) * (1 - r.tolerance);
      const ins: { src?: number; from?: number; min: number; max: number; v?: number }[] = this.req.sources.map((s, si) => ({ src: si, min: s.vMin, max: s.vMax }));
      if (this.railFeeds) {
        this.rails.forEach((u, j) => {
          if (j !== i && u.domainId === r.domainId && u.voltage > 0 && u.noiseClass !== 'quiet') ins.push({ from: j, min: u.voltage * (1 - u.tolerance), max: u.voltage * (1 + u.tolerance), v: u.voltage });
        });
      }
      const add = (stage: StepKind, x: (typeof ins)[number]) => out.push(x.src !== undefined ? { kind: 'step-src', stage, source: x.src } : { kind: 'step-rail', stage, from: x.from! });
      for (const x of ins) {
        if (r.voltage > 0) {
          const up = lo > x.max;
          if (up && this.kinds.has('boost')) add('boost', x);
          if (!up && this.kinds.has('buck-boost-4s') && r.voltage >= BUCK_DMAX * x.min && x.v !== r.voltage) add('buck-boost-4s', x);
        } else if (r.voltage < 0 && this.kinds.has('inverting')) add('inverting', x);
      }
    }
    // A rail of an isolated domain may also sit behind a magnetic's shared tap (LDOs needed).
    const canShare = this.iso(r) && r.voltage !== 0 && this.kinds.has('ldo');
    this.mags.forEach((m, k) => {
      if (m.primary === i) out.push({ kind: 'primary', mag: k });
      else if (m.primary !== null) {
        out.push({ kind: 'secondary', mag: k, group: 0 });
        if (canShare) out.push({ kind: 'shared', mag: k, group: 0 });
      } else {
        for (let g = 0; g < this.rails.length; g++) {
          out.push({ kind: 'secondary', mag: k, group: g });
          if (canShare) out.push({ kind: 'shared', mag: k, group: g });
        }
      }
    });
    return out;
  }

  /** Enumerate every assignment; design and score every tree. */
  best(objective: Objective = 'balanced', opts: { maxMs?: number } = {}): IndependentOracleResult {
    const scorer = makeScorer(objective, this.req, { rails: this.rails, modeIds: this.modeIds, shares: this.shares }, this.costModel);
    const stopAt = opts.maxMs !== undefined ? performance.now() + opts.maxMs : Infinity;
    const n = this.rails.length;
    const options = this.rails.map((_, i) => this.feedsOf(i));
    const assign: Feed[] = new Array(n);
    let best = Infinity;
    let bestFeeds: string[] | null = null;
    let trees = 0;
    let stopped = false;
    const maxSec = this.req.preferences.maxSecondaries;
    const rec = (i: number): void => {
      if (stopped) return;
      if (i === n) {
        // A tree: each used magnetic has its primary rail (if any) and 1…maxSecondaries secondaries.
        // Magnetic instances: (magnetic, group); bus groups must be numbered in order of first
        // appearance (each partition of the bus's secondaries counted once).
        const secs = new Map<string, { mag: number; rails: number[]; shared: number[] }>();
        const prims = new Set<number>();
        const nextGroup = new Map<number, number>();
        for (let r = 0; r < n; r++) {
          const f = assign[r]!;
          if (f.kind === 'secondary' || f.kind === 'shared') {
            const key = `${f.mag}|${f.group}`;
            if (!secs.has(key)) {
              const g = nextGroup.get(f.mag) ?? 0;
              if (f.group !== g) return;
              nextGroup.set(f.mag, g + 1);
              secs.set(key, { mag: f.mag, rails: [], shared: [] });
            }
            secs.get(key)!.rails.push(r);
            if (f.kind === 'shared') secs.get(key)!.shared.push(r);
          }
          if (f.kind === 'primary') prims.add(f.mag);
        }
        const usedMags = new Set<number>();
        const perDomain = new Map<string, number>();
        for (const { mag, rails, shared } of secs.values()) {
          const m = this.mags[mag]!;
          usedMags.add(mag);
          // Windings: each direct or tapped rail one, the shared tap one for all its rails.
          const windings = rails.length - shared.length + (shared.length ? 1 : 0);
          if (windings > maxSec) return;
          if (shared.length === 1 || shared.length > SHARED_TAP_MAX) return;
          if (shared.some((x) => this.rails[x]!.domainId !== this.rails[shared[0]!]!.domainId || Math.sign(this.rails[x]!.voltage) !== Math.sign(this.rails[shared[0]!]!.voltage))) return;
          if (m.primary !== null && !prims.has(mag)) return;
          for (const d of new Set(rails.filter((x) => this.iso(this.rails[x]!)).map((x) => this.rails[x]!.domainId))) perDomain.set(d, (perDomain.get(d) ?? 0) + 1);
        }
        // At most maxMagneticsPerIsolatedDomain magnetics into each isolated domain.
        const magLimit = this.req.limits.maxMagneticsPerIsolatedDomain ?? DEFAULT_MAX_MAGNETICS_PER_DOMAIN;
        for (const c of perDomain.values()) if (c > magLimit) return;
        for (const k of prims) if (!usedMags.has(k)) return;
        // No feed loops (rail feeds).
        const state = new Array<number>(n).fill(0);
        const visit = (r: number): boolean => {
          if (state[r] === 2) return true;
          if (state[r] === 1) return false;
          state[r] = 1;
          const f = assign[r]!;
          if ((f.kind === 'buck-rail' || f.kind === 'ldo' || f.kind === 'step-rail') && !visit(f.from)) return false;
          state[r] = 2;
          return true;
        };
        for (let r = 0; r < n; r++) if (!visit(r)) return;
        trees++;
        if ((trees & 63) === 0 && performance.now() > stopAt) { stopped = true; return; }
        // Every block of the space designs without downstream load too (docs/planner.md).
        const s = this.scoreTree(assign, secs, scorer.score);
        if (s < best - 1e-12) { best = s; bestFeeds = assign.map((f, r) => `${this.rails[r]!.name}: ${this.describe(f)}`); }
        return;
      }
      for (const f of options[i]!) { assign[i] = f; rec(i + 1); }
    };
    rec(0);
    return { bestScore: best, trees, complete: !stopped, bestFeeds };
  }

  private describe(f: Feed): string {
    switch (f.kind) {
      case 'buck-src': return `buck from ${this.req.sources[f.source]!.name}`;
      case 'buck-rail': return `buck from ${this.rails[f.from]!.name}`;
      case 'ldo': return `LDO from ${this.rails[f.from]!.name}`;
      case 'step-src': return `${f.stage} from ${this.req.sources[f.source]!.name}`;
      case 'step-rail': return `${f.stage} from ${this.rails[f.from]!.name}`;
      default: {
        const m = this.mags[f.mag]!;
        return `${f.kind} of the magnetic with ${m.primary === null ? `a ${m.bus} V bus` : this.rails[m.primary]!.name} as primary`;
      }
    }
  }

  /** Score of one tree with every stage designed for the load it carries, or Infinity. */
  private scoreTree(assign: Feed[], secs: Map<string, { mag: number; rails: number[]; shared: number[] }>, score: (e: { loss: number; cost: number; parts: number }) => number): number {
    const n = this.rails.length;
    const nm = this.modeIds.length;
    // Downstream input current on each rail, per mode: filled from the leaves up.
    const extra: number[][] = this.rails.map(() => new Array<number>(nm).fill(0));
    const fromRail = (f: Feed): f is Feed & { from: number } => f.kind === 'buck-rail' || f.kind === 'ldo' || f.kind === 'step-rail';
    const depth = (r: number): number => { const f = assign[r]!; return fromRail(f) ? 1 + depth(f.from) : 0; };
    // A magnetic's rails are all at depth 0 (fed from a source); rail-fed stages go deepest first.
    const railFed = [...Array(n).keys()].filter((r) => fromRail(assign[r]!)).sort((a, b) => depth(b) - depth(a));
    let loss = 0, cost = 0, parts = 0;
    const sourceI = this.req.sources.map(() => new Array<number>(nm).fill(0));
    const account = (res: StageResult) => {
      loss += res.loss.reduce((a, l, m) => a + l * (this.shares[m] ?? 0), 0);
      cost += res.cost; parts += res.parts;
    };
    for (const r of railFed) {
      const f = assign[r] as Feed & { from: number };
      const kind = f.kind === 'ldo' ? 'ldo' : f.kind === 'step-rail' ? f.stage : 'buck';
      const res = this.simpleStage(kind, { rail: f.from }, r, this.currents(r, extra[r]!));
      if (!res || !this.simpleStage(kind, { rail: f.from }, r, this.own(r))) return Infinity;
      account(res);
      for (let m = 0; m < nm; m++) extra[f.from]![m]! += res.iin[m]!;
    }
    for (let r = 0; r < n; r++) {
      const f = assign[r]!;
      if (f.kind !== 'buck-src' && f.kind !== 'step-src') continue;
      const kind = f.kind === 'step-src' ? f.stage : 'buck';
      const res = this.simpleStage(kind, { source: f.source }, r, this.currents(r, extra[r]!));
      if (!res || !this.simpleStage(kind, { source: f.source }, r, this.own(r))) return Infinity;
      account(res);
      for (let m = 0; m < nm; m++) sourceI[f.source]![m]! += res.iinAtMin[m]!;
    }
    for (const { mag, rails, shared } of secs.values()) {
      const m = this.mags[mag]!;
      const sorted = rails.slice().sort((a, b) => a - b);
      const group = shared.slice().sort((a, b) => a - b);
      const res = this.coupled(m, sorted, (r) => this.currents(r, extra[r]!), group);
      if (!res || !this.coupled(m, sorted, (r) => this.own(r), group)) return Infinity;
      account(res);
      for (let q = 0; q < nm; q++) sourceI[m.source]![q]! += res.iinAtMin[q]!;
    }
    for (let si = 0; si < this.req.sources.length; si++) {
      for (let q = 0; q < nm; q++) if (sourceI[si]![q]! > this.req.sources[si]!.currentLimit * (1 + 1e-9)) return Infinity;
    }
    return score({ loss, cost, parts });
  }

  /** A rail's own load currents per mode (no downstream stages). */
  private own(r: number): number[] { return this.currents(r, this.modeIds.map(() => 0)); }

  private currents(r: number, extra: readonly number[]): number[] {
    const rail = this.rails[r]!;
    return this.modeIds.map((m, i) => (rail.current[m] ?? 0) + (extra[i] ?? 0));
  }

  private band(input: { source: number } | { rail: number }): { min: number; nom: number; max: number; ripple: number; sign: number } {
    if ('source' in input) { const s = this.req.sources[input.source]!; return { min: s.vMin, nom: s.vNom, max: s.vMax, ripple: 0, sign: 1 }; }
    const u = this.rails[input.rail]!;
    const a = Math.abs(u.voltage);
    return { min: a * (1 - u.tolerance), nom: a, max: a * (1 + u.tolerance), ripple: u.rippleLimit, sign: Math.sign(u.voltage) || 1 };
  }

  private spec(kind: StageKind, vin: { min: number; nom: number; max: number; ripple: number; sign: number }, outputs: OutputSpec[]): StageSpec {
    const l = this.req.limits;
    const [lo, hi] = vin.sign < 0 ? [-vin.max, -vin.min] : [vin.min, vin.max];
    return {
      kind, vinMin: lo as Volts, vinNom: (vin.sign * vin.nom) as Volts, vinMax: hi as Volts, vinRipple: vin.ripple as Volts, outputs,
      fsw: this.req.preferences.switchingFrequency as Hertz, ambient: l.ambient as Celsius,
      tjMax: (l.tjMax - l.tjMargin) as Celsius, ceramicDerating: l.ceramicDerating as Ratio,
    };
  }

  private out(r: number, currents: number[]): OutputSpec {
    const rail = this.rails[r]!;
    return { nodeId: rail.id, voltage: rail.voltage, tolerance: rail.tolerance, currentMin: Math.min(...currents) as Amps, currentMax: Math.max(...currents) as Amps, rippleLimit: rail.rippleLimit };
  }

  /**
   * Design and check one stage: design for the rounded-out currents; at Vin min and max with
   * full load every error flag, Tj ≤ tjMax − margin and ripple; windows over Vin {min, nom,
   * max} × each output's current range; then each mode at Vin nominal and its exact currents.
   * Returns the per-mode evaluations, or the misses by output index ('window' or 'ripple').
   */
  private run(spec0: StageSpec, modeCurrents: number[][]): { ok: true; perMode: StageEvaluation[]; atMin: StageEvaluation; design: StageDesign } | { ok: false; misses: Map<number, { what: 'window' | 'ripple' | 'other'; by: number }> } {
    const spec: StageSpec = { ...spec0, outputs: spec0.outputs.map((o) => ({ ...o, currentMax: gridUp(o.currentMax) as Amps, currentMin: gridDown(o.currentMin) as Amps })) };
    const key = JSON.stringify(spec);
    let d = this.designs.get(key);
    if (!d) {
      try {
        const r = designStage(spec);
        d = r.ok ? { ok: true, design: r.design } : { ok: false };
      } catch {
        d = { ok: false };
      }
      this.designs.set(key, d);
    }
    const misses = new Map<number, { what: 'window' | 'ripple' | 'other'; by: number }>();
    if (!d.ok) { misses.set(0, { what: 'other', by: 0 }); return { ok: false, misses }; }
    const tjLimit = this.req.limits.tjMax - this.req.limits.tjMargin;
    const ambient = this.req.limits.ambient as Celsius;
    const checkEv = (ev: StageEvaluation) => {
      if (ev.flags.some((f) => f.severity === 'error') || ev.parts.some((p) => p.tj > tjLimit + 1e-9)) if (!misses.has(0)) misses.set(0, { what: 'other', by: 0 });
      ev.outputs.forEach((o, i) => {
        const lim = spec.outputs[i]?.rippleLimit ?? Infinity;
        if (o.ripplePP > lim * (1 + 1e-9) && !misses.has(i)) misses.set(i, { what: 'ripple', by: o.ripplePP - lim });
      });
    };
    const maxI = spec.outputs.map((o) => o.currentMax);
    const atMin = evaluateStage(d.design, { vin: spec.vinMin, iout: maxI, ambient });
    checkEv(atMin);
    checkEv(evaluateStage(d.design, { vin: spec.vinMax, iout: maxI, ambient }));
    if (misses.size) return { ok: false, misses };
    const windows: OutputWindow[] = stageWindows(d.design, { vin: [spec.vinMin, spec.vinNom, spec.vinMax], iout: spec.outputs.map((o) => ({ min: o.currentMin, max: o.currentMax })) });
    windows.forEach((w, i) => { if (!w.inside) misses.set(i, { what: 'window', by: Math.max(w.allowedMin - w.min, w.max - w.allowedMax, 0) }); });
    if (misses.size) return { ok: false, misses };
    const perMode = modeCurrents.map((c) => evaluateStage(d.design, { vin: spec.vinNom, iout: c as Amps[], ambient }));
    for (const ev of perMode) checkEv(ev);
    if (misses.size) return { ok: false, misses };
    return { ok: true, perMode, atMin, design: d.design };
  }

  private parts(kind: 'buck' | 'ldo' | 'cwbuck' | StepKind, secondaries = 0): PartCounts {
    const p = emptyParts();
    // A boost or inverting stage has a buck's parts; the four-switch stage two more switches and a sense resistor.
    if (kind === 'boost' || kind === 'inverting') Object.assign(p, { controller: 1, switch: 2, magnetic: 1, capacitor: 4, resistor: 2 });
    if (kind === 'buck-boost-4s') Object.assign(p, { controller: 1, switch: 4, magnetic: 1, capacitor: 4, resistor: 3 });
    if (kind === 'buck') Object.assign(p, { controller: 1, switch: 2, magnetic: 1, capacitor: 4, resistor: 2 });
    if (kind === 'ldo') Object.assign(p, { ldo: 1, capacitor: 2, resistor: 2 });
    if (kind === 'cwbuck') Object.assign(p, { controller: 1, switch: 2, coupledMagnetic: 1, rectifier: secondaries, capacitor: 4 + 2 * secondaries, resistor: 2 + secondaries });
    return p;
  }

  private simpleStage(kind: 'buck' | 'ldo' | StepKind, input: { source: number } | { rail: number }, r: number, currents: number[]): StageResult | null {
    const key = `${kind}|${JSON.stringify(input)}|${r}|${currents.join(',')}`;
    if (this.blockCache.has(key)) return this.blockCache.get(key)!;
    const vin = this.band(input);
    const res = this.run(this.spec(kind, vin, [this.out(r, currents)]), currents.map((c) => [c]));
    let v: StageResult | null = null;
    if (res.ok) {
      const p = this.parts(kind);
      const iin = res.perMode.map((e) => Math.abs(e.iin));
      v = { loss: res.perMode.map((e) => e.loss), iin, iinAtMin: iin.map((i) => i * (vin.nom / Math.max(vin.min, 1e-9))), cost: this.costModel.cost(p, kind), parts: countParts(p) };
    }
    this.blockCache.set(key, v);
    return v;
  }

  /**
   * One tap winding with tap choice `v` and an LDO per rail it feeds (one rail, or a shared
   * tap's rails): the tap is (highest |V| + headroom) / (1 − tolerance), rounded up to 0.1 V;
   * its ripple limit the smaller of 5 % of the tap and 20 × the tightest ripple limit; its
   * current per mode the sum of the LDOs' input currents, its design maximum at least every
   * LDO at its full-load input current at once. Null when an LDO fails.
   */
  private tap(group: number[], currentsOf: (r: number) => number[], v: number): { perMode: StageEvaluation[][]; out: OutputSpec; iin: number[]; tapV: number } | null {
    let top = group[0]!;
    for (const g of group) if (Math.abs(this.rails[g]!.voltage) > Math.abs(this.rails[top]!.voltage)) top = g;
    const rail = this.rails[top]!;
    const { tolerance: tol, headroom } = TAP_VARIANTS[v]!;
    const mag = Math.ceil(((Math.abs(rail.voltage) + headroom) / (1 - tol)) * 10) / 10;
    const ripple = Math.min(mag * 0.05, Math.min(...group.map((g) => this.rails[g]!.rippleLimit)) * 20);
    const sign = Math.sign(rail.voltage) || 1;
    const iin = this.modeIds.map(() => 0);
    let full = 0;
    const perMode: StageEvaluation[][] = [];
    for (const g of group) {
      const c = currentsOf(g);
      const res = this.run(this.spec('ldo', { min: mag * (1 - tol), nom: mag, max: mag * (1 + tol), ripple, sign }, [this.out(g, c)]), c.map((x) => [x]));
      if (!res.ok) return null;
      const gi = res.perMode.map((e) => Math.abs(e.iin));
      gi.forEach((x, q) => { iin[q]! += x; });
      full += Math.max(...gi, Math.abs(res.atMin.iin));
      perMode.push(res.perMode);
    }
    return {
      perMode, iin, tapV: mag,
      out: { nodeId: `tap:${rail.id}`, voltage: (sign * mag) as Volts, tolerance: tol as Ratio, currentMin: Math.min(...iin) as Amps, currentMax: Math.max(...iin, full) as Amps, rippleLimit: ripple as Volts },
    };
  }

  /**
   * One coupled-winding block, designed by the stated rule: quiet secondaries behind a tap;
   * others direct or from the choice their unloaded one-secondary block on this magnetic
   * settled on; a direct window or ripple miss takes the first tap choice; a tap window miss
   * takes the next choice whose tolerance covers the miss (and no smaller headroom); an LDO
   * that fails behind a tap takes the next choice in order.
   */
  private coupled(m: Magnetic, secondaries: number[], currentsOf: (r: number) => number[], shared: number[] = []): StageResult | null {
    const cs = new Map<number, number[]>();
    for (const r of [...secondaries, ...(m.primary !== null ? [m.primary] : [])]) cs.set(r, currentsOf(r));
    const unloaded = [...cs].every(([r, c]) => c.every((x, i) => x === (this.rails[r]!.current[this.modeIds[i]!] ?? 0)));
    const key = `cw|${m.source}|${m.primary}|${secondaries.join(',')}|t${shared.join(',')}|${[...cs].map(([r, c]) => `${r}:${c.join(',')}`).join(';')}`;
    if (this.blockCache.has(key)) return this.blockCache.get(key)!;
    const mk = `${m.source}|${m.primary}`;
    // The windings, in secondaries order: a rail each, and the shared tap (its rails) at the
    // place of its first rail, named by that first rail.
    const wind = new Map<number, number[]>();
    for (const s of secondaries) {
      if (!shared.includes(s)) wind.set(s, [s]);
      else if (s === shared[0]) wind.set(s, shared);
    }
    const choice = new Map<number, number>();
    if (shared.length) choice.set(shared[0]!, 0);
    for (const s of secondaries) {
      if (shared.includes(s)) continue;
      if (!this.hint.has(`${mk}|${s}`) && (secondaries.length > 1 || !unloaded)) {
        // The hint is the unloaded one-secondary block's settled choice: design it first.
        this.coupled(m, [s], (r) => this.currents(r, this.modeIds.map(() => 0)));
      }
      const h = this.hint.get(`${mk}|${s}`);
      if (h !== undefined && h >= 0) choice.set(s, h);
      else if (this.rails[s]!.noiseClass === 'quiet') choice.set(s, 0);
    }
    const nm = this.modeIds.length;
    const src = this.req.sources[m.source]!;
    const vin = { min: src.vMin, nom: src.vNom, max: src.vMax, ripple: 0, sign: 1 };
    let result: StageResult | null = null;
    for (let attempt = 0; attempt < 2 + 2 * TAP_VARIANTS.length; attempt++) {
      const taps = new Map<number, NonNullable<ReturnType<IndependentOracle['tap']>>>();
      let failed = false;
      for (const [s, v0] of choice) {
        let v = v0;
        const g = wind.get(s)!;
        let t = this.tap(g, (r) => cs.get(r)!, v);
        while (!t && v + 1 < TAP_VARIANTS.length) { v++; t = this.tap(g, (r) => cs.get(r)!, v); }
        choice.set(s, v);
        if (!t) { failed = true; break; }
        taps.set(s, t);
      }
      if (failed) break;
      const outputs: OutputSpec[] = [];
      const modeCurrents: number[][] = Array.from({ length: nm }, () => []);
      if (m.primary === null) {
        outputs.push({ nodeId: 'bus', voltage: m.bus as Volts, tolerance: 0.05 as Ratio, currentMin: 0 as Amps, currentMax: 0 as Amps, rippleLimit: (m.bus * 0.02) as Volts });
        for (let q = 0; q < nm; q++) modeCurrents[q]!.push(0);
      } else {
        const c = cs.get(m.primary)!;
        outputs.push(this.out(m.primary, c));
        for (let q = 0; q < nm; q++) modeCurrents[q]!.push(c[q]!);
      }
      for (const s of wind.keys()) {
        const t = taps.get(s);
        const c = t ? t.iin : cs.get(s)!;
        outputs.push(t ? t.out : this.out(s, c));
        for (let q = 0; q < nm; q++) modeCurrents[q]!.push(c[q]!);
      }
      // Strongest isolation class (then highest working voltage) among the secondaries' domains.
      const rank = { none: 0, functional: 1, basic: 2, reinforced: 3 } as const;
      let iso: { class: Domain['isolation']; workingVoltage: Volts } | null = null;
      const isoDomains = new Set<string>();
      for (const s of secondaries) {
        const d = this.domains.get(this.rails[s]!.domainId);
        if (!d || d.isolation === 'none') continue;
        isoDomains.add(d.id);
        if (!iso || rank[d.isolation] > rank[iso.class] || (rank[d.isolation] === rank[iso.class] && d.workingVoltage > iso.workingVoltage)) iso = { class: d.isolation, workingVoltage: d.workingVoltage };
      }
      const spec = Object.assign(this.spec('cwbuck', vin, outputs), { maxSecondaries: this.req.preferences.maxSecondaries, isolation: iso });
      const res = this.run(spec, modeCurrents);
      if (!res.ok) {
        let changed = false;
        [...wind.keys()].forEach((s, k) => {
          const miss = res.misses.get(k + 1);
          if (!miss || miss.what === 'other') return;
          const cur = choice.get(s);
          if (cur === undefined) { choice.set(s, 0); changed = true; return; }
          const need = TAP_VARIANTS[cur]!.tolerance + (miss.by / Math.abs(taps.get(s)?.tapV ?? 1)) * 1.1;
          let v = cur + 1;
          while (v < TAP_VARIANTS.length && (TAP_VARIANTS[v]!.tolerance < need || TAP_VARIANTS[v]!.headroom < TAP_VARIANTS[cur]!.headroom)) v++;
          if (v < TAP_VARIANTS.length) { choice.set(s, v); changed = true; }
        });
        if (!changed || !this.kinds.has('ldo')) break;
        continue;
      }
      // Design limits on the windings: turns ratio and rectifier reverse voltage.
      const cw = res.design as { primaryTurns: number; vinMax: number; outputs: { voltage: number }[]; secondaries: { turns: number; rectifierReverseVoltage: number }[] };
      // The limit is on the winding's steady reverse voltage n·(Vin,max − Vpri) + |Vout| (docs/planner.md).
      const steady = (w: { turns: number }, k: number) => (Math.abs(w.turns) / cw.primaryTurns) * (cw.vinMax - Math.abs(cw.outputs[0]!.voltage)) + Math.abs(cw.outputs[k + 1]!.voltage);
      const maxRatio = this.req.limits.maxTurnsRatio ?? DEFAULT_MAX_TURNS_RATIO;
      const maxVr = this.req.limits.maxRectifierVoltage ?? DEFAULT_MAX_RECTIFIER_VOLTAGE;
      if (cw.secondaries.some((w, k) => Math.abs(w.turns) / cw.primaryTurns > maxRatio * (1 + 1e-9) || steady(w, k) > maxVr * (1 + 1e-9))) break;
      const p = this.parts('cwbuck', wind.size);
      p.barrier = isoDomains.size;
      const ldoP = this.parts('ldo');
      const loss: number[] = res.perMode.map((e) => e.loss as number);
      for (const t of taps.values()) {
        for (const ldo of t.perMode) {
          for (const k of Object.keys(ldoP) as (keyof PartCounts)[]) p[k] += ldoP[k];
          ldo.forEach((e, q) => { loss[q]! += e.loss; });
        }
      }
      const iin = res.perMode.map((e) => Math.abs(e.iin));
      result = { loss, iin, iinAtMin: iin.map((i) => i * (vin.nom / Math.max(vin.min, 1e-9))), cost: this.costModel.cost(p, 'cwbuck'), parts: countParts(p) };
      if (secondaries.length === 1 && !shared.length && unloaded) this.hint.set(`${mk}|${secondaries[0]}`, choice.get(secondaries[0]!) ?? -1);
      break;
    }
    this.blockCache.set(key, result);
    return result;
  }
}
