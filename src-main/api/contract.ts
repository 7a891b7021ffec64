/**
 * The one contract between the window and the handlers (types only).
 *
 * `Requests` maps each request name to `(args) => result`; `Events` maps each event name to
 * its payload. Every payload is plain serialisable data (no classes, no functions), so the
 * same contract travels over Electron IPC, the child-process backend pipe and HTTP.
 * Every request answers with an `ApiResult`: either `{ ok: true, value }` or
 * `{ ok: false, error: { field?, message } }`; handlers never throw across the contract.
 * The pure formatting functions and table definitions the window shares with main are in
 * window-shared.ts, which this contract owns; the window imports no other src-main module
 * (test/boundaries.test.ts).
 */
import type { Id, Rail, Requirements } from '../engine/model.ts';
import type { Plan, PlanResult } from '../engine/plan-types.ts';

/** Types the window reads through the contract (it imports nothing else from src-main but window-shared.ts). */
export type { Requirements } from '../engine/model.ts';
export type { QuantityKind } from '../engine/units.ts';
export type { StageDesign } from '../engine/stages/index.ts';

export interface ApiError {
  /** Dotted path of the offending argument or cell, e.g. `loads.L3.voltage`. */
  field?: string;
  message: string;
  /** Set when the window can offer a way on (see ApiErrorCode); absent for plain refusals. */
  code?: ApiErrorCode;
}

/**
 * Refusals that protect a file shared with other programs; nothing was written.
 * - `exists`: the target file exists; ask the user, then repeat with `overwrite: true`.
 * - `changed`: the project's file changed on disk since it was opened; offer Save As or Reopen.
 * - `locked`: another program is writing the file right now.
 * - `side-file`: another program's unfinished change (journal, write-ahead log) is beside it.
 */
export type ApiErrorCode = 'exists' | 'changed' | 'locked' | 'side-file';

export type ApiResult<T> = { ok: true; value: T } | { ok: false; error: ApiError };

/** Editable tables of the requirements and of the part library. */
export type TableName = 'sources' | 'domains' | 'modes' | 'loads' | 'limits' | 'preferences' | 'library';

export interface ProjectState {
  /** File the project was opened from or saved to; null for a project never saved. */
  path: string | null;
  name: string;
  dirty: boolean;
  revision: number;
  canUndo: boolean;
  canRedo: boolean;
  undoLabel: string | null;
  redoLabel: string | null;
  /** True when the project came back from an autosave after an unclean exit. */
  recovered: boolean;
  /** A message from the host for the user, e.g. why the last project was not reopened at start; null when none. */
  notice: string | null;
  recent: string[];
  /** The host the handlers run in; the window adapts file dialogs to it. */
  host: 'electron' | 'web' | 'test';
  /**
   * Job id of the planning run in progress, whoever started it (the window, a menu, or the
   * host planning the demo at first run); null when none runs. A window that opens or
   * reloads mid-plan follows that job's progress events.
   */
  planning: string | null;
  /**
   * The host asks the window to plan this project as soon as it is shown (the demo at first
   * run), so a newcomer opens on a tree; cleared when a plan starts.
   */
  planOnOpen: boolean;
}

/** One part of the editable part library as the window sees it (plain rows). */
export type LibraryRow = Record<string, string | number | boolean | null>;

export interface LibraryView {
  /** Column keys in display order and their kind. */
  columns: { key: string; label: string; kind: 'text' | 'number' | 'quantity' | 'enum'; unit?: string; options?: string[] }[];
  rows: LibraryRow[];
  currency: string;
}

/** Per-mode figures of one stage from the roll-up. */
export interface StageFigures {
  stageId: Id;
  modeId: Id;
  /** The stage's input voltage, loss and efficiency with the source at its min, nominal and max voltage (null: not computed). */
  byCase: { vMin: StageCase | null; vNom: StageCase; vMax: StageCase | null };
  /** The fields below are at V nom. */
  vin: number;
  pin: number;
  pout: number;
  loss: number;
  efficiency: number;
  duty: number | null;
  lossBreakdown: Record<string, number>;
  parts: { role: string; power: number; tj: number; thetaJA: number; thetaSource: string; margin: number }[];
  outputs: { nodeId: Id; voltage: number; current: number; ripplePP: number }[];
  flags: { code: string; severity: 'error' | 'warning'; text: string }[];
}

