/**
 * The requirements model: what the engineer enters. Plain serialisable data in base SI
 * units (see units.ts). Ids are short stable strings chosen by the store or the importer.
 */
import type { Amps, Celsius, Hertz, Ratio, Volts, Watts } from './units.ts';

export type Id = string;

/** How a domain's ground relates to the input source. `none` = galvanically connected. */
export type IsolationClass = 'none' | 'functional' | 'basic' | 'reinforced';
export const ISOLATION_CLASSES: readonly IsolationClass[] = ['none', 'functional', 'basic', 'reinforced'];
/**
 * The one ranking of isolation classes, weakest first: none −1, functional 0, basic 1,
 * reinforced 2 (the part library's numeric `isolation` parameter uses the same 0–2). Text
 * that names no class ranks as none.
 */
export function isolationRank(c: string | null | undefined): number {
  const i = ISOLATION_CLASSES.indexOf(c as IsolationClass);
  return i <= 0 ? -1 : i - 1;
}

/**
 * Noise class of a load: how much switching residue it tolerates beyond its ripple limit.
 * `rugged` (logic, drivers), `standard` (I/O, interfaces), `quiet` (analog, references).
 * Loads of different classes never share a rail unless the user overrides it.
 */
export type NoiseClass = 'rugged' | 'standard' | 'quiet';
export const NOISE_CLASSES: readonly NoiseClass[] = ['rugged', 'standard', 'quiet'];

/**
 * Converter kinds the planner may use (the project setting of allowed kinds): every kind the
 * stage engine models (engine/stages/: designStage, evaluateStage, stageWindows, the stage
 * file format). docs/planner.md states where the planner offers each.
 */
export type StageKind = 'buck' | 'cwbuck' | 'ldo' | 'boost' | 'inverting' | 'buck-boost-4s' | 'load-switch' | 'iso-module';
export const STAGE_KINDS: readonly StageKind[] = ['buck', 'cwbuck', 'ldo', 'boost', 'inverting', 'buck-boost-4s', 'load-switch', 'iso-module'];

/** Every kind the stage engine models: since the planner's integration, the same list as StageKind. */
export type StageModelKind = StageKind;
export const STAGE_MODEL_KINDS: readonly StageModelKind[] = STAGE_KINDS;

/** Battery chemistries with presets (engine/battery.ts, generic curves from memory). */
export type BatteryChemistry = 'li-ion' | 'lifepo4' | 'alkaline' | 'nimh';

/** A source that is a battery: its chemistry, series cells, capacity and end of discharge. */
export interface BatterySpec {
  chemistry: BatteryChemistry;
  /** Cells in series. */
  cells: number;
  /** Capacity in ampere-hours (A·h). */
  capacity: number;
  /** Pack voltage at which the product stops (end of discharge). */
  endVoltage: Volts;
  /** Optional own curve per cell: [state of charge 1…0, cell voltage] pairs (else the preset). */
  curve?: Array<[number, number]>;
}

export interface Source {
  id: Id;
  name: string;
  vNom: Volts;
  vMin: Volts;
  vMax: Volts;
  /** Maximum current the source may deliver. */
  currentLimit: Amps;
  /**
   * When the source is a battery. The planner designs over vMin…vMax, which must span the
   * discharge range (full pack voltage down to the end-of-discharge voltage).
   */
  battery?: BatterySpec;
}

export interface Domain {
  id: Id;
  name: string;
  isolation: IsolationClass;
  /** Working voltage across the barrier to the source side (RMS or DC, per the standard used). */
  workingVoltage: Volts;
}

export interface OperatingMode {
  id: Id;
  name: string;
  /** Share of operating time, 0..1; the shares of a project sum to 1. */
  share: Ratio;
}

export interface Load {
  id: Id;
  name: string;
  domainId: Id;
  /** Signed nominal voltage (negative rails are allowed). */
  voltage: Volts;
  /** Symmetric tolerance as a ratio, 0.05 = ±5 %. */
  tolerance: Ratio;
  /** Current drawn in each operating mode, keyed by mode id. A missing mode means 0 A. */
  current: Record<Id, Amps>;
  /** Largest acceptable peak-to-peak ripple and noise on the load's supply. */
  rippleLimit: Volts;
  noiseClass: NoiseClass;
  /** Manual rail assignment: loads with the same non-empty key share one rail. */
  railKey?: string;
}

