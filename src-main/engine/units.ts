/**
 * Branded SI quantities. The engine works in base SI units only (V, A, Ω, H, F, Hz, W, s,
 * °C for temperatures); engineering notation is parsed once at the edges (see notation.ts).
 * A brand is a compile-time tag: `Volts` and `Amps` are both numbers at run time, but the
 * compiler refuses to pass one where the other is expected.
 */
declare const brand: unique symbol;
export type Brand<T, B extends string> = T & { readonly [brand]: B };

export type Volts = Brand<number, 'V'>;
export type Amps = Brand<number, 'A'>;
export type Ohms = Brand<number, 'Ω'>;
export type Henries = Brand<number, 'H'>;
export type Farads = Brand<number, 'F'>;
export type Hertz = Brand<number, 'Hz'>;
export type Watts = Brand<number, 'W'>;
export type Seconds = Brand<number, 's'>;
export type Celsius = Brand<number, '°C'>;
/** A temperature difference or thermal resistance in kelvin per watt. */
export type KelvinPerWatt = Brand<number, 'K/W'>;
/** A dimensionless ratio (tolerance 0.05 = ±5 %, duty cycle, efficiency, share of time). */
export type Ratio = Brand<number, '1'>;
export type Coulombs = Brand<number, 'C'>;

export const V = (x: number) => x as Volts;
export const A = (x: number) => x as Amps;
export const ohm = (x: number) => x as Ohms;
export const H = (x: number) => x as Henries;
export const F = (x: number) => x as Farads;
export const Hz = (x: number) => x as Hertz;
export const W = (x: number) => x as Watts;
export const s = (x: number) => x as Seconds;
export const degC = (x: number) => x as Celsius;
export const KpW = (x: number) => x as KelvinPerWatt;
export const ratio = (x: number) => x as Ratio;
export const C = (x: number) => x as Coulombs;

/** The unit symbol each quantity kind is written with at the edges. */
export type QuantityKind =
  | 'voltage' | 'current' | 'resistance' | 'inductance' | 'capacitance'
  | 'frequency' | 'power' | 'time' | 'temperature' | 'thermal-resistance' | 'ratio' | 'charge';

export const UNIT_SYMBOL: Record<QuantityKind, string> = {
  voltage: 'V', current: 'A', resistance: 'Ω', inductance: 'H', capacitance: 'F',
  frequency: 'Hz', power: 'W', time: 's', temperature: '°C', 'thermal-resistance': 'K/W',
  ratio: '', charge: 'C',
};
