/**
 * Battery sources: chemistry presets (generic discharge curves from memory, editable per
 * project), the usable energy down to the end-of-discharge voltage, and the runtime for a
 * mode mix. Pure functions.
 *
 * Presets: cell voltage against state of charge (1 = full, 0 = empty) at a moderate rate and
 * room temperature, round numbers from memory, not data of any cell. A project may give its own
 * `curve` instead.
 */
import type { BatteryChemistry, BatterySpec } from './model.ts';

export interface ChemistryPreset {
  label: string;
  /** Series cells allowed by the presets. */
  cells: readonly number[];
  /** [state of charge, cell voltage] from full to empty. */
  curve: ReadonlyArray<readonly [number, number]>;
  /** Usual end-of-discharge voltage per cell. */
  endVoltage: number;
}

export const CHEMISTRY_PRESETS: Record<BatteryChemistry, ChemistryPreset> = {
  'li-ion': { label: 'Li-ion', cells: [1, 2, 3], endVoltage: 3.0, curve: [[1, 4.2], [0.9, 4.05], [0.7, 3.87], [0.5, 3.75], [0.3, 3.65], [0.15, 3.5], [0.05, 3.3], [0, 3.0]] },
  lifepo4: { label: 'LiFePO4', cells: [1, 2, 3, 4], endVoltage: 2.5, curve: [[1, 3.6], [0.95, 3.4], [0.7, 3.32], [0.3, 3.27], [0.1, 3.15], [0.03, 2.9], [0, 2.5]] },
  alkaline: { label: 'alkaline', cells: [2, 3, 4], endVoltage: 0.9, curve: [[1, 1.6], [0.9, 1.45], [0.7, 1.33], [0.5, 1.25], [0.3, 1.17], [0.1, 1.05], [0, 0.9]] },
  nimh: { label: 'NiMH', cells: [2, 3, 4], endVoltage: 1.0, curve: [[1, 1.42], [0.9, 1.3], [0.7, 1.25], [0.3, 1.2], [0.1, 1.15], [0.03, 1.1], [0, 1.0]] },
};

export const BATTERY_CHEMISTRIES = Object.keys(CHEMISTRY_PRESETS) as BatteryChemistry[];

/** The cell curve in use: the project's own, else the preset's. */
export function cellCurve(b: BatterySpec): ReadonlyArray<readonly [number, number]> {
  return b.curve && b.curve.length >= 2 ? b.curve : CHEMISTRY_PRESETS[b.chemistry].curve;
}

/** Pack voltage when full (state of charge 1). */
export function packFullVoltage(b: BatterySpec): number {
  const c = cellCurve(b);
  return Math.max(...c.map((p) => p[1])) * b.cells;
}

/**
 * Usable energy (Wh) from full down to the end-of-discharge pack voltage: capacity·∫V dSOC
 * over the curve (trapezoids, the last segment cut where the pack reaches the end voltage),
 * and the mean pack voltage over that span.
 */
export function usableEnergy(b: BatterySpec): { wh: number; meanVoltage: number; usableShare: number } {
  const pts = [...cellCurve(b)].sort((a, b2) => b2[0] - a[0]);
  const end = b.endVoltage / b.cells;
  let integral = 0, span = 0;
  for (let k = 0; k + 1 < pts.length; k++) {
    const [s0, v0] = pts[k]!, [s1, v1] = pts[k + 1]!;
    if (v0 <= end) break;
    if (v1 >= end) { integral += ((v0 + v1) / 2) * (s0 - s1); span += s0 - s1; continue; }
    const t = (v0 - end) / (v0 - v1);
    const sCut = s0 - t * (s0 - s1);
    integral += ((v0 + end) / 2) * (s0 - sCut); span += s0 - sCut;
    break;
  }
  const wh = b.capacity * integral * b.cells;
  return { wh, meanVoltage: span > 0 ? (integral / span) * b.cells : 0, usableShare: span };
}

export interface BatteryRuntime {
  sourceId: string;
  energyWh: number;
  meanVoltage: number;
  /** Hours at each mode's power drawn from this source, and for the time-weighted mix. */
  perMode: Array<{ modeId: string; modeName: string; power: number; hours: number }>;
  mixPower: number;
  mixHours: number;
}

/**
 * Runtime of a battery source: usable energy over the power drawn from it, per mode and for
 * the mode mix (Σ share·power). Infinite when a mode draws nothing.
 */
export function batteryRuntime(sourceId: string, b: BatterySpec, modes: ReadonlyArray<{ id: string; name: string; share: number }>, powerOf: (modeId: string) => number): BatteryRuntime {
  const e = usableEnergy(b);
  const shareSum = modes.reduce((a, m) => a + m.share, 0) || 1;
  const perMode = modes.map((m) => {
    const p = powerOf(m.id);
    return { modeId: m.id, modeName: m.name, power: p, hours: p > 0 ? e.wh / p : Infinity };
  });
  const mixPower = perMode.reduce((a, m, i) => a + (modes[i]!.share / shareSum) * m.power, 0);
  return { sourceId, energyWh: e.wh, meanVoltage: e.meanVoltage, perMode, mixPower, mixHours: mixPower > 0 ? e.wh / mixPower : Infinity };
}

/** Hours as an engineer reads them: hours below two days, else days; "no draw" for none. */
export function hoursText(h: number): string {
  if (!Number.isFinite(h)) return 'no draw';
  return h < 48 ? `${+h.toPrecision(3)} h` : `${+(h / 24).toPrecision(3)} days`;
}

/** One sentence on a battery's runtime (report, CLI): the mix and each mode, with the powers. */
export function runtimeText(rt: BatteryRuntime, sourceName: string): string {
  const w = (p: number) => (p >= 1 ? `${+p.toPrecision(3)} W` : `${+(p * 1e3).toPrecision(3)} mW`);
  return `${sourceName}: ${+rt.energyWh.toPrecision(3)} Wh usable to the end-of-discharge voltage; runtime ${hoursText(rt.mixHours)} for the mode mix (${w(rt.mixPower)} drawn)` +
    `; ${rt.perMode.map((m) => `${m.modeName} ${hoursText(m.hours)} (${w(m.power)})`).join(', ')}`;
}
