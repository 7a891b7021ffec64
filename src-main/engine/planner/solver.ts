/**
 * The planner as a solver you can watch: `step()` does a bounded amount of work, `solve()`
 * runs to the end or the budget, `progress` and `best` are readable at any time, `cancel()`
 * stops at the next step, and `explain()` gives a readable trace.
 *
 * Phases: rails → candidate blocks (each designed and evaluated by the stage engine) → one
 * branch-and-bound per objective (the chosen objective first, then lowest loss, lowest cost,
 * fewest parts, balanced) → the PlanResult with the Pareto alternatives.
 *
 * Determinism: no randomness; every ordering is by score then by a stable key. The only
 * influence of the clock is the budget cut-off (`budgetMs`): a run that finishes within its
 * budget gives the same result every time; a cut run returns the incumbent at the cut.
 */
import { groupRails } from '../rails.ts';
import { DEFAULT_MAX_MAGNETICS_PER_DOMAIN, type Rail, type Requirements, type StageKind } from '../model.ts';
import { kindNames } from '../stages/registry.ts';
import type { Infeasibility, Plan, PlanLabel, PlanResult, PlanSpace } from '../plan-types.ts';
import { assemblePlan, explainInfeasible, type InfeasibleEntry } from './assemble.ts';
import { BlockFactory, generateBlocks, MAX_SHARED_TAP_RAILS, spaceSize, type GenerationOptions, type Miss } from './candidates.ts';
import { inventedCostModel } from './cost-model.ts';
import { generationOptions, railHasFeed } from './remedies.ts';
import { blockCrossings, makeScorer, OBJECTIVES, type Objective, type Scorer, type SelectionEval } from './score.ts';
import { branchAndBound, exactCoverExists, MAX_RAILS, type SearchOutcome } from './search.ts';
import type { Block, CostModel, StageEvaluator } from './types.ts';

export interface PlannerOptions {
  evaluator: StageEvaluator;
  /** Part prices; defaults to the invented estimates of cost-model.ts. */
  costModel?: CostModel;
  objective?: Objective;
  /** Overrides preferences.budgetMs. */
  budgetMs?: number;
  /** Feed rails from other rails (LDO, buck from a rail). Default true. */
  allowRailFeeds?: boolean;
  /** Milliseconds clock; defaults to performance.now. */
  now?: () => number;
  /** Search only the chosen objective (no alternatives). */
  singleObjective?: boolean;
  /** Check each remedy by re-planning before offering it (default true). */
  verifyRemedies?: boolean;
}

export type PlannerPhase = 'rails' | 'candidates' | 'search' | 'done';

export interface PlanProgress {
  phase: PlannerPhase;
  /** 0..1, rough. */
  fraction: number;
  candidates: number;
  explored: number;
  /** Objective being searched and its incumbent weighted score. */
  objective?: Objective;
  incumbent?: number;
  message: string;
}

/** Rails up to which the planner finishes its search (the proof) whatever the budget. */
export const EXACT_RAILS = 12;
/** Safety cap of an exact run (it never hangs). */
export const EXACT_SEARCH_CAP_MS = 60_000;

/** Share of the budget candidate design may use before the search starts with what it has. */
export const DESIGN_SHARE = 0.6;
/** Share up to which design goes on while some rail has no feasible feed yet. */
export const DESIGN_LATE_SHARE = 0.9;

/** Node cap of the source-only seeding search. */
const SEED_SEARCH_NODES = 20_000;

interface Seed { blocks: Block[]; score: number; sel: SelectionEval }

const LABEL_OF: Record<Objective, PlanLabel> = { loss: 'lowest-loss', cost: 'lowest-cost', parts: 'fewest-parts', balanced: 'balanced' };

