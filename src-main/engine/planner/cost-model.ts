/**
 * Default cost model of the planner: INVENTED ESTIMATES, not prices. They only rank plans
 * against each other until the part library (engine/library.ts) supplies its own prices; the
 * planner takes the cost model as a parameter so the library can replace this table.
 * Currency units are those of the library (unnamed here).
 */
import type { StageKind } from '../model.ts';
import type { CostModel, PartCounts } from './types.ts';

/** Unit cost per part category: invented estimates. */
export const INVENTED_UNIT_COST: Readonly<Record<keyof PartCounts, number>> = {
  controller: 0.9,
  switch: 0.25,
  magnetic: 0.35,
  /** A custom multi-winding magnetic costs more than a stock inductor (invented estimate). */
  coupledMagnetic: 1.1,
  rectifier: 0.06,
  capacitor: 0.03,
  resistor: 0.005,
  ldo: 0.22,
  /** Insulation system of one barrier on a magnetic (invented estimate). */
  barrier: 0.6,
};

export function emptyParts(): PartCounts {
  return { controller: 0, switch: 0, magnetic: 0, coupledMagnetic: 0, rectifier: 0, capacitor: 0, resistor: 0, ldo: 0, barrier: 0 };
}

export function addParts(a: PartCounts, b: PartCounts): PartCounts {
  const out = emptyParts();
  for (const k of Object.keys(out) as (keyof PartCounts)[]) out[k] = a[k] + b[k];
  return out;
}

/** Number of parts (barriers are priced, not counted). */
export function countParts(p: PartCounts): number {
  let n = 0;
  for (const k of Object.keys(p) as (keyof PartCounts)[]) if (k !== 'barrier') n += p[k];
  return n;
}

/** Parts of a typical synchronous buck: controller, two switches, inductor, in/out caps, divider. */
export const TYPICAL_BUCK_PARTS: PartCounts = {
  controller: 1, switch: 2, magnetic: 1, coupledMagnetic: 0, rectifier: 0, capacitor: 4, resistor: 2, ldo: 0, barrier: 0,
};

export function priceParts(p: PartCounts, unit: Readonly<Record<keyof PartCounts, number>>): number {
  let c = 0;
  for (const k of Object.keys(p) as (keyof PartCounts)[]) c += p[k] * unit[k];
  return Math.round(c * 1e6) / 1e6;
}

/** The default (invented) cost model. */
export function inventedCostModel(unit: Readonly<Record<keyof PartCounts, number>> = INVENTED_UNIT_COST): CostModel {
  return {
    cost: (parts: PartCounts, _kind: StageKind) => priceParts(parts, unit),
    referenceStageCost: priceParts(TYPICAL_BUCK_PARTS, unit),
    referenceStageParts: countParts(TYPICAL_BUCK_PARTS),
  };
}
