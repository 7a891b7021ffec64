/**
 * Efficiency and loss curves of one planned stage, swept with the stage engine itself
 * (evaluateStage through the roll-up's StageModels): over load (a fraction of the stage's
 * largest load in any mode and input case, every output scaled together) at the stage's
 * Vin min / nom / max, and over Vin min…max at the stage's nominal operating point.
 *
 * The operating point is the roll-up's own: the mode where the stage carries most power,
 * at the nominal input case. The Vin sweep contains that point's input voltage exactly,
 * so the curve passes through the number the Budget view shows (one number per quantity).
 * Pure: no IO.
 */
import type { Id, Rail, Requirements } from './model.ts';
import type { Plan } from './plan-types.ts';
import { designOutputOrder, rollupCaseAt, type Rollup, type StageModels, STAGE_MODELS, VIN_CASES } from './rollup.ts';
import type { Amps, Celsius, Volts } from './units.ts';

export interface CurvePoint {
  /** Load fraction of the stage's largest load (load sweep) or 1 (Vin sweep). */
  fraction: number;
  vin: number;
  /** Total output current (Σ |iout| over the stage's outputs). */
  iout: number;
  pin: number;
  pout: number;
  loss: number;
  efficiency: number;
}

export interface CurveSeries {
  /** "Vin min", "Vin nom", "Vin max" or "nominal load". */
  label: string;
  vin: number;
  points: CurvePoint[];
}

export interface StageCurves {
  stageId: Id;
  stageName: string;
  /** The operating point the curves are anchored on (the roll-up's figure). */
  operating: { modeId: Id; modeName: string; vin: number; iout: number[]; loss: number; efficiency: number };
  /** Per-output largest load (A) over every mode and input case: 100 % of the load axis. */
  ioutMax: number[];
  vinRange: { min: number; nom: number; max: number };
  /** Efficiency and loss versus load, one series per input case. */
  load: CurveSeries[];
  /** Efficiency and loss versus input voltage at the operating point's load. */
  input: CurveSeries;
  /** Points the engine refused (the message names the point); they are left out. */
  skipped: string[];
}

export class CurveError extends RangeError {}

export interface CurveOptions {
  /** Points per load series (default 16). */
  loadPoints?: number;
  /** Points of the Vin sweep, endpoints and the nominal point included (default 16). */
  vinPoints?: number;
  /** Lowest load fraction (default 0.05). */
  minFraction?: number;
  ambient?: number;
}

/**
 * Sweep one stage of a rolled-up plan. `rollup` must be the roll-up of `plan` (its stage
 * figures give the operating point and the input range).
 */