export class PlanSolver {
  readonly objective: Objective;
  readonly budgetMs: number;
  progress: PlanProgress = { phase: 'rails', fraction: 0, candidates: 0, explored: 0, message: 'grouping rails' };
  best: Plan | null = null;
  private result: PlanResult | null = null;
  private cancelled = false;
  private readonly t0: number;
  private readonly now: () => number;
  private readonly trace: string[] = [];
  private rails: Rail[] = [];
  private factory: BlockFactory | null = null;
  private blocks: Block[] = [];
  private misses = new Map<number, Miss[]>();
  private gen: Generator<void, { blocks: Block[]; misses: Map<number, Miss[]> }> | null = null;
  private readonly queue: Objective[];
  private search: { objective: Objective; scorer: Scorer; it: Generator<void, SearchOutcome>; deadline: number; out: SearchOutcome } | null = null;
  private readonly found = new Map<Objective, { blocks: Block[]; sel: SelectionEval; complete: boolean; scorer: Scorer }>();
  private leafFailures = new Map<string, { count: number; example: NonNullable<SelectionEval['failure']> }>();
  private explored = 0;
  private allComplete = true;
  private earlyInfeasible: Infeasibility[] = [];
  private readonly costModel: CostModel;

  constructor(readonly req: Requirements, readonly options: PlannerOptions) {
    this.now = options.now ?? (() => performance.now());
    this.t0 = this.now();
    this.objective = options.objective ?? 'balanced';
    this.budgetMs = Math.max(1, options.budgetMs ?? req.preferences.budgetMs ?? 10_000);
    this.costModel = options.costModel ?? inventedCostModel();
    this.queue = options.singleObjective ? [this.objective] : [this.objective, ...OBJECTIVES.filter((o) => o !== this.objective)];
  }

  /**
   * The budget binds in every mode: up to EXACT_RAILS rails the search is exact and normally
   * proves its optimum well inside the budget; when the budget runs out first (a slow machine,
   * an adversarial instance) the planner returns the incumbent with `provedOptimal: false`, or
   * an explanation, and never runs past the budget. EXACT_SEARCH_CAP_MS caps the budget itself.
   */
  private get deadline(): number { return this.t0 + Math.min(this.budgetMs, EXACT_SEARCH_CAP_MS); }

  /**
   * Candidate design may use DESIGN_SHARE of the budget; the rest is kept for the search, so a
   * large space cut by the budget still gets searched (anytime) rather than left unsearched.
   */
  private get designDeadline(): number { return this.t0 + DESIGN_SHARE * Math.min(this.budgetMs, EXACT_SEARCH_CAP_MS); }

  /**
   * When candidate design stops: at the design share once the blocks designed so far can form a
   * tree (every rail fed exactly once); until then a search could not complete a tree, so design
   * goes on to DESIGN_LATE_SHARE of the budget. While some rail has no feasible feed at all, only
   * the shapes that serve such a rail are designed; once every rail has one but no exact cover
   * exists yet (a rail served only by a winding set that overlaps every other way to feed its
   * neighbours), every shape is designed in the usual order.
   */
  private designCutoff(): number {
    if (this.now() <= this.designDeadline) return this.designDeadline;
    const n = this.rails.length;
    if (this.coveredCount < n) {
      for (let i = this.coveredSeen; i < this.blocks.length; i++) for (const r of this.blocks[i]!.covers) if (!this.covered[r]) { this.covered[r] = 1; this.coveredCount++; }
      this.coveredSeen = this.blocks.length;
    }
    if (this.genState) this.genState.uncoveredOnly = this.coveredCount < n;
    return this.treeReachable() ? this.designDeadline : this.t0 + DESIGN_LATE_SHARE * Math.min(this.budgetMs, EXACT_SEARCH_CAP_MS);
  }
  /** Whether the blocks designed so far hold an exact cover of the rails (re-checked only when blocks were added). */
  private treeReachable(): boolean {
    if (this.coveredCount < this.rails.length) return false;
    if (this.reachableAt !== this.blocks.length) {
      this.reachableAt = this.blocks.length;
      // An unknown answer (node cap) counts as reachable: the search then decides.
      // Only covers within the magnetics-per-domain limit count (a tree must keep it).
      const ids = this.req.domains.map((d) => d.id);
      const domains = this.blocks.map((b) => (b.shape.kind === 'cwbuck' || b.shape.kind === 'iso-module' ? blockCrossings(b).map((d) => ids.indexOf(d)) : []));
      const limit = this.req.limits.maxMagneticsPerIsolatedDomain ?? DEFAULT_MAX_MAGNETICS_PER_DOMAIN;
      // The plain cover first (memoised on the open rails alone, fast), then the covers within
      // the limit (the counts make the states many; past the cap the answer is unknown, which
      // counts as reachable).
      const covers = this.blocks.map((b) => b.covers);
      this.reachable = exactCoverExists(this.rails.length, covers) !== false &&
        exactCoverExists(this.rails.length, covers, 50_000, { domains, limit }) !== false;
    }
    return this.reachable;
  }
  private reachableAt = -1;
  private reachable = false;
  private cutShare = DESIGN_SHARE;
  private covered = new Uint8Array(64);
  private coveredCount = 0;
  private coveredSeen = 0;