export interface WindowFigures {
  nodeId: Id;
  target: number;
  min: number;
  max: number;
  allowedMin: number;
  allowedMax: number;
  inside: boolean;
  minCorner: string;
  maxCorner: string;
  /** The engine evaluated every corner of this window and of the windows feeding it. */
  proved: boolean;
}

export interface SystemFigures {
  modeId: Id;
  /** Efficiency and source current at the source's min, nominal and max voltage. */
  efficiency: { vMin: number; vNom: number; vMax: number };
  sourceCurrent: { vMin: number; vNom: number; vMax: number };
  /** At V nom (the same as cases.vNom). */
  pin: number;
  pout: number;
  loss: number;
  /** Source power, load power and loss at each input case. */
  cases: { vMin: PowerCase; vNom: PowerCase; vMax: PowerCase };
}

export interface StageCase { vin: number; loss: number; efficiency: number }

export interface PowerCase { pin: number; pout: number; loss: number }

/** Everything the tree, inspector, budget and thermal views need about one plan. */
export interface RollupView {
  /** Requirements revision the figures were computed at. */
  revision: number;
  stages: StageFigures[];
  windows: WindowFigures[];
  system: SystemFigures[];
  /** Time-weighted loss over the modes. */
  weightedLoss: number;
  messages: string[];
  /**
   * Battery sources: usable energy to the end-of-discharge voltage over the power the plan
   * draws from each at nominal input (conversion losses included), for the mode mix and per
   * mode; hours null where a mode draws nothing.
   */
  batteries?: BatteryFigures[];
}

export interface BatteryFigures {
  sourceId: Id;
  sourceName: string;
  energyWh: number;
  mixPower: number;
  mixHours: number | null;
  perMode: { modeId: Id; modeName: string; power: number; hours: number | null }[];
}

/** One line of text in the drawing, placed by the engine (baseline at y; box = the room it takes). */
export interface LayoutText {
  text: string;
  x: number;
  y: number;
  size: number;
  bold: boolean;
  role: 'name' | 'key' | 'line';
  box: { x: number; y: number; width: number; height: number };
}

