/**
 * Planner internals: the evaluator interface the search runs against, candidate blocks and
 * their evaluations. A *block* is one feed decision that covers a set of rails: a buck for
 * one rail, an LDO from another rail, or a coupled-winding stage with its primary, its
 * secondaries and the LDOs behind its tap windings. A plan is an exact cover of the rails
 * by blocks (see docs/planner.md).
 */
import type { Amps, Volts } from '../units.ts';
import type { Id, Rail, StageKind } from '../model.ts';
import type { OperatingPoint, OutputWindow, StageEvaluation, StageFlag, StageSpec } from '../stages/types.ts';
import type { Barrier, InternalNode, PlanOutput, Reason } from '../plan-types.ts';
import type { StageDesign } from '../stages/index.ts';

/**
 * What the planner needs from the stage models. The stage engine (engine/stages) is plugged
 * in through `engineEvaluator()` in evaluator.ts; tests may pass another implementation of
 * the same three calls. The planner hands each design back to the evaluator that made it
 * and reads a design's own fields only after narrowing on `design.kind` (the coupled-winding
 * turns, the four-switch transition band, the isolated module's rating).
 */
export interface StageEvaluator {
  design(spec: StageSpec): { ok: true; design: StageDesign } | { ok: false; flags: StageFlag[] };
  evaluate(design: StageDesign, op: OperatingPoint): StageEvaluation;
  windows(design: StageDesign, corners: { vin: Volts[]; iout: { min: Amps; max: Amps }[] }): OutputWindow[];
}

/** Counts of parts a block implies, by category; the cost model prices them. */
export interface PartCounts {
  controller: number;
  switch: number;
  magnetic: number;
  coupledMagnetic: number;
  rectifier: number;
  capacitor: number;
  resistor: number;
  ldo: number;
  /**
   * Galvanic barriers a magnetic crosses (one per isolated domain it feeds). Not a part: it
   * prices the insulation system (insulated winding wire, bobbin, Y-capacitor, qualification).
   */
  barrier: number;
}

/** Prices parts. Invented default in cost-model.ts; the part library may replace it. */
export interface CostModel {
  /** Cost of a block's parts (currency units of the library). */
  cost(parts: PartCounts, kind: StageKind): number;
  /** Cost of a reference plan stage (one buck), used to normalise the weighted score. */
  referenceStageCost: number;
  referenceStageParts: number;
  /**
   * Cost and part count of a block's stages from the parts their designs name (the same
   * function the BOM lists them with), when the model is the project's part library. The
   * planner then ranks trees by the numbers the BOM will show.
   */
  priceStages?(stages: readonly BlockStage[]): { cost: number; parts: number };
}

/** Where a block draws its power. */
export type FeedInput = { kind: 'source'; id: Id } | { kind: 'rail'; rail: number };

export type SecondaryUse = 'direct' | 'tap';

/** The shape of a candidate block before evaluation. */
export type BlockShape =
  | { kind: 'buck'; input: FeedInput; rail: number }
  | { kind: 'ldo'; input: FeedInput & { kind: 'rail' }; rail: number }
  /** One rail from one switching stage or module: boost, four-switch buck-boost, inverting, isolated module. */
  | { kind: 'boost' | 'buck-boost-4s' | 'inverting' | 'iso-module'; input: FeedInput; rail: number }
  /** A gated rail passed through from a rail (or a source) of the same voltage; off in `offModes`. */
  | { kind: 'load-switch'; input: FeedInput; rail: number; offModes: string[] }
  | {
      kind: 'cwbuck';
      input: FeedInput & { kind: 'source' };
      /** Rail index of the regulated primary, or null for an internal primary bus. */
      primary: number | null;
      busVoltage?: number;
      /** Every rail the magnetic's secondary windings serve (directly, or through an LDO behind a tap). */
      secondaries: number[];
      /**
       * Rails (2…MAX_SHARED_TAP_RAILS of `secondaries`, ascending, one isolated domain, one sign)
       * that share one tap winding, each through its own LDO. The magnetic then has
       * secondaries.length − sharedTap.length + 1 windings.
       */
      sharedTap?: number[];
    };

/** One stage a block builds (the main stage and any LDO behind a tap winding). */
export interface BlockStage {
  localId: string;
  kind: StageKind;
  name: string;
  /** 'input' = the block's feed; otherwise a local internal node id. */
  inputNode: 'input' | string;
  outputs: PlanOutput[];
  barriers: Barrier[];
  design: StageDesign;
  spec: StageSpec;
  /** Output currents per mode (A) and this stage's loss per mode (W), at Vin nominal. */
  modeCurrents?: number[][];
  lossPerMode?: number[];
}

/** Evaluated, feasible block at a given extra load on its outputs. */
export interface BlockEval {
  /** Mode-weighted loss of every stage of the block (W). */
  loss: number;
  /** Loss per mode (W), in requirements.modes order. */
  lossPerMode: number[];
  /** Input current per mode at the input's nominal voltage (A). */
  iinPerMode: number[];
  /** Input current per mode at the input's lowest voltage (A): for source limits. */
  iinAtMin: number[];
  /** Input power per mode (W). */
  pinPerMode: number[];
  cost: number;
  parts: number;
  partCounts: PartCounts;
  stages: BlockStage[];
  internalNodes: InternalNode[];
  windows: OutputWindow[];
  reasons: Reason[];
  /** Key numbers for explanations. */
  notes: Record<string, number | string>;
}

/** Why a block was rejected: the constraint and how far it missed. */
export interface Rejection {
  constraint: string;
  shortfall: number;
  unit: string;
  text: string;
  /** Rail the miss belongs to (index), when one rail is to blame. */
  rail?: number;
}

export interface Block {
  index: number;
  key: string;
  shape: BlockShape;
  /** Rails covered, ascending. */
  covers: number[];
  /** Evaluation with no downstream load (lower bound of the coupled one). */
  base: BlockEval;
  /** Additive weighted score of `base` (used for bounds). */
  score: number;
}

/** A context every part of the planner shares for one requirements set. */
export interface PlanContext {
  rails: Rail[];
  modeIds: Id[];
  shares: number[];
}
