/**
 * Efficiency and loss curves of a plan, from the real engine (pure, no IO).
 *
 * - Per stage, versus load: the stage model evaluated (`evaluateStage` through the roll-up's
 *   models) at 5–100 % of its load in its heaviest mode, every output scaled together, at
 *   the input voltage the roll-up finds for that stage with the source at V min, nom and
 *   max. The 100 % point at V nom is the roll-up's own evaluation of that mode.
 * - Per stage, versus input voltage: at the load of its heaviest mode, over the wider of its
 *   designed input range and the input the roll-up finds; the roll-up's own input voltages
 *   are among the points.
 * - The system, versus source voltage: the roll-up's leaves-up evaluation (`rollupCaseAt`)
 *   of one mode with one source swept over its range, the source's min, nom and max among
 *   the points.
 */
import type { Id, Rail, Requirements } from './model.ts';
import type { Plan } from './plan-types.ts';
import type { OperatingPoint } from './stages/types.ts';
import type { Amps, Celsius, Volts } from './units.ts';
import { rollupCaseAt, STAGE_MODELS, VIN_CASES, type Rollup, type StageModels, type VinCase } from './rollup.ts';

export interface StagePoint {
  /** Share of the reference load (1 = the heaviest mode's load). */
  fraction: number;
  vin: number;
  /** Output currents in the design's output order. */
  iout: number[];
  pin: number;
  pout: number;
  loss: number;
  efficiency: number;
}

export interface StageReference {
  stageId: Id;
  /** The mode in which the stage delivers the most power at V nom: its 100 % load. */
  modeId: Id;
  /** Output currents of that mode at V nom (design order). */
  iout: number[];
  /** The same at each input case (upstream stages draw a little differently). */
  ioutByCase: Record<VinCase, number[]>;
  /** Output node ids (design order). */
  nodeIds: Id[];
  /** The stage's input voltage with the source at V min, nom and max in that mode. */
  vin: Record<VinCase, number>;
}

export interface SystemPoint {
  sourceVoltage: number;
  sourcePower: number;
  loadPower: number;
  loss: number;
  efficiency: number;
}

/** `n` load fractions evenly from `from` to 1 (default 20 points, 5 % to 100 %). */
export function loadFractions(n = 20, from = 0.05): number[] {
  if (!(n >= 2)) return [1];
  return Array.from({ length: n }, (_, k) => (k === n - 1 ? 1 : from + ((1 - from) * k) / (n - 1)));
}

/** Evenly spaced values over [lo, hi] with `extra` merged in, sorted, repeats removed. */
export function sweepAxis(lo: number, hi: number, n: number, extra: number[] = []): number[] {
  const a = Math.min(lo, hi);
  const b = Math.max(lo, hi);
  const xs = b > a ? Array.from({ length: n }, (_, k) => a + ((b - a) * k) / (n - 1)) : [a];
  const all = [...xs, ...extra.filter((x) => Number.isFinite(x))].sort((p, q) => p - q);
  const out: number[] = [];
  for (const x of all) if (!out.length || Math.abs(x - out[out.length - 1]!) > 1e-9 * Math.max(1, Math.abs(x))) out.push(x);
  return out;
}

/**
 * The reference operating point of a stage from the plan's roll-up: the output currents the
 * roll-up gave the stage (each node's load current plus the input currents of the stages it
 * feeds, summed in the roll-up's own order), per input case.
 */
export function stageReference(r: Rollup, plan: Plan, rails: Rail[], stageId: Id, designOutputs: Id[]): StageReference | null {
  let best: { modeId: Id; pout: number } | null = null;
  for (const m of r.modes) {
    const f = m.cases.nom.stages.find((s) => s.stageId === stageId);
    if (f && (!best || f.pout > best.pout)) best = { modeId: m.modeId, pout: f.pout };
  }
  if (!best) return null;
  const m = r.modes.find((x) => x.modeId === best!.modeId)!;
  const inputOf = new Map(plan.stages.map((s) => [s.id, s.inputNodeId]));
  const railById = new Map(rails.map((x) => [x.id, x]));
  const currents = (c: VinCase) => {
    const iinAt = new Map<Id, number>();
    const st = m.cases[c].stages;
    for (let k = st.length - 1; k >= 0; k--) {
      const node = inputOf.get(st[k]!.stageId)!;
      iinAt.set(node, (iinAt.get(node) ?? 0) + Math.abs(st[k]!.iin));
    }
    return designOutputs.map((id) => Math.abs(railById.get(id)?.current[m.modeId] ?? 0) + (iinAt.get(id) ?? 0));
  };
  const at = (c: VinCase) => m.cases[c].stages.find((s) => s.stageId === stageId)!;
  const byCase = { min: currents('min'), nom: currents('nom'), max: currents('max') };
  const vin = { min: at('min').vin, nom: at('nom').vin, max: at('max').vin };
  return { stageId, modeId: m.modeId, iout: byCase.nom, ioutByCase: byCase, nodeIds: designOutputs, vin };
}

function point(models: StageModels, design: unknown, op: OperatingPoint, fraction: number): StagePoint {
  const ev = models.evaluate(design, op);
  return { fraction, vin: ev.vin, iout: op.iout.map(Number), pin: ev.pin, pout: ev.pout, loss: ev.loss, efficiency: ev.efficiency };
}

/** Efficiency and loss versus load at each of the given input voltages. */
export function stageLoadSweep(
  design: unknown,
  ref: { iout: number[] | number[][]; vin: number[]; ambient: number; mode?: Id },
  fractions: number[] = loadFractions(),
  models: StageModels = STAGE_MODELS,
): { vin: number; points: StagePoint[] }[] {
  /** One load for every input voltage, or one per input voltage. */
  const loadAt = (k: number): number[] => (Array.isArray(ref.iout[0]) ? (ref.iout as number[][])[k]! : (ref.iout as number[]));
  return ref.vin.map((vin, k) => ({
    vin,
    points: fractions.map((f) => point(models, design, { vin: vin as Volts, iout: loadAt(k).map((i) => (f === 1 ? i : i * f) as Amps), ambient: ref.ambient as Celsius, ...(ref.mode ? { mode: ref.mode } : {}) }, f)),
  }));
}

/** Efficiency and loss versus input voltage at the reference load. */
export function stageVinSweep(
  design: unknown,
  ref: { iout: number[]; vinMin: number; vinMax: number; include?: number[]; ambient: number; mode?: Id },
  points = 21,
  models: StageModels = STAGE_MODELS,
): StagePoint[] {
  return sweepAxis(ref.vinMin, ref.vinMax, points, ref.include).map((vin) =>
    point(models, design, { vin: vin as Volts, iout: ref.iout as Amps[], ambient: ref.ambient as Celsius, ...(ref.mode ? { mode: ref.mode } : {}) }, 1));
}

/** The system's efficiency and loss in one mode with one source swept over its range. */
export function systemVinSweep(
  req: Requirements, rails: Rail[], plan: Plan, modeId: Id, sourceId: Id, points = 21, models: StageModels = STAGE_MODELS,
): SystemPoint[] {
  const s = req.sources.find((x) => x.id === sourceId);
  if (!s) throw new RangeError(`sourceId: no source "${sourceId}"`);
  return sweepAxis(s.vMin, s.vMax, points, [s.vMin, s.vNom, s.vMax]).map((v) => {
    const c = rollupCaseAt(req, rails, plan, modeId, { [sourceId]: v }, models);
    return { sourceVoltage: v, sourcePower: c.sourcePower, loadPower: c.loadPower, loss: c.loss, efficiency: c.efficiency };
  });
}

export { VIN_CASES };