export function stageCurves(plan: Plan, rollup: Rollup, stageId: Id, ambient: number, models: StageModels = STAGE_MODELS, opts: CurveOptions = {}): StageCurves {
  const st = plan.stages.find((s) => s.id === stageId);
  if (!st) throw new CurveError(`stageId: no stage "${stageId}" in the plan`);
  if (!rollup.modes.length) throw new CurveError('rollup: no operating modes to take the operating point from');
  const nLoad = Math.max(2, Math.min(200, Math.round(opts.loadPoints ?? 16)));
  const nVin = Math.max(3, Math.min(200, Math.round(opts.vinPoints ?? 16)));
  const fMin = opts.minFraction ?? 0.05;
  if (!(fMin > 0 && fMin < 1)) throw new CurveError(`minFraction: must lie in (0, 1) (got ${fMin})`);
  const ids = designOutputOrder(st);
  const currents = (f: { outputs: Array<{ nodeId: Id; i: number }> }) => ids.map((id) => Math.abs(f.outputs.find((o) => o.nodeId === id)?.i ?? 0));

  // Operating point: the mode where the stage delivers most power, nominal input.
  let best: { modeId: Id; modeName: string; fig: Rollup['modes'][number]['cases']['nom']['stages'][number]; mode: Rollup['modes'][number] } | null = null;
  const ioutMax: number[] = ids.map(() => 0);
  for (const m of rollup.modes) {
    for (const c of VIN_CASES) {
      const f = m.cases[c].stages.find((x) => x.stageId === stageId);
      if (!f) continue;
      currents(f).forEach((i, k) => { ioutMax[k] = Math.max(ioutMax[k]!, i); });
    }
    const f = m.cases.nom.stages.find((x) => x.stageId === stageId);
    if (f && (!best || f.pout > best.fig.pout)) best = { modeId: m.modeId, modeName: m.modeName, fig: f, mode: m };
  }
  if (!best) throw new CurveError(`stageId: stage "${stageId}" has no figures in the roll-up`);
  const design = st.design;
  if (!design) throw new CurveError(`stageId: stage "${stageId}" carries no design`);
  const vinOf = (c: 'min' | 'max') => best!.mode.cases[c].stages.find((x) => x.stageId === stageId)?.vin ?? best!.fig.vin;
  const vNom = best.fig.vin;
  const a = vinOf('min');
  const b = vinOf('max');
  const vinRange = { min: Math.min(a, b, vNom), nom: vNom, max: Math.max(a, b, vNom) };
  const opIout = currents(best.fig);
  if (!ioutMax.some((i) => i > 0)) ioutMax.forEach((_, k) => { ioutMax[k] = opIout[k] ?? 0; });

  const skipped: string[] = [];
  const point = (vin: number, iout: number[], fraction: number): CurvePoint | null => {
    try {
      const ev = models.evaluate(design, { vin: vin as Volts, iout: iout as Amps[], ambient: ambient as Celsius });
      if (!Number.isFinite(ev.pin) || !Number.isFinite(ev.loss)) { skipped.push(`Vin ${vin} V, load ${(fraction * 100).toFixed(0)} %: non-finite power`); return null; }
      return { fraction, vin, iout: iout.reduce((s, x) => s + x, 0), pin: ev.pin, pout: ev.pout, loss: ev.loss, efficiency: ev.efficiency };
    } catch (e) {
      skipped.push(`Vin ${vin} V, load ${(fraction * 100).toFixed(0)} %: ${(e as Error).message}`);
      return null;
    }
  };

  const fractions = Array.from({ length: nLoad }, (_, k) => fMin + ((1 - fMin) * k) / (nLoad - 1));
  const cases: Array<[string, number]> = [['Vin min', vinRange.min], ['Vin nom', vinRange.nom], ['Vin max', vinRange.max]];
  const seen = new Set<number>();
  const load: CurveSeries[] = [];
  for (const [label, vin] of cases) {
    if (seen.has(vin)) continue;
    seen.add(vin);
    const points = fractions.map((f) => point(vin, ioutMax.map((i) => i * f), f)).filter((p): p is CurvePoint => p !== null);
    load.push({ label, vin, points });
  }

  const vins = new Set<number>([vinRange.min, vinRange.nom, vinRange.max]);
  for (let k = 0; k < nVin; k++) vins.add(vinRange.min + ((vinRange.max - vinRange.min) * k) / (nVin - 1));
  const vinAxis = [...vins].sort((x, y) => x - y);
  const input: CurveSeries = {
    label: 'nominal load', vin: vNom,
    points: vinAxis.map((v) => point(v, opIout, 1)).filter((p): p is CurvePoint => p !== null),
  };

  return {
    stageId, stageName: st.name,
    operating: { modeId: best.modeId, modeName: best.modeName, vin: vNom, iout: opIout, loss: best.fig.loss, efficiency: best.fig.efficiency },
    ioutMax, vinRange, load, input, skipped,
  };
}

export interface SystemPoint {
  /** The swept source's voltage. */
  v: number;
  /** Power into the tree from every source, power to the loads, their difference. */
  sourcePower: number;
  loadPower: number;
  loss: number;
  /** loadPower / sourcePower (the roll-up's system efficiency). */
  efficiency: number;
  /** Current drawn from the swept source. */
  sourceCurrent: number;
}

export interface SystemSweep {
  sourceId: Id;
  sourceName: string;
  range: { min: number; nom: number; max: number };
  modes: Array<{ modeId: Id; modeName: string; points: SystemPoint[] }>;
  /** Points the roll-up refused (the message names mode and voltage); they are left out. */
  skipped: string[];
}