  cancel(): void { this.cancelled = true; }

  get done(): boolean { return this.result !== null; }

  /** Do up to `units` units of work (one candidate evaluation or one search node each). True when finished. */
  step(units = 200): boolean {
    if (this.result) return true;
    for (let u = 0; u < units; u++) {
      if (this.cancelled) { this.finish(); return true; }
      if (!this.advance()) return true;
      // A candidate design can take tens of milliseconds: look at the clock after each one.
      if (this.progress.phase === 'candidates' && this.now() > this.designCutoff()) break;
    }
    if (this.progress.phase === 'candidates' && this.gen && this.now() > this.designCutoff()) {
      // Out of time while designing candidates: search with the blocks designed so far.
      this.allComplete = false;
      this.cutShare = this.treeReachable() ? DESIGN_SHARE : DESIGN_LATE_SHARE;
      this.trace.push(`${Math.round(this.cutShare * 100)} % of the ${this.budgetMs} ms budget used while designing candidates; searching the ${this.genState?.designed ?? 0} of ${this.space?.candidates ?? 0} designed so far`);
      this.gen = null;
      this.candidatesCut = true;
      this.startSearches();
    }
    return this.result !== null;
  }

  /** Run to the end (or the budget, or cancel). */
  solve(): PlanResult {
    while (!this.step(500)) { /* keep going */ }
    return this.result!;
  }

  getResult(): PlanResult | null { return this.result; }

  explain(): string[] { return [...this.trace]; }

  /** The designed candidates (for tests, the oracle and the MILP check). */
  candidates(): { factory: BlockFactory | null; blocks: readonly Block[] } {
    return { factory: this.factory, blocks: this.blocks };
  }

  /** One unit of work. False when finished. */
  private advance(): boolean {
    switch (this.progress.phase) {
      case 'rails': return this.initRails();
      case 'candidates': {
        const r = this.gen!.next();
        if (r.done) {
          // Shapes passed over in the late phase were never designed: the space was cut.
          if (this.genState?.uncoveredOnly) { this.allComplete = false; this.candidatesCut = true; }
          this.blocks = r.value.blocks;
          this.misses = r.value.misses;
          this.gen = null;
          this.startSearches();
        } else {
          this.progress.candidates = this.factory!.evaluations;
          this.progress.fraction = Math.min(0.5, this.progress.fraction + 0.0005);
        }
        return !this.result;
      }
      case 'search': {
        if (!this.search) { this.nextSearch(); return !this.result; }
        const r = this.search.it.next();
        if (this.search.objective === this.objective && this.search.out.best !== this.seenBest) {
          this.seenBest = this.search.out.best;
          const t = this.now() - this.t0;
          this.firstFeasibleMs ??= t;
          this.bestFoundMs = t;
        }
        if (r.done) {
          this.recordSearch(r.value, true);
          this.search = null;
          this.nextSearch();
        } else {
          this.explored++;
          this.progress.explored = this.explored;
          // Cut at the objective's time share once it has an incumbent (or at twice the budget).
          if ((this.explored & 7) === 0) {
            const t = this.now();
            const has = this.search.out.best !== null || this.pendingSeed !== null;
            if ((t > this.search.deadline && has) || t > this.deadline) {
              this.trace.push(`objective ${this.search.objective}: time share used up after ${this.search.out.explored} nodes; keeping the incumbent`);
              this.recordSearch(this.search.out, false);
              this.search = null;
              this.nextSearch();
            }
          }
        }
        return !this.result;
      }
      default: return false;
    }
  }

