/**
 * Roll-up and BOM figures of one plan for the window, converted to the contract's plain
 * shapes. Computation lives in the engine (rollup.ts, bom.ts); this module only adapts.
 */
import type { Plan } from '../engine/plan-types.ts';
import type { TreeFigures } from '../engine/layout.ts';
import type { BomView, RollupView } from './contract.ts';
import type { Session } from './session.ts';

export function computeRollup(_s: Session, _plan: Plan): RollupView {
  throw new Error('the roll-up is not part of this build yet');
}

export function computeBom(_s: Session, _plan: Plan): BomView {
  throw new Error('the BOM estimate is not part of this build yet');
}

export function treeFigures(_s: Session, _rollup: RollupView | null): TreeFigures | undefined {
  return undefined;
}
