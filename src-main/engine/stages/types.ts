/**
 * Contract between the stage models and their users (planner, roll-up, BOM, exports).
 * The planner asks for a stage with a StageSpec; a designer returns a StageDesign (every
 * chosen value: turns, inductance, capacitors, divider...); evaluateStage computes one
 * operating point; stageWindow computes the worst-case output windows over corners.
 * Changes here are additive only.
 */
import type { Amps, Celsius, Hertz, KelvinPerWatt, Ratio, Volts, Watts } from '../units.ts';
import type { Id, IsolationClass, StageModelKind } from '../model.ts';
import type { LibraryRow } from '../library.ts';
import type { RatingMargins } from './part-choice.ts';
import type { DiodeModel } from './defaults.ts';

/** One output the planner wants from a stage. */
export interface OutputSpec {
  /** Rail or internal node this output feeds. */
  nodeId: Id;
  /** Signed target voltage. */
  voltage: Volts;
  /** Allowed ± deviation as a ratio of |voltage|. */
  tolerance: Ratio;
  /** Smallest and largest load current over all modes (min may be 0). */
  currentMin: Amps;
  currentMax: Amps;
  /** Peak-to-peak ripple limit. */
  rippleLimit: Volts;
}

/** What the planner asks a designer for. */
export interface StageSpec {
  kind: StageModelKind;
  vinMin: Volts;
  vinNom: Volts;
  vinMax: Volts;
  /** Worst-case (largest) input ripple, for LDO PSRR and dropout checks. */
  vinRipple?: Volts;
  /** For coupled-winding stages: outputs[0] is the regulated primary. */
  outputs: OutputSpec[];
  fsw: Hertz;
  ambient: Celsius;
  tjMax: Celsius;
  ceramicDerating: Ratio;
  /** Coupled-winding stages: most secondaries one magnetic may carry (default 3). */
  maxSecondaries?: number;
  /** Coupled-winding stages: coupling factor of the magnetic (default from stages/defaults.ts). */
  coupling?: number;
  /**
   * Coupled-winding stages: the rectifier (e.g. from the part library), with its junction
   * capacitance (cjo, vj, m) and transit time when known; default: a generic Schottky
   * without capacitance (the leakage ring is then not modelled and the 2 % preload rule applies).
   */
  rectifier?: DiodeModel;
  /** Coupled-winding stages: coupling between secondaries [i][j] (absent: k·k, no shared leakage). */
  secondaryCoupling?: number[][];
  /**
   * Coupled-winding stages: the magnetic's tolerances the windows sweep and its specification
   * sheet states: Lp ± inductance, leakage between leakageLow × and 1 × the design value.
   */
  magneticTolerance?: { inductance: number; leakageLow: number };
  /** Coupled-winding stages: the barrier the windings cross, carried onto the magnetic's spec. */
  isolation?: { class: IsolationClass; workingVoltage: Volts } | null;
  /**
   * The project's part library. When given, the designer chooses the stage's parts from it
   * and the design carries their parameters and references (stages/part-choice.ts); without
   * it the generic defaults from memory stand in.
   */
  library?: readonly LibraryRow[];
  /** Share of an aluminium or polymer capacitor's rating it may see (default 0.8). */
  electrolyticDerating?: Ratio;
  /** Rating margins of the part choice (stages/part-choice.ts DEFAULT_MARGINS). */
  margins?: Partial<RatingMargins>;
  /**
   * Load switches (stages/load-switch/): the capacitance on the gated rail (default 10 µF),
   * the inrush limit (default the rail's largest current), a fixed slew rate (V/s; default
   * chosen for the limit) and the operating modes in which the rail is switched off.
   */
  loadSwitch?: { cload?: number; inrushLimit?: number; slewRate?: number; offModes?: string[] };
}

/** Severity `error` makes a stage infeasible; `warning` is shown but allowed. */
export interface StageFlag {
  code: string;
  severity: 'error' | 'warning';
  text: string;
  data?: Record<string, number | string>;
}

/** A part that dissipates heat, for the thermal table. */
export interface DissipatingPart {
  /** Role in the stage, e.g. "high-side switch", "LDO", "rectifier D2". */
  role: string;
  power: Watts;
  thetaJA: KelvinPerWatt;
  /**
   * Where θJA came from: part library data, a default from memory, or (a designed magnetic)
   * the hot-spot rise computed from its core's surface at this loss.
   */
  thetaSource: 'library' | 'default-from-memory' | 'core-surface';
  /** Junction (or hot-spot) temperature at the given ambient. */
  tj: Celsius;
}

export interface OutputResult {
  nodeId: Id;
  /** Output voltage at this operating point (signed). */
  voltage: Volts;
  current: Amps;
  ripplePP: Volts;
}

/** One evaluated operating point. Energy balance: pin = pout + loss. */
export interface StageEvaluation {
  kind: StageModelKind;
  vin: Volts;
  iin: Amps;
  pin: Watts;
  pout: Watts;
  loss: Watts;
  efficiency: Ratio;
  duty?: Ratio;
  /** Each loss term separately (names are stable keys, e.g. "hs-conduction"). */
  lossBreakdown: Record<string, Watts>;
  parts: DissipatingPart[];
  outputs: OutputResult[];
  flags: StageFlag[];
}

/** Worst-case window of one output over the corner set (and Monte Carlo, if asked). */
export interface OutputWindow {
  nodeId: Id;
  target: Volts;
  min: Volts;
  max: Volts;
  /** Allowed band from the spec. */
  allowedMin: Volts;
  allowedMax: Volts;
  inside: boolean;
  /** Which corner produced the min and the max, readable. */
  minCorner: string;
  maxCorner: string;
  /**
   * True when every corner of the set was evaluated (false: a coupled-winding stage whose
   * magnetic corners were taken only at each output's nominal extremes, the default sweep).
   */
  exhaustive?: boolean;
  /** Seeded Monte Carlo spread, when asked for (uniform draws inside every tolerance). */
  monteCarlo?: { min: Volts; max: Volts; runs: number; seed: number };
}

/** The operating point at which to evaluate: input voltage and each output's current. */
export interface OperatingPoint {
  vin: Volts;
  /** Current of each output, in the order of the design's outputs. */
  iout: Amps[];
  ambient: Celsius;
  /** Operating-mode id, for kinds whose state depends on the mode (a load switch gated off). */
  mode?: Id;
}

/** The keys of T that are not optional. */
export type RequiredKeys<T> = { [K in keyof T]-?: {} extends Pick<T, K> ? never : K }[keyof T];

/**
 * Every field a design of a kind always carries, as a record the compiler checks is complete
 * (a key missing or not a required field of D is an error): a design read from a file is
 * checked against it before it is taken as that kind's design (stage-json.ts).
 */
export type DesignFields<D> = { readonly [K in RequiredKeys<D>]: true };