export interface LayoutNode {
  id: Id;
  kind: 'source' | 'stage' | 'rail' | 'internal' | 'load';
  /** Full name (hover, find-a-rail); the drawing shows `glance` or `detail`. */
  label: string;
  sub: string[];
  /** The one figure shown at a glance. */
  key: string;
  /** Text at a glance (name and key figure, large) and in detail (name and every line, small). */
  glance: LayoutText[];
  detail: LayoutText[];
  domainId: Id | null;
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface LayoutEdge {
  id: Id;
  from: Id;
  to: Id;
  label: string;
  /** Polyline points in absolute coordinates. */
  points: { x: number; y: number }[];
  crossesBarrier: boolean;
}

export interface LayoutGroup {
  domainId: Id;
  label: string;
  isolation: string;
  glance: LayoutText[];
  detail: LayoutText[];
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface LayoutView {
  width: number;
  height: number;
  nodes: LayoutNode[];
  edges: LayoutEdge[];
  groups: LayoutGroup[];
  /** Galvanic barriers as line segments between an isolated group and the rest. */
  barriers: { x1: number; y1: number; x2: number; y2: number; label: string }[];
}

export interface BomLineView {
  group: string;
  stageId: Id | null;
  role: string;
  description: string;
  value: string;
  quantity: number;
  unitCost: number;
  extended: number;
  estimate: boolean;
  /** Why the line has no library part or no cost (null when it is fine). */
  problem: string | null;
}

export interface BomView {
  lines: BomLineView[];
  total: number;
  parts: number;
  currency: string;
}

/**
 * One alternative's figures, from the same computations the Budget and Parts views use
 * (roll-up: time-weighted loss over the modes at nominal input; BOM: cost and part count).
 * A figure that could not be computed is null with the reason in `note`.
 */
export interface AlternativeFigures {
  planId: Id;
  weightedLoss: number | null;
  cost: number | null;
  parts: number | null;
  note: string | null;
}

/** What the alternatives' figures are (stated beside them in the window). */
export const ALTERNATIVE_BASIS = 'Loss: time-weighted over the operating modes at nominal input (as in Budget). Cost and parts: from the bill of materials (as in Parts).';

/** The plan-side picture the window draws: the chosen alternative, computed. */
export interface PlanView {
  /** Per alternative, in the order of result.alternatives. */
  alternatives: AlternativeFigures[];
  result: PlanResult;
  /** Id of the alternative currently shown (the best one unless the user picked another). */
  selectedId: Id | null;
  selected: Plan | null;
  /** True when the requirements changed after planning (the plan may no longer fit). */
  stale: boolean;
  rollup: RollupView | null;
  layout: LayoutView | null;
  bom: BomView | null;
  /** What could not be computed and why (a missing module, an evaluation error). */
  notes: string[];
  /** Mode whose figures are drawn on the tree; null = the heaviest mode. */
  drawingModeId: Id | null;
}

export interface Snapshot {
  state: ProjectState;
  requirements: Requirements;
  rails: Rail[];
  plan: PlanView | null;
  /** Problems with the requirements as a whole (not one cell), each naming its subject. */
  problems: ApiError[];
}

export interface CellEdit {
  table: TableName;
  /** Row id; `limits` and `preferences` use the row id `project`. */
  rowId: Id;
  /** Column key, e.g. `voltage`, `tolerance`, `current:<modeId>`. */
  field: string;
  /** What the user typed, in engineering notation (`3V3`, `250m`, `±5%`, `4u7`). */
  text: string;
}

export type ExportKind =
  | 'bom-csv' | 'bom-xlsx' | 'tree-svg' | 'tree-pdf' | 'report' | 'json' | 'spice' | 'magnetics' | 'plot-svg';

export interface ExportFile {
  fileName: string;
  mime: string;
  /** Base64 of the bytes (so binary formats travel as plain JSON). */
  base64: string;
  /** Where it was written, when a path was given. */
  writtenTo: string | null;
}

export interface PlanJob {
  jobId: string;
}

export interface LeakageLimitView {
  id: string;
  label: string;
  limit: number;
  standard: string;
  source: string;
}

export interface BarrierCheckView {
  current: number;
  limit: LeakageLimitView;
  ok: boolean;
  margin: number;
  maxCapacitance: number;
  text: string;
  cautions: string[];
}

/** Load-list import: what a column of the file fills. `current:*` fills every mode without a column of its own. */
export interface LoadImportTarget { key: string; label: string; required: boolean }

export interface LoadImportMapping {
  /** 0-based index of the header row in the file's rows; data rows follow it. */
  headerRow: number;
  /** Per column of the file, the target key it fills, or null to leave it out. */
  columns: (string | null)[];
  /** Replace the project's loads instead of adding to them. */
  replace: boolean;
}

/** One bad cell, by the file's own row number (1-based, as a spreadsheet shows it) and column letter. */
export interface LoadImportBadCell { row: number; column: string; header: string; field: string; message: string }

export interface LoadImportPreview {
  headerRow: number;
  headers: { column: string; text: string; unit: string | null }[];
  mapping: LoadImportMapping;
  targets: LoadImportTarget[];
  /** What each data row becomes, in engineering notation, keyed by target key (current per mode as `current:<modeId>`). */
  rows: { row: number; bad: boolean; cells: Record<string, string> }[];
  bad: LoadImportBadCell[];
  good: number;
  total: number;
  /** Why the mapping cannot be applied at all (a required field unmapped, a column mapped twice). */
  problems: string[];
  notes: string[];
}

/** A load list read from a file: its cells as text, the sheet read, and the preview under the guessed mapping. */
export interface LoadImportFile {
  fileName: string;
  format: 'csv' | 'xlsx';
  sheets: string[];
  sheet: string | null;
  delimiter: string | null;
  decimalComma: boolean;
  rows: string[][];
  preview: LoadImportPreview;
}

/** One point of a stage curve (engine/curves.ts). */
export interface CurvePointView { fraction: number; vin: number; iout: number; pin: number; pout: number; loss: number; efficiency: number }
export interface CurveSeriesView { label: string; vin: number; points: CurvePointView[] }
/** Stage curves of the shown plan; the operating point is the roll-up's (as in Budget). */
export interface StageCurvesView {
  stageId: Id;
  stageName: string;
  operating: { modeId: Id; modeName: string; vin: number; iout: number[]; loss: number; efficiency: number };
  ioutMax: number[];
  vinRange: { min: number; nom: number; max: number };
  load: CurveSeriesView[];
  input: CurveSeriesView;
  skipped: string[];
}

/** The whole tree versus one source's voltage, per mode (engine/curves.ts systemSourceSweep). */
export interface SystemSweepView {
  sourceId: Id;
  sourceName: string;
  range: { min: number; nom: number; max: number };
  /** Sources that feed the tree (the ones the window may sweep). */
  sources: Array<{ id: Id; name: string }>;
  modes: Array<{ modeId: Id; modeName: string; points: Array<{ v: number; efficiency: number; sourceCurrent: number; sourcePower: number; loadPower: number; loss: number }> }>;
  skipped: string[];
  /**
   * The system versus its load (engine/curves.ts systemLoadSweep): every load of a mode
   * scaled by the same factor, sources at nominal; factor 1 is the Budget view's V nom case.
   */
  load: { modes: Array<{ modeId: Id; modeName: string; points: Array<{ scale: number; efficiency: number; sourcePower: number; loadPower: number; loss: number }> }>; skipped: string[] };
}

/** One window row per rail (rollup.ts): over every mode (as the inspector shows), then per mode. */
export interface RailWindowLine {
  nodeId: Id;
  name: string;
  target: number;
  allowedMin: number;
  allowedMax: number;
  /** The roll-up's window over every mode and input case (the inspector's figure). */
  all: { min: number; max: number; inside: boolean; proved: boolean };
  /** Per operating mode, in the requirements' order (rollup.ts modeWindows). */
  modes: Array<{ modeId: Id; modeName: string; min: number; max: number; inside: boolean; proved: boolean; minCorner: string; maxCorner: string }>;
}

export interface ModeWindowsView { modes: Array<{ id: Id; name: string }>; rails: RailWindowLine[] }

export interface Requests {
  'project.snapshot': (args: Record<string, never>) => Snapshot;
  'project.new': (args: { discard?: boolean }) => Snapshot;
  'project.open': (args: { path: string; discard?: boolean }) => Snapshot;
  'project.openDemo': (args: { discard?: boolean }) => Snapshot;
  /**
   * Save to the project's file, or to `path` (Save As). An existing file other than the
   * project's own is replaced only with `overwrite: true` (else code `exists`); the
   * project's own file is never replaced when it changed on disk since it was opened
   * (code `changed`), whatever `overwrite` says.
   */
  'project.save': (args: { path?: string; overwrite?: boolean }) => ProjectState;
  'project.importJson': (args: { text: string; discard?: boolean }) => Snapshot;
  'project.rename': (args: { name: string }) => Snapshot;
  /** The project's description (free text shown in exports and the report). */
  'project.describe': (args: { description: string }) => Snapshot;

