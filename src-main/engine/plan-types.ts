/**
 * The shape of a power tree as the planner returns it and as the roll-up, BOM, drawing,
 * exports and window consume it. Plain serialisable data. Changes here are additive only.
 */
import type { Id, Rail, StageKind } from './model.ts';
import type { Volts, Watts } from './units.ts';
import type { StageDesign } from './stages/index.ts';

/** A node of the tree that is not a requirement rail: a winding tap or an intermediate bus. */
export interface InternalNode {
  id: Id;
  name: string;
  domainId: Id;
  voltage: Volts;
  kind: 'tap' | 'bus';
}

export type OutputRole = 'output' | 'primary' | 'secondary';

export interface PlanOutput {
  /** The rail id or internal node id this output feeds. */
  nodeId: Id;
  role: OutputRole;
  /** Turns of this winding (coupled-winding stages only). */
  turns?: number;
}

/** A galvanic barrier a stage carries (coupled-winding secondaries into another domain). */
export interface Barrier {
  fromDomainId: Id;
  toDomainId: Id;
  isolation: 'functional' | 'basic' | 'reinforced';
  workingVoltage: Volts;
}

export interface PlanStage {
  id: Id;
  kind: StageKind;
  name: string;
  /** Source id, rail id or internal node id this stage draws from. */
  inputNodeId: Id;
  outputs: PlanOutput[];
  barriers: Barrier[];
  /**
   * The stage design the engine evaluated: one of the registered kinds' designs
   * (engine/stages/registry.ts), told apart by `design.kind`, which equals the stage's
   * `kind`. Kept so the roll-up, BOM and netlist exports recompute from exactly what the
   * planner chose. The planner always sets one; null is a stage without a design (a tree
   * drawn by hand): the drawing shows it, the roll-up refuses it by name and the BOM lists
   * it as carrying no design. A plan read back from a file is checked only in outline when
   * it is stored (store/json-format.ts), so readers of a saved plan keep their guards
   * against a design that is incomplete.
   */
  design: StageDesign | null;
}

/** A decision and why, for a reviewer. `data` carries the numbers the sentence quotes. */
export interface Reason {
  code: string;
  /** The rail, stage or node the reason is about. */
  subjectId: Id;
  text: string;
  data?: Record<string, number | string | boolean>;
}

export interface PlanScore {
  /** Time-weighted total loss over operating modes. */
  loss: Watts;
  /** Estimated BOM cost in the part library's currency units. */
  cost: number;
  parts: number;
  /** Weighted objective (lower is better) under the project's preferences. */
  weighted: number;
}

export type PlanLabel = 'best' | 'lowest-loss' | 'lowest-cost' | 'fewest-parts' | 'balanced' | 'alternative';

export interface Plan {
  id: Id;
  labels: PlanLabel[];
  stages: PlanStage[];
  internalNodes: InternalNode[];
  score: PlanScore;
  reasons: Reason[];
}

/** Why no plan exists: which rail, which constraint, by how much, and what would help. */
export interface Infeasibility {
  railId: Id;
  constraint: string;
  /** How far the best candidate missed, in the constraint's unit (e.g. volts or K). */
  shortfall: number;
  unit: string;
  text: string;
  remedies: string[];
}

/**
 * The decision space the planner searched (docs/planner.md states it in full): a claim of
 * "proved optimal" holds over this space only.
 */
export interface PlanSpace {
  /** One line a reviewer reads: the feeds considered and their ranges. */
  summary: string;
  /** Stage kinds searched (the modelled ones among the allowed kinds). */
  kinds: StageKind[];
  /** Allowed kinds the planner does not model (left out of the search). */
  notModelled: StageKind[];
  /** Stages fed from other rails (buck or LDO from a rail) are in the space. */
  railFeeds: boolean;
  /** Secondaries per coupled-winding magnetic, 1…maxSecondaries. */
  maxSecondaries: number;
  /** Coupled-winding primaries (a rail or an internal bus, per source). */
  primaries: number;
  /** Candidate feeds (single-rail feeds and winding sets) in the space. */
  candidates: number;
  /** Candidate feeds designed before the search (all of them unless the budget ran out). */
  designed: number;
}

export interface PlanResult {
  /** Requirements revision the plan was computed from; stale when the project moves on. */
  revision: number;
  rails: Rail[];
  best: Plan | null;
  /** Pareto alternatives (including the best), each complete. */
  alternatives: Plan[];
  infeasible: Infeasibility[];
  stats: {
    explored: number; provedOptimal: boolean; elapsedMs: number; cancelled: boolean;
    /** When the first complete feasible tree was found (ms from the start), if any. */
    firstFeasibleMs?: number;
    /** When the returned best tree was found (ms from the start), if any. */
    bestFoundMs?: number;
    /** The space searched (absent in plans saved before it was recorded). */
    space?: PlanSpace;
    /** Why the best is not proved optimal (budget, cancel, a bound assumption that failed). */
    notProved?: string;
  };
}
