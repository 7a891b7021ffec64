/** Display formatting at the window's edge (engineering notation from the engine's notation module, through the contract's window-shared.ts). */
import { formatQuantity, formatTolerance } from '../../src-main/api/window-shared.ts';
import type { QuantityKind } from '../../src-main/api/contract.ts';

export const q = (v: number | null | undefined, kind: QuantityKind, sig = 3): string =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : formatQuantity(v, kind, sig);
export const pct = (r: number | null | undefined, digits = 1): string =>
  r === null || r === undefined || !Number.isFinite(r) ? '—' : `${(r * 100).toFixed(digits)} %`;
export const tol = (r: number): string => formatTolerance(r);
export const money = (x: number, currency: string): string =>
  Number.isFinite(x) ? `${cost(x)} ${currency}` : '—';
/**
 * A cost: two decimals, except a non-zero cost below a cent, which keeps two significant
 * digits (a resistor at 0.002 never reads "0.00").
 */
export const cost = (x: number): string => {
  if (!Number.isFinite(x)) return '—';
  if (x !== 0 && Math.abs(x) < 0.005) return String(Number(x.toPrecision(2)));
  return x.toFixed(2);
};
/** A plain number with a few significant digits (design values of unknown unit). */
export const num = (x: number, sig = 4): string => (Number.isFinite(x) ? String(Number(x.toPrecision(sig))) : '—');