  private initRails(): boolean {
    const req = this.req;
    const problems: Infeasibility[] = [];
    if (!req.sources.length) problems.push({ railId: '', constraint: 'input', shortfall: 0, unit: '', text: 'sources: the project has no input source', remedies: ['add a source'] });
    if (!req.modes.length) problems.push({ railId: '', constraint: 'input', shortfall: 0, unit: '', text: 'modes: the project has no operating mode', remedies: ['add an operating mode'] });
    for (const s of req.sources) {
      if (!(s.vMin > 0 && s.vMin <= s.vNom && s.vNom <= s.vMax)) problems.push({ railId: '', constraint: 'input', shortfall: 0, unit: 'V', text: `source ${s.name}: needs 0 < vMin ≤ vNom ≤ vMax (got ${s.vMin}, ${s.vNom}, ${s.vMax})`, remedies: ['correct the source voltages'] });
    }
    this.rails = groupRails(req);
    if (!this.rails.length) problems.push({ railId: '', constraint: 'input', shortfall: 0, unit: '', text: 'loads: the project has no loads, so there is nothing to feed', remedies: ['add loads'] });
    for (const r of this.rails) {
      const bad = Object.entries(r.current).find(([, a]) => !(Number.isFinite(a) && a >= 0));
      if (bad) problems.push({ railId: r.id, constraint: 'input', shortfall: 0, unit: 'A', text: `${r.name}: current in mode ${bad[0]} must be a finite number ≥ 0 (got ${bad[1]})`, remedies: ['correct the load currents'] });
      if (!req.domains.some((d) => d.id === r.domainId)) problems.push({ railId: r.id, constraint: 'input', shortfall: 0, unit: '', text: `${r.name}: domain ${r.domainId} does not exist`, remedies: ['assign the loads to an existing domain'] });
      if (!(r.tolerance > 0) || r.voltage === 0) problems.push({ railId: r.id, constraint: 'input', shortfall: 0, unit: '', text: `${r.name}: needs a non-zero voltage and a positive tolerance`, remedies: ['correct the load'] });
    }
    if (this.rails.length > MAX_RAILS) problems.push({ railId: '', constraint: 'size', shortfall: this.rails.length - MAX_RAILS, unit: 'rails', text: `the planner handles up to ${MAX_RAILS} rails; this project has ${this.rails.length}`, remedies: ['join rails with a manual rail key', 'plan part of the tree at a time'] });
    if (problems.length) {
      this.earlyInfeasible = problems;
      this.trace.push(`input problems: ${problems.map((p) => p.text).join('; ')}`);
      this.finish();
      return false;
    }
    this.trace.push(`${this.rails.length} rails from ${req.loads.length} loads`);
    this.factory = new BlockFactory(req, this.rails, this.options.evaluator, this.costModel);
    const genOpts: GenerationOptions = generationOptions(req, this.options.allowRailFeeds ?? true);
    const ignored = req.preferences.allowedKinds.filter((k) => !genOpts.allowed.has(k));
    if (ignored.length) this.trace.push(`stage kinds not modelled by the planner and left out: ${ignored.join(', ')}`);
    const size = spaceSize(this.factory, genOpts);
    this.space = {
      summary: '',
      kinds: [...genOpts.allowed], notModelled: ignored as StageKind[], railFeeds: genOpts.allowRailFeeds,
      maxSecondaries: genOpts.allowed.has('cwbuck') ? genOpts.maxSecondaries : 0,
      primaries: size.primaries, candidates: size.candidates, designed: 0,
    };
    this.genState = { blocks: this.blocks, misses: this.misses, designed: 0 };
    this.gen = generateBlocks(this.factory, genOpts, this.genState);
    this.progress = { phase: 'candidates', fraction: 0.01, candidates: 0, explored: 0, message: 'designing candidate stages' };
    return true;
  }