  'requirements.editCell': (args: CellEdit) => Snapshot;
  /**
   * Paste a rectangular block (from a spreadsheet) in one undoable step: `rowIds` are the
   * rows it lands on (rows past them are added), `fields` the columns. Any bad cell refuses
   * the whole block with every bad cell named by row and column; nothing changes.
   */
  'requirements.paste': (args: { table: Exclude<TableName, 'library'>; rowIds: Id[]; fields: string[]; cells: string[][] }) => Snapshot;
  'requirements.addRow': (args: { table: TableName }) => Snapshot & { rowId: Id };
  'requirements.removeRow': (args: { table: TableName; rowId: Id }) => Snapshot;
  'requirements.undo': (args: Record<string, never>) => Snapshot;
  'requirements.redo': (args: Record<string, never>) => Snapshot;

  'plan.start': (args: Record<string, never>) => PlanJob;
  'plan.cancel': (args: { jobId: string }) => { cancelled: boolean };
  'plan.select': (args: { planId: Id }) => Snapshot;
  /** Operating mode whose figures the tree shows (null = the mode with the most load power). */
  'plan.drawingMode': (args: { modeId: Id | null }) => Snapshot;

  'library.get': (args: Record<string, never>) => LibraryView;

  /** Leakage limits to compare a barrier against (labelled with standard and edition). */
  'isolation.limits': (args: Record<string, never>) => LeakageLimitView[];
  /** Y-capacitor leakage across a barrier, I = 2π·f·C·V, against the chosen limit. */
  'isolation.check': (args: { capacitance: string; voltageRms: string; frequency: string; limitId: string }) => BarrierCheckView;

