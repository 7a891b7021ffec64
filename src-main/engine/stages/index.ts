/**
 * The stage engine's entry points, used by the planner, the roll-up, the BOM and the
 * exports: designStage (choose every value), evaluateStage (one operating point) and
 * stageWindows (worst-case output windows over a corner set).
 */
import type { OperatingPoint, StageEvaluation, StageFlag, StageSpec } from './types.ts';
import { designBuck, evaluateBuck, type BuckDesign } from './buck/index.ts';
import { designCoupledBuck, evaluateCoupledBuck, type CoupledBuckDesign, type CoupledEvalOptions } from './cwbuck/index.ts';
import { designLdo, evaluateLdo, type LdoDesign } from './ldo/index.ts';
import { designBoost, evaluateBoost, type BoostDesign } from './boost/index.ts';
import { designInverting, evaluateInverting, type InvertingDesign } from './inverting/index.ts';
import { designFourSwitch, evaluateFourSwitch, type FourSwitchDesign } from './buck-boost-4s/index.ts';
import { designLoadSwitch, evaluateLoadSwitch, type LoadSwitchDesign } from './load-switch/index.ts';
import { designIsoModule, evaluateIsoModule, type IsoModuleDesign } from './iso-module/index.ts';
import { stageWindows as windows, type WindowCorners, type WindowOptions } from './windows.ts';
import type { OutputWindow } from './types.ts';
import { flag } from './common.ts';
import { kindModuleOf } from './registry.ts';

export type { BuckDesign } from './buck/index.ts';
export type { CoupledBuckDesign, SecondaryWinding, CoupledEvalOptions } from './cwbuck/index.ts';
export type { LdoDesign } from './ldo/index.ts';
export type { BoostDesign } from './boost/index.ts';
export type { InvertingDesign } from './inverting/index.ts';
export type { FourSwitchDesign } from './buck-boost-4s/index.ts';
export type { LoadSwitchDesign } from './load-switch/index.ts';
export type { IsoModuleDesign } from './iso-module/index.ts';
export type { CapacitorChoice } from './common.ts';
export type { WindowCorners, WindowOptions } from './windows.ts';
export { GENERIC_DEFAULTS } from './defaults.ts';

export type StageDesign = BuckDesign | CoupledBuckDesign | LdoDesign | BoostDesign | InvertingDesign | FourSwitchDesign | LoadSwitchDesign | IsoModuleDesign;

export type DesignResult =
  | { ok: true; design: StageDesign; reasons: string[]; /** Warnings (never errors). */ flags: StageFlag[] }
  | { ok: false; flags: StageFlag[] };

/** Bad arguments to evaluateStage/stageWindows: the message names the field and the reason. */
export class StageInputError extends RangeError {}

export function designStage(spec: StageSpec): DesignResult {
  if (!spec || typeof spec !== 'object') return { ok: false, flags: [flag('bad-input', 'error', 'spec: an object is required')] };
  try {
    const m = kindModuleOf(spec.kind);
    if (m) return m.design(spec) as DesignResult;
    return { ok: false, flags: [flag('unsupported-kind', 'error', `kind: "${String(spec.kind)}" has no stage model (buck, cwbuck, ldo, boost, inverting, buck-boost-4s, load-switch, iso-module)`, { field: 'kind' })] };
  } catch (e) {
    return { ok: false, flags: [flag('bad-input', 'error', `spec: ${(e as Error).message}`)] };
  }
}

function checkOp(design: StageDesign, op: OperatingPoint): void {
  if (!op || typeof op !== 'object') throw new StageInputError('operating point: an object {vin, iout, ambient} is required');
  if (typeof op.vin !== 'number' || !Number.isFinite(op.vin) || op.vin === 0) throw new StageInputError(`vin: must be a non-zero finite number (got ${String(op.vin)})`);
  if (design.kind !== 'ldo' && !(op.vin > 0)) throw new StageInputError(`vin: a switching stage needs a positive input (got ${op.vin})`);
  if (!Array.isArray(op.iout) || op.iout.length !== design.outputs.length) {
    throw new StageInputError(`iout: need one current per output (${design.outputs.length}), got ${Array.isArray(op.iout) ? op.iout.length : 'none'}`);
  }
  op.iout.forEach((i, k) => {
    if (typeof i !== 'number' || !Number.isFinite(i)) throw new StageInputError(`iout[${k}]: must be a finite number (got ${String(i)})`);
  });
  if (typeof op.ambient !== 'number' || !Number.isFinite(op.ambient)) throw new StageInputError(`ambient: must be a finite number (got ${String(op.ambient)})`);
}

export function evaluateStage(design: StageDesign, op: OperatingPoint, opts?: CoupledEvalOptions): StageEvaluation {
  checkOp(design, op);
  const m = kindModuleOf(design.kind);
  if (!m) throw new StageInputError(`kind: "${String(design.kind)}" has no stage model`);
  return m.evaluate(design, op, opts);
}

/** Whether a kind's evaluation depends on the operating mode (registry.ts `perMode`: a load switch). */
export function evaluatesPerMode(kind: unknown): boolean {
  return kindModuleOf(kind)?.perMode === true;
}

/** Whether a kind has a netlist writer (the switching kinds). */
export function hasStageNetlist(kind: unknown): boolean {
  return kindModuleOf(kind)?.netlist !== undefined;
}

/** The open-loop SPICE netlist of a design at one operating point, or null for a kind without one. */
export function stageNetlist(design: StageDesign, op: OperatingPoint): string | null {
  const m = kindModuleOf(design.kind);
  return m?.netlist ? m.netlist(design, op) : null;
}

export function stageWindows(design: StageDesign, corners: WindowCorners, opts?: WindowOptions): OutputWindow[] {
  try {
    return windows(design, corners, opts);
  } catch (e) {
    if (e instanceof RangeError) throw new StageInputError(e.message);
    throw e;
  }
}