  private startSearches(): void {
    const f = this.factory!;
    this.trace.push(`${this.blocks.length} feasible candidate blocks from ${f.evaluations} stage designs`);
    this.progress = { ...this.progress, phase: 'search', fraction: 0.5, candidates: f.evaluations, message: 'searching' };
  }

  private nextSearch(): void {
    const obj = this.queue.shift();
    if (obj === undefined || this.cancelled) { this.finish(); return; }
    const f = this.factory!;
    const scorer = makeScorer(obj, this.req, f.ctx, this.costModel);
    const remaining = Math.max(0, this.deadline - this.now());
    const share = remaining / (this.queue.length + 1);
    // Seed with the best plan found for an earlier objective, rescored under this one.
    let seed: Seed | null = null;
    for (const v of this.found.values()) {
      const s = v.sel.evals.reduce((a, e) => a + scorer.score(e), 0);
      if (!seed || s < seed.score) seed = { blocks: v.blocks, score: s, sel: v.sel };
    }
    // And with the best tree that draws every stage from a source: no coupling between its
    // stages, so its additive optimum is found fast, and it bounds the full search from above.
    const sourceOnly = this.blocks.filter((b) => b.shape.input.kind === 'source');
    if (sourceOnly.length) {
      const o: SearchOutcome = { best: null, explored: 0, leaves: 0, complete: false, leafFailures: new Map() };
      const it = branchAndBound(f, sourceOnly, scorer, seed, o);
      // Bounded in nodes and in time: half of this objective's share, never past the deadline
      // (with the real engine a node can cost milliseconds).
      const until = Math.min(this.deadline, this.now() + share / 2);
      for (let k = 0; k < SEED_SEARCH_NODES && ((k & 7) !== 0 || this.now() < until) && !it.next().done; k++) { /* bounded */ }
      if (o.best && (!seed || o.best.score < seed.score)) {
        seed = { blocks: o.best.blocks, score: o.best.score, sel: o.best.sel };
        this.trace.push(`objective ${obj}: a tree fed only from the sources scores ${o.best.score.toFixed(4)} (${o.explored} nodes); it seeds the search`);
      }
    }
    const out: SearchOutcome = { best: null, explored: 0, leaves: 0, complete: false, leafFailures: new Map() };
    this.search = { objective: obj, scorer, it: branchAndBound(f, this.blocks, scorer, seed, out), deadline: this.now() + share, out };
    this.progress = { ...this.progress, objective: obj, message: `searching for the ${LABEL_OF[obj]} plan` };
    this.pendingSeed = seed;
  }

  private space: PlanSpace | null = null;
  private genState: { blocks: Block[]; misses: Map<number, Miss[]>; designed?: number; uncoveredOnly?: boolean } | null = null;
  private pendingSeed: Seed | null = null;
  private seenBest: SearchOutcome['best'] = null;
  private candidatesCut = false;
  private firstFeasibleMs: number | undefined;
  private bestFoundMs: number | undefined;

  private recordSearch(out: SearchOutcome, finished: boolean): void {
    const s = this.search!;
    for (const [k, v] of out.leafFailures) {
      const cur = this.leafFailures.get(k);
      if (cur) cur.count += v.count; else this.leafFailures.set(k, { ...v });
    }
    if (!finished || !out.complete) this.allComplete = false;
    let chosen = out.best ? { blocks: out.best.blocks, sel: out.best.sel } : null;
    if (!chosen && this.pendingSeed) {
      // Nothing beat the seed: it is the best for this objective.
      chosen = { blocks: this.pendingSeed.blocks, sel: this.pendingSeed.sel };
    }
    if (chosen) {
      this.found.set(s.objective, { ...chosen, complete: finished && out.complete, scorer: s.scorer });
      this.trace.push(`objective ${s.objective}: ${out.explored} nodes, ${out.leaves} complete trees evaluated, best weighted ${chosen.sel.evals.reduce((a, e) => a + s.scorer.score(e), 0).toFixed(4)}${finished ? ' (proved optimal)' : ''}`);
      if (s.objective === this.objective) this.best = this.buildPlan(s.objective);
    } else {
      this.trace.push(`objective ${s.objective}: no feasible tree (${out.explored} nodes)`);
    }
    this.progress.fraction = Math.min(0.99, this.progress.fraction + 0.12);
    this.progress.incumbent = chosen ? chosen.sel.evals.reduce((a, e) => a + s.scorer.score(e), 0) : undefined;
  }

