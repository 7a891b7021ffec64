/**
 * A small, editable table of generic magnetic cores and core materials for the custom
 * magnetic's design (core-design.ts). Shapes are named by their generic family and size
 * (the E, EFD, EP and RM families of ferrite cores); every number is a typical value
 * written from memory, rounded, and must be confirmed against the chosen core's own data
 * before a build. Nothing here describes one maker's part.
 *
 * Units are SI: areas in m², lengths in m, volumes in m³, flux density in tesla.
 */

export interface CoreShape {
  /** Generic family and size, e.g. "EFD20/10/7". */
  name: string;
  family: 'E' | 'EFD' | 'EP' | 'RM';
  /** Effective magnetic cross-section Ae (m²). */
  ae: number;
  /** Effective magnetic path length le (m). */
  le: number;
  /** Effective core volume Ve (m³). */
  ve: number;
  /** Winding area of the usual bobbin Aw (m²). */
  aw: number;
  /** Winding breadth of the usual bobbin (m): the width one layer can use. */
  breadth: number;
  /** Mean length of one turn on the usual bobbin (m). */
  mlt: number;
  /** Outer surface of the wound part (m²), for the temperature-rise estimate. */
  surface: number;
  source: string;
}

export interface CoreMaterial {
  name: string;
  /** Initial relative permeability of the ungapped material. */
  mur: number;
  /** Saturation flux density at 100 °C (T). */
  bsatHot: number;
  /**
   * Steinmetz coefficients for Pv = k·f^alpha·B^beta, Pv in W/m³, f in Hz, B the peak
   * (half peak-to-peak) flux density in T; valid in [fMin, fMax] near 100 °C.
   */
  steinmetz: { k: number; alpha: number; beta: number; fMin: number; fMax: number };
  source: string;
}

const mm2 = 1e-6;
const mm = 1e-3;
const mm3 = 1e-9;
const cm2 = 1e-4;
const MEMORY = 'typical value from memory (generic core family), confirm with the core\'s data';

/** Ordered by area product Ae·Aw, smallest first. */
export const GENERIC_CORES: readonly CoreShape[] = ([
  { name: 'EP13', family: 'EP', ae: 19.5 * mm2, le: 24.2 * mm, ve: 472 * mm3, aw: 10 * mm2, breadth: 6.5 * mm, mlt: 24 * mm, surface: 7 * cm2, source: MEMORY },
  { name: 'E13/7/4', family: 'E', ae: 12.4 * mm2, le: 29.7 * mm, ve: 368 * mm3, aw: 18 * mm2, breadth: 7.6 * mm, mlt: 26 * mm, surface: 8 * cm2, source: MEMORY },
  { name: 'EFD15/8/5', family: 'EFD', ae: 15.0 * mm2, le: 34.0 * mm, ve: 510 * mm3, aw: 16 * mm2, breadth: 9.8 * mm, mlt: 28 * mm, surface: 9 * cm2, source: MEMORY },
  { name: 'E16/8/5', family: 'E', ae: 20.1 * mm2, le: 37.6 * mm, ve: 750 * mm3, aw: 22 * mm2, breadth: 9.6 * mm, mlt: 33 * mm, surface: 12 * cm2, source: MEMORY },
  { name: 'RM6', family: 'RM', ae: 37.0 * mm2, le: 29.2 * mm, ve: 1090 * mm3, aw: 17 * mm2, breadth: 6.4 * mm, mlt: 30 * mm, surface: 13 * cm2, source: MEMORY },
  { name: 'EFD20/10/7', family: 'EFD', ae: 31.0 * mm2, le: 47.0 * mm, ve: 1460 * mm3, aw: 27 * mm2, breadth: 13.5 * mm, mlt: 38 * mm, surface: 16 * cm2, source: MEMORY },
  { name: 'E20/10/6', family: 'E', ae: 32.0 * mm2, le: 43.0 * mm, ve: 1490 * mm3, aw: 34 * mm2, breadth: 12.0 * mm, mlt: 38 * mm, surface: 18 * cm2, source: MEMORY },
  { name: 'RM8', family: 'RM', ae: 64.0 * mm2, le: 38.0 * mm, ve: 2430 * mm3, aw: 30 * mm2, breadth: 8.7 * mm, mlt: 42 * mm, surface: 20 * cm2, source: MEMORY },
  { name: 'E25/13/7', family: 'E', ae: 52.0 * mm2, le: 57.5 * mm, ve: 2990 * mm3, aw: 60 * mm2, breadth: 15.5 * mm, mlt: 50 * mm, surface: 28 * cm2, source: MEMORY },
  { name: 'EFD25/13/9', family: 'EFD', ae: 58.0 * mm2, le: 57.0 * mm, ve: 3300 * mm3, aw: 45 * mm2, breadth: 18.0 * mm, mlt: 47 * mm, surface: 27 * cm2, source: MEMORY },
] satisfies CoreShape[]).sort((a, b) => a.ae * a.aw - b.ae * b.aw);

export const GENERIC_MATERIALS: readonly CoreMaterial[] = [
  {
    name: 'MnZn power ferrite, 25–400 kHz grade', mur: 2300, bsatHot: 0.38,
    steinmetz: { k: 2.5, alpha: 1.46, beta: 2.75, fMin: 25e3, fMax: 400e3 },
    source: 'typical values from memory for a general-purpose power ferrite at 100 °C',
  },
  {
    name: 'MnZn power ferrite, 200 kHz–1 MHz grade', mur: 1400, bsatHot: 0.37,
    steinmetz: { k: 0.18, alpha: 1.6, beta: 2.6, fMin: 200e3, fMax: 1e6 },
    source: 'typical values from memory for a high-frequency power ferrite at 100 °C',
  },
];