/**
 * The whole tree versus one source's voltage, one series per operating mode: at each
 * voltage the roll-up's own leaves-up evaluation (rollupCaseAt) with that source there and
 * any other source at nominal. The axis runs over the source's range and contains its
 * min, nominal and max exactly, so those points are the roll-up's V min / nom / max cases.
 */
export function systemSourceSweep(req: Requirements, rails: Rail[], plan: Plan, sourceId: Id, models: StageModels = STAGE_MODELS, points = 21): SystemSweep {
  const src = req.sources.find((s) => s.id === sourceId);
  if (!src) throw new CurveError(`sourceId: no source "${sourceId}" in the requirements`);
  if (!req.modes.length) throw new CurveError('modes: no operating modes to sweep');
  const n = Math.max(3, Math.min(200, Math.round(points)));
  const lo = Math.min(src.vMin, src.vMax), hi = Math.max(src.vMin, src.vMax);
  const axis = new Set<number>([src.vMin, src.vNom, src.vMax]);
  for (let k = 0; k < n; k++) axis.add(lo + ((hi - lo) * k) / (n - 1));
  const vs = [...axis].sort((a, b) => a - b);
  const skipped: string[] = [];
  const modes = req.modes.map((m) => ({
    modeId: m.id, modeName: m.name,
    points: vs.flatMap((v): SystemPoint[] => {
      try {
        const c = rollupCaseAt(req, rails, plan, m.id, { [src.id]: v }, models);
        const s = c.sources[src.id];
        if (!s || !Number.isFinite(c.sourcePower) || !Number.isFinite(c.loadPower)) { skipped.push(`mode "${m.name}", ${src.name} at ${v} V: no finite power`); return []; }
        return [{ v, sourcePower: c.sourcePower, loadPower: c.loadPower, loss: c.loss, efficiency: c.efficiency, sourceCurrent: s.i }];
      } catch (e) {
        skipped.push(`mode "${m.name}", ${src.name} at ${v} V: ${(e as Error).message}`);
        return [];
      }
    }),
  }));
  return { sourceId: src.id, sourceName: src.name, range: { min: src.vMin, nom: src.vNom, max: src.vMax }, modes, skipped };
}

export interface SystemLoadPoint {
  /** Every load of the mode multiplied by this factor (1 = the mode as specified). */
  scale: number;
  sourcePower: number;
  loadPower: number;
  loss: number;
  efficiency: number;
}

/** Load factors of the system's load sweep: 10 % to 150 % of every load, 1 exactly included. */
export const LOAD_SCALES: readonly number[] = Array.from({ length: 15 }, (_, k) => (k + 1) / 10);

/**
 * The whole tree versus its load, one series per operating mode: every load current of the
 * mode multiplied by the same factor, every source at nominal, each point the roll-up's own
 * leaves-up evaluation (rollupCaseAt). At factor 1 the point is the roll-up's V nom case of
 * that mode, the Budget view's figures.
 */
export function systemLoadSweep(req: Requirements, rails: Rail[], plan: Plan, models: StageModels = STAGE_MODELS, scales: readonly number[] = LOAD_SCALES): { modes: Array<{ modeId: Id; modeName: string; points: SystemLoadPoint[] }>; skipped: string[] } {
  if (!req.modes.length) throw new CurveError('modes: no operating modes to sweep');
  const skipped: string[] = [];
  const modes = req.modes.map((m) => ({
    modeId: m.id, modeName: m.name,
    points: scales.flatMap((k): SystemLoadPoint[] => {
      const scaled = rails.map((r) => ({ ...r, current: { ...r.current, [m.id]: ((r.current[m.id] ?? 0) * k) as Amps } }));
      try {
        const c = rollupCaseAt(req, scaled, plan, m.id, {}, models);
        if (!Number.isFinite(c.sourcePower) || !Number.isFinite(c.loadPower)) { skipped.push(`mode "${m.name}", loads × ${k}: no finite power`); return []; }
        return [{ scale: k, sourcePower: c.sourcePower, loadPower: c.loadPower, loss: c.loss, efficiency: c.efficiency }];
      } catch (e) {
        skipped.push(`mode "${m.name}", loads × ${k}: ${(e as Error).message}`);
        return [];
      }
    }),
  }));
  return { modes, skipped };
}