  /**
   * Keep only the remedies that work: each is applied to a copy of the requirements and
   * checked by re-planning (the rail's feeds, or the whole tree for a tree-level failure)
   * within what is left of the budget (at most 10 s); a remedy not confirmed in time is left out.
   */
  private verifyRemedies(entries: InfeasibleEntry[]): void {
    if (this.options.verifyRemedies === false) {
      for (const e of entries) e.inf.remedies = e.candidates.map((c) => c.text);
      return;
    }
    // Within the budget: the checks use what the planning left, at most 10 s.
    const total = Math.max(0, Math.min(10_000, this.deadline - this.now()));
    const deadline = this.now() + total;
    const count = entries.reduce((a, e) => a + e.candidates.length, 0) || 1;
    const each = total / count;
    for (const e of entries) {
      for (const c of e.candidates) {
        // No check starts after the deadline (each one designs at least one shape first).
        if (this.now() >= deadline) { this.trace.push(`remedy "${c.text}" for ${e.inf.railId || 'the tree'}: not checked within the budget, not offered`); continue; }
        const req = structuredClone(this.req);
        c.apply(req);
        const until = Math.min(deadline, this.now() + each);
        let ok = false;
        if (e.railIndex !== undefined) {
          ok = railHasFeed(req, e.inf.railId, this.options.evaluator, this.costModel, this.options.allowRailFeeds ?? true, until, this.now) === 'yes';
        } else {
          const r = new PlanSolver(req, { ...this.options, budgetMs: Math.max(1, until - this.now()), singleObjective: true, verifyRemedies: false }).solve();
          ok = r.best !== null;
        }
        if (ok) e.inf.remedies.push(c.text);
        this.trace.push(`remedy "${c.text}" for ${e.inf.railId || 'the tree'}: ${ok ? 'verified, offered' : 'does not help within its check, not offered'}`);
      }
    }
  }

  private buildPlan(obj: Objective): Plan {
    const v = this.found.get(obj)!;
    const labels: PlanLabel[] = [];
    return assemblePlan(this.factory!, `plan-${obj}`, labels, v.blocks, v.sel, v.scorer, this.blocks, this.misses);
  }