  /**
   * Efficiency and loss of one stage of the shown plan, swept with the stage engine over load
   * (at Vin min/nom/max) and over Vin (at the roll-up's nominal operating point).
   */
  'plot.stageCurves': (args: { stageId: Id }) => StageCurvesView;
  /** The shown tree's system efficiency and source current versus one source's voltage, per mode (the roll-up at each voltage). */
  'plot.systemSweep': (args: { sourceId?: Id }) => SystemSweepView;
  /** The shown tree's rail windows per operating mode against each rail's band. */
  'plot.modeWindows': (args: Record<string, never>) => ModeWindowsView;

  /** An existing file at `path` is replaced only with `overwrite: true` (else code `exists`). */
  /** Read a load list (CSV or XLSX bytes as base64) and preview it under a guessed column mapping; changes nothing. */
  'loads.importRead': (args: { fileName: string; base64: string; sheet?: string }) => LoadImportFile;
  /** Preview the rows under a mapping: every bad cell by row and column; changes nothing. */
  'loads.importPreview': (args: { rows: string[][]; mapping: LoadImportMapping; decimalComma?: boolean }) => LoadImportPreview;
  /**
   * Add (or with `mapping.replace`, replace) the loads in one undoable edit. Any bad cell refuses
   * the whole import, unless `onlyGoodRows`: then the rows holding a bad cell are left out.
   */
  'loads.importApply': (args: { rows: string[][]; mapping: LoadImportMapping; decimalComma?: boolean; onlyGoodRows?: boolean }) => Snapshot & { imported: number; skipped: number };
  /**
   * Open a project from a file's bytes (the web host's file picker): checked like any project
   * file; the project is opened unsaved (no path), so Save asks for a file name.
   */
  'project.openBytes': (args: { fileName: string; base64: string; discard?: boolean }) => Snapshot;

  /**
   * `plot-svg`: a plot the window drew (`svg`, from src-renderer/lib/plot-svg.ts), checked and
   * written as a file of its own; `plotName` names the file (`<project>-<plotName>.svg`).
   */
  'export.file': (args: { kind: ExportKind; path?: string; stageId?: Id; overwrite?: boolean; svg?: string; plotName?: string }) => ExportFile;
}

export type RequestName = keyof Requests;
export type RequestArgs<K extends RequestName> = Parameters<Requests[K]>[0];
export type RequestValue<K extends RequestName> = ReturnType<Requests[K]>;

export interface PlanProgress {
  jobId: string;
  /** 0..1 where known, else null (anytime search without a bound). */
  fraction: number | null;
  /** Planner phase: 'rails', 'candidates' (designing candidate stages), 'search', 'done'. */
  phase: string;
  /** Candidate stage designs evaluated so far (the first, longest phase). */
  candidates: number;
  /** Branches of the tree search explored so far. */
  explored: number;
  /** Weighted score of the best complete tree so far (lower is better); null before one. */
  bestScore: number | null;
  elapsedMs: number;
  message: string;
}

export interface PlanFinished {
  jobId: string;
  outcome: 'done' | 'cancelled' | 'failed';
  message: string;
}

export interface Events {
  'plan.progress': PlanProgress;
  'plan.finished': PlanFinished;
  /** The project was replaced or changed outside the window's own request (menu, autosave). */
  'project.changed': Snapshot;
  /** Title-bar state: file name, unsaved mark, undo availability. */
  'project.state': ProjectState;
}

export type EventName = keyof Events;

/** The one object a host hands the window (`window.railwright`). */
export interface RailwrightBridge {
  host: 'electron' | 'web';
  request<K extends RequestName>(name: K, args: RequestArgs<K>): Promise<ApiResult<RequestValue<K>>>;
  on<E extends EventName>(event: E, listener: (payload: Events[E]) => void): () => void;
  /**
   * Native file dialog (desktop host only). Returns the chosen path, which the host then
   * accepts in a request; null when the user cancelled. The web host has none: the window
   * asks for a path itself.
   */
  choosePath?(purpose: 'open-project' | 'save-project' | 'export', suggestedName: string): Promise<string | null>;
}
