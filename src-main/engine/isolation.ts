/**
 * Isolation barriers: Y-capacitor leakage I = 2π·f·C·V across a barrier against a limit
 * the user picks from a short list. The limits below are quoted FROM MEMORY with the
 * standard and edition they come from; check them against the edition that applies.
 * This module certifies nothing.
 */
import { isolationRank, type IsolationClass } from './model.ts';

export const ISOLATION_CAUTIONS: readonly string[] = [
  'Mains and isolation barriers can kill: this tool records and estimates, it certifies nothing.',
  'Creepage, clearance, insulation and touch current follow the applicable safety standard and local codes.',
  'A qualified engineer and the test laboratory decide whether a barrier is adequate.',
];

export interface LeakageLimit {
  id: string;
  label: string;
  /** Limit in amperes (RMS). */
  limit: number;
  standard: string;
  source: 'from memory';
}

export const LEAKAGE_LIMITS: readonly LeakageLimit[] = [
  { id: 'ite-class2', label: 'IT equipment, class II, touch current', limit: 0.25e-3, standard: 'IEC 60950-1:2005 (ed. 2, withdrawn and superseded by IEC 62368-1; kept for equipment still assessed to it)', source: 'from memory' },
  { id: 'ite-class1-handheld', label: 'IT equipment, class I hand-held, touch current', limit: 0.75e-3, standard: 'IEC 60950-1:2005 (ed. 2, withdrawn and superseded by IEC 62368-1; kept for equipment still assessed to it)', source: 'from memory' },
  { id: 'ite-class1-movable', label: 'IT equipment, class I movable, touch current', limit: 3.5e-3, standard: 'IEC 60950-1:2005 (ed. 2, withdrawn and superseded by IEC 62368-1; kept for equipment still assessed to it)', source: 'from memory' },
  { id: 'av-ict-es1', label: 'audio/video and ICT equipment, ES1 touch current', limit: 0.5e-3, standard: 'IEC 62368-1:2018 (ed. 3; a later edition may apply)', source: 'from memory' },
  { id: 'medical-touch-normal', label: 'medical equipment, touch current, normal condition', limit: 0.1e-3, standard: 'IEC 60601-1:2005+A1:2012 (ed. 3.1)', source: 'from memory' },
  { id: 'medical-touch-fault', label: 'medical equipment, touch current, single fault', limit: 0.5e-3, standard: 'IEC 60601-1:2005+A1:2012 (ed. 3.1)', source: 'from memory' },
];

/** Leakage through a capacitance C at V (RMS) and frequency f: I = 2π·f·C·V. */
export function yCapLeakage(capacitance: number, voltageRms: number, frequency: number): number {
  return 2 * Math.PI * frequency * capacitance * voltageRms;
}

export interface BarrierCheck {
  current: number;
  limit: LeakageLimit;
  ok: boolean;
  /** limit − current (A); negative when over. */
  margin: number;
  /** Largest capacitance that stays within the limit. */
  maxCapacitance: number;
  text: string;
  cautions: readonly string[];
}

export function checkBarrier(input: { capacitance: number; voltageRms: number; frequency: number; limitId: string }): BarrierCheck {
  const { capacitance, voltageRms, frequency, limitId } = input;
  for (const [k, v] of Object.entries({ capacitance, voltageRms, frequency })) {
    if (typeof v !== 'number' || !Number.isFinite(v) || v < 0) throw new RangeError(`${k}: must be a finite number ≥ 0 (got ${String(v)})`);
  }
  const limit = LEAKAGE_LIMITS.find((l) => l.id === limitId);
  if (!limit) throw new RangeError(`limitId: "${limitId}" is not one of ${LEAKAGE_LIMITS.map((l) => l.id).join(', ')}`);
  const current = yCapLeakage(capacitance, voltageRms, frequency);
  const maxCapacitance = voltageRms > 0 && frequency > 0 ? limit.limit / (2 * Math.PI * frequency * voltageRms) : Infinity;
  const ok = current <= limit.limit;
  const µA = (x: number) => `${Number.parseFloat((x * 1e6).toPrecision(3))} µA`;
  return {
    current, limit, ok, margin: limit.limit - current, maxCapacitance,
    text: `${µA(current)} through ${Number.parseFloat((capacitance * 1e9).toPrecision(3))} nF at ${voltageRms} V ${frequency} Hz; limit ${µA(limit.limit)} (${limit.label}, ${limit.standard}, ${limit.source})${ok ? '' : ': OVER the limit'}`,
    cautions: ISOLATION_CAUTIONS,
  };
}

/** The strictest of two barriers on a path (isolationRank, engine/model.ts). */
export function strictest(a: IsolationClass, b: IsolationClass): IsolationClass {
  return isolationRank(a) >= isolationRank(b) ? a : b;
}
