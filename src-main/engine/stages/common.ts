/** Pieces the stage designers share: capacitor choice with derating, flags, thermal parts. */
import { atLeast, nearest } from '../eseries.ts';
import type { DissipatingPart, StageFlag } from './types.ts';
import type { Celsius, KelvinPerWatt, Watts } from '../units.ts';
import { GENERIC_DEFAULTS } from './defaults.ts';

/** A capacitor bank: `count` equal ceramic parts in parallel. */
export interface CapacitorChoice {
  role: string;
  /** Nominal value of one part (E6). */
  value: number;
  count: number;
  /** Rated voltage of one part. */
  ratedVoltage: number;
  /** Largest DC voltage the bank sees. */
  workingVoltage: number;
  dielectric: 'ceramic';
  /** ESR of the whole bank. */
  esr: number;
  /** Capacitance left at the working voltage (DC-bias derating), whole bank. */
  effective: number;
  /** Working voltage / rated voltage. */
  stress: number;
  /** Capacitance the bank must keep at its working voltage (F), when the designer said. */
  needEffective?: number;
  /** Largest RMS ripple current the bank carries (A), when the designer computed it. */
  rmsCurrent?: number;
  /**
   * Ripple-current rating of one part (A) when known: the library row's, or for a ceramic row
   * without one the generic rating of its case size (part-choice.ts).
   */
  rippleRating?: number;
  /** Kind of part the bank is made of (absent: ceramic). */
  partKind?: 'ceramic' | 'polymer' | 'aluminium';
}

/**
 * Capacitance a class-II ceramic keeps at its working DC voltage (share of nominal). Without a
 * case size: the generic 1 − 0.6·V/Vrated. With one (a library row's package), a generic
 * curve by case and rated voltage, from memory: the share kept at the rated voltage is about
 * 0402 0.2, 0603 0.25, 0805 0.35, 1206 0.45, 1210 0.55, 1812 0.6 (small cases have the
 * thinnest layers for a given value and lose most), and the loss rises fast at first,
 * 1 − (1 − r₁)·(V/Vrated)^0.7. Class-I dielectrics (C0G/NP0) keep their capacitance.
 */
export const CERAMIC_KEPT_AT_RATED: Record<string, number> = { '0402': 0.2, '0603': 0.25, '0805': 0.35, '1206': 0.45, '1210': 0.55, '1812': 0.6 };

export function ceramicRetained(working: number, rated: number, kase?: string, dielectric?: string): number {
  if (dielectric && /^(C0G|NP0|COG)$/i.test(dielectric)) return 1;
  const r1 = kase ? CERAMIC_KEPT_AT_RATED[kase] : undefined;
  if (r1 === undefined) return Math.max(0.2, 1 - GENERIC_DEFAULTS.ceramicBiasLoss * (working / rated));
  const x = Math.min(1, Math.max(0, Math.abs(working) / rated));
  return Math.max(0.15, 1 - (1 - r1) * x ** 0.7);
}

/**
 * A ceramic bank holding at least `needEffective` farads at `working` volts, with the rating
 * chosen so working ≤ derating·rated (derating 0.6 = use at most 60 % of the rating).
 */
export function chooseCeramic(role: string, needEffective: number, working: number, derating: number, minValue = 1e-6): CapacitorChoice {
  const w = Math.abs(working);
  const rated = GENERIC_DEFAULTS.ceramicRatings.find((r) => w <= derating * r + 1e-12)
    ?? GENERIC_DEFAULTS.ceramicRatings[GENERIC_DEFAULTS.ceramicRatings.length - 1]!;
  const keep = ceramicRetained(w, rated);
  const needNominal = Math.max(minValue, needEffective / keep);
  const unitMax = GENERIC_DEFAULTS.ceramicMaxUnit;
  let value: number;
  let count: number;
  if (needNominal <= unitMax) {
    value = atLeast('E6', needNominal);
    count = 1;
  } else {
    value = nearest('E6', unitMax);
    count = Math.ceil(needNominal / value - 1e-9);
  }
  return {
    role, value, count, ratedVoltage: rated, workingVoltage: w, dielectric: 'ceramic', needEffective,
    esr: GENERIC_DEFAULTS.ceramicEsr / count,
    effective: value * count * keep,
    stress: w / rated,
  };
}

export function part(role: string, power: number, thetaJA: number, ambient: number, source: DissipatingPart['thetaSource'] = 'default-from-memory'): DissipatingPart {
  return { role, power: power as Watts, thetaJA: thetaJA as KelvinPerWatt, thetaSource: source, tj: (ambient + power * thetaJA) as Celsius };
}

export function flag(code: string, severity: StageFlag['severity'], text: string, data?: Record<string, number | string>): StageFlag {
  return data ? { code, severity, text, data } : { code, severity, text };
}

/** Round for messages: 3 significant figures. */
export function r3(x: number): number {
  return Number.parseFloat(x.toPrecision(3));
}

/** Thermal flags for every part whose Tj passes the limit. */
export function thermalFlags(parts: DissipatingPart[], tjMax: number): StageFlag[] {
  return parts.filter((p) => p.tj > tjMax).map((p) =>
    flag('tj-over-limit', 'error', `${p.role}: junction ${r3(p.tj)} °C exceeds the ${tjMax} °C limit (${r3(p.power)} W × ${p.thetaJA} K/W above ambient)`,
      { role: p.role, tj: r3(p.tj), limit: tjMax, power: r3(p.power) }));
}

/** Deterministic PRNG for the seeded Monte Carlo (the project's one generator). */
export { seededRandom as mulberry32 } from '../random.ts';

/**
 * Warn for every capacitor bank whose RMS ripple current at this point passes its parts'
 * rating × count (banks without a known rating are not checked).
 */
export function bankRippleFlags(banks: { bank: CapacitorChoice; rms: number }[]): StageFlag[] {
  const out: StageFlag[] = [];
  for (const { bank, rms } of banks) {
    const r = bank.rippleRating;
    if (!(r !== undefined && r > 0) || !(rms > r * bank.count * (1 + 1e-9))) continue;
    out.push(flag('capacitor-ripple-over-rating', 'warning',
      `${bank.role} capacitor bank carries ${r3(rms)} A rms, above its rating ${bank.count} × ${r3(r)} A = ${r3(r * bank.count)} A`,
      { role: bank.role, rms: r3(rms), rating: r3(r), count: bank.count }));
  }
  return out;
}

/** Warn for every output whose ripple passes its limit. */
export function rippleFlags(outputs: { nodeId: string; ripplePP: number }[], specs: { rippleLimit: number }[]): StageFlag[] {
  const out: StageFlag[] = [];
  outputs.forEach((o, i) => {
    const lim = specs[i]?.rippleLimit;
    if (lim !== undefined && o.ripplePP > lim) {
      out.push(flag('ripple-over-limit', 'warning', `${o.nodeId}: ripple ${r3(o.ripplePP * 1e3)} mV peak-to-peak exceeds the ${r3(lim * 1e3)} mV limit`,
        { nodeId: o.nodeId, ripple: r3(o.ripplePP), limit: lim }));
    }
  });
  return out;
}