export interface DesignLimits {
  ambient: Celsius;
  /** Junction temperature that no part may exceed. */
  tjMax: Celsius;
  /** Required margin below tjMax (K). */
  tjMargin: number;
  /** Fraction of a ceramic capacitor's rated voltage it may see (0.6 = 60 %). */
  ceramicDerating: Ratio;
  /** Fraction of an aluminium/polymer capacitor's rated voltage it may see. */
  electrolyticDerating: Ratio;
  /** Fraction of a resistor's or semiconductor's rated power it may dissipate. */
  powerDerating: Ratio;
  /**
   * Margin of a regulator's or controller's input rating above the highest input: rated
   * ≥ (1 + margin)·Vin max [common practice 10–20 %]. Absent in older files: 0.1.
   */
  inputRatingMargin?: Ratio;
  /**
   * Margin a rail's worst-case window should keep from its band edges, as a share of the
   * band's half-width (0.1 = 10 %); a plan whose rail comes closer reports it as marginal.
   * Absent in older projects: DEFAULT_WINDOW_MARGIN applies.
   */
  windowMargin?: Ratio;
  /** Largest secondary-to-primary turns ratio |Ns/Np| a coupled-winding magnetic may have. */
  maxTurnsRatio?: number;
  /** Largest reverse voltage a secondary's rectifier may see (at Vin max). */
  maxRectifierVoltage?: Volts;
  /**
   * Most magnetics that may cross the barrier into one isolated domain: coupled-winding
   * magnetics with a secondary there and isolated modules feeding a rail there each count one.
   * Absent in older projects: DEFAULT_MAX_MAGNETICS_PER_DOMAIN applies.
   */
  maxMagneticsPerIsolatedDomain?: number;
}

/**
 * Default turns-ratio limit: beyond about 1:10 leakage and cross-regulation make a
 * coupled-winding buck's secondaries hard to hold (common practice, from memory).
 */
export const DEFAULT_MAX_TURNS_RATIO = 10;
/**
 * Default limit on a secondary's steady reverse voltage n·(Vin,max − Vpri) + |Vout|: 250 V.
 * Above it the winding needs high-voltage rectifiers (the turn-on spike comes on top and is
 * met by the part's rating or a snubber) and the secondary circuit carries hazardous
 * voltages (common practice, from memory; a judgement, editable per project).
 */
export const DEFAULT_MAX_RECTIFIER_VOLTAGE = 250 as Volts;

/**
 * Default: one magnetic crosses into each isolated domain. Every crossing is another
 * insulation path to qualify and another interwinding capacitance from the primary side into
 * the domain: their common-mode (touch and leakage) currents add, and the domain's reference
 * is tied to the primary side through each of them (common practice, a judgement; editable).
 */
export const DEFAULT_MAX_MAGNETICS_PER_DOMAIN = 1;

/** Default window margin: 10 % of a rail's band half-width (common practice, a judgement). */
export const DEFAULT_WINDOW_MARGIN = 0.1 as Ratio;

export interface PlannerPreferences {
  /** Weights of the objectives in the balanced score (need not sum to 1). */
  weights: { loss: number; cost: number; parts: number };
  /** Most secondaries one coupled-winding magnetic may carry. */
  maxSecondaries: number;
  allowedKinds: StageKind[];
  /** Switching frequency the planner uses for switching stages. */
  switchingFrequency: Hertz;
  /** Planner time budget for large instances (ms). */
  budgetMs: number;
}

export interface ProjectMeta {
  name: string;
  description: string;
  /** Increases on every change to requirements; plans remember the revision they used. */
  revision: number;
}

export interface Requirements {
  meta: ProjectMeta;
  sources: Source[];
  domains: Domain[];
  modes: OperatingMode[];
  loads: Load[];
  limits: DesignLimits;
  preferences: PlannerPreferences;
}

export const DEFAULT_LIMITS: DesignLimits = {
  ambient: 40 as Celsius,
  tjMax: 125 as Celsius,
  tjMargin: 15,
  ceramicDerating: 0.6 as Ratio,
  electrolyticDerating: 0.8 as Ratio,
  powerDerating: 0.5 as Ratio,
  inputRatingMargin: 0.1 as Ratio,
};

export const DEFAULT_PREFERENCES: PlannerPreferences = {
  weights: { loss: 1, cost: 1, parts: 0.2 },
  maxSecondaries: 3,
  // Every kind the planner models (a project may narrow the list). The demo project lists its own.
  allowedKinds: [...STAGE_KINDS],
  switchingFrequency: 400e3 as Hertz,
  budgetMs: 10_000,
};

/** A rail: loads that share one supply net. Derived by grouping (rails.ts). */
export interface Rail {
  id: Id;
  name: string;
  domainId: Id;
  voltage: Volts;
  /** Tightest tolerance of its loads. */
  tolerance: Ratio;
  /** Smallest ripple limit of its loads. */
  rippleLimit: Volts;
  /** Strictest noise class of its loads. */
  noiseClass: NoiseClass;
  loadIds: Id[];
  /** Sum of load currents per mode. */
  current: Record<Id, Amps>;
}

export type PowerPerMode = Record<Id, Watts>;

/**
 * One row of a project's part library, as the project file stores it. `params` is an
 * opaque JSON object whose meaning the BOM defines; the store keeps it verbatim.
 */
export interface PartLibraryRow {
  id: Id;
  partClass: string;
  name: string;
  /** Estimated unit cost in the library's currency units. */
  cost: number;
  params: Record<string, unknown>;
}