  private finish(): void {
    if (this.result) return;
    if (this.search && this.progress.phase === 'search') {
      // Cancelled mid-search: keep the incumbent found so far.
      this.recordSearch(this.search.out, false);
      this.search = null;
    }
    const elapsedMs = this.now() - this.t0;
    const infeasible: Infeasibility[] = [...this.earlyInfeasible];
    // Alternatives: one plan per objective found; identical trees merge their labels.
    const plans: Plan[] = [];
    const byKey = new Map<string, Plan>();
    const order: Objective[] = [this.objective, ...OBJECTIVES.filter((o) => o !== this.objective)];
    for (const obj of order) {
      const v = this.found.get(obj);
      if (!v) continue;
      const key = v.blocks.map((b) => b.key).sort().join(' ');
      let p = byKey.get(key);
      if (!p) {
        p = assemblePlan(this.factory!, `plan-${obj}`, [], v.blocks, v.sel, this.found.get(this.objective)?.scorer ?? v.scorer, this.blocks, this.misses);
        byKey.set(key, p);
        plans.push(p);
      }
      p.labels.push(LABEL_OF[obj]);
      if (obj === this.objective) p.labels.unshift('best');
    }
    const best = plans.find((p) => p.labels.includes('best')) ?? null;
    if (!best && this.factory && !this.earlyInfeasible.length && !this.cancelled) {
      if (this.candidatesCut) {
        infeasible.push({
          railId: this.rails[0]?.id ?? '', constraint: 'budget', shortfall: 0, unit: '',
          text: `the design share (${Math.round(this.cutShare * 100)} %) of the time budget (${this.budgetMs} ms) ran out after ${this.genState?.designed ?? 0} of ${this.space?.candidates ?? 0} candidate feeds (${this.factory.evaluations} stage designs); the reasons below cover only those`,
          remedies: ['raise the time budget (--budget-ms)'],
        });
      }
      const entries = explainInfeasible(this.factory, this.blocks, this.misses, this.leafFailures);
      this.verifyRemedies(entries);
      infeasible.push(...entries.map((e) => e.inf));
    }
    const violations = this.factory?.boundViolations ?? [];
    const provedOptimal = !this.cancelled && this.allComplete && this.found.get(this.objective)?.complete === true && violations.length === 0;
    const space = this.space ? { ...this.space, designed: this.genState?.designed ?? 0 } : null;
    if (space) space.summary = spaceSummary(space, this.rails.length);
    let notProved: string | undefined;
    if (best && !provedOptimal) {
      notProved = this.cancelled ? 'planning was cancelled before the search finished'
        : this.candidatesCut ? `the design share of the time budget (${this.budgetMs} ms) ran out after ${space?.designed ?? 0} of ${space?.candidates ?? 0} candidate feeds were designed`
        : violations.length ? `a bound the search relies on failed: ${violations[0]!.text}`
        : `the time budget (${this.budgetMs} ms) ran out before the search finished`;
    }
    if (violations.length) this.trace.push(`bound assumption failed on ${violations.length} block(s): ${violations.map((v) => v.text).join('; ')}`);
    this.best = best;
    this.result = {
      revision: this.req.meta.revision,
      rails: this.rails,
      best,
      alternatives: plans,
      infeasible,
      stats: {
        explored: this.explored, provedOptimal, elapsedMs, cancelled: this.cancelled,
        ...(best && this.firstFeasibleMs !== undefined ? { firstFeasibleMs: this.firstFeasibleMs } : {}),
        ...(best && this.bestFoundMs !== undefined ? { bestFoundMs: this.bestFoundMs } : {}),
        ...(space ? { space } : {}),
        ...(notProved ? { notProved } : {}),
      },
    };
    this.progress = { ...this.progress, phase: 'done', fraction: 1, message: best ? 'plan ready' : (this.cancelled ? 'cancelled' : 'no feasible plan') };
    this.trace.push(`done in ${elapsedMs.toFixed(1)} ms: ${best ? `best weighted ${best.score.weighted.toFixed(4)}, ${plans.length} alternative(s)` : 'no plan'}${provedOptimal ? ', proved optimal' : ''}`);
  }
}

/** The decision space in one line (docs/planner.md states it in full). */
export function spaceSummary(s: PlanSpace, rails: number): string {
  const kinds = s.kinds.map((k) => kindNames(k).noun);
  const parts = [`${rails} rails`, `feeds: ${kinds.join(', ') || 'none'}`];
  if (s.kinds.includes('cwbuck')) {
    parts.push(`coupled-winding: ${s.primaries} primaries (a rail or an internal bus) × every set of 1–${s.maxSecondaries} secondary windings, each direct or tap + LDO, or one tap shared by 2–${MAX_SHARED_TAP_RAILS} rails of an isolated domain`);
  }
  parts.push(s.railFeeds ? 'stages fed from rails allowed' : 'every stage fed from a source');
  parts.push(s.designed >= s.candidates ? `${s.candidates} candidate feeds, all designed` : `${s.designed} of ${s.candidates} candidate feeds designed`);
  if (s.notModelled.length) parts.push(`not modelled: ${s.notModelled.map((k) => kindNames(k).noun).join(', ')}`);
  return parts.join('; ');
}

/** Plan in one call. */
export function plan(req: Requirements, options: PlannerOptions): PlanResult {
  return new PlanSolver(req, options).solve();
}
