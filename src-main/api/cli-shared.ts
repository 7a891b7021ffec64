/**
 * The pure engine values and types the command line prints with, re-exported so the CLI
 * (src-main/cli.ts, src-main/cli/) reaches the engine only through src-main/api
 * (test/boundaries.test.ts). Operations (validate, plan, roll-up, library, export, stage)
 * are the api functions the window's handlers use; this module only carries the shared
 * text rules, rail grouping, battery figures and types. Quantities are formatted with
 * window-shared.ts, as in the window.
 */
export { checkText, showText } from '../engine/text-rules.ts';
export { groupRails, railPeakCurrent } from '../engine/rails.ts';
export { CHEMISTRY_PRESETS, batteryRuntime, runtimeText, usableEnergy } from '../engine/battery.ts';
export { DEFAULT_WINDOW_MARGIN, type PartLibraryRow, type Requirements } from '../engine/model.ts';
export { RollupError } from '../engine/rollup.ts';
export type { LibraryRow as TypedLibraryRow } from '../engine/library.ts';
export type { Plan, PlanResult } from '../engine/plan-types.ts';
export type { Objective } from '../engine/planner/score.ts';
export type { Problem } from '../engine/validate.ts';
export type { ElkLike } from '../engine/layout.ts';
