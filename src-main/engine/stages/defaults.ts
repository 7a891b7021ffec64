/**
 * GENERIC DEFAULTS, FROM MEMORY. Device parameters the stage designers use when the part
 * library supplies nothing better. They are round, typical-looking numbers for small
 * (≲ 5 A, ≲ 60 V) converters, not data of any particular part; every design copies the
 * values it used into itself, so a caller can override any of them per design.
 */

/** One MOSFET (or integrated switch) as the loss model needs it. */
export interface SwitchParams {
  /** On-resistance at 25 °C. */
  rdsOn: number;
  /** Total gate charge at the drive voltage. */
  qg: number;
  /** Output capacitance at the working voltage. */
  coss: number;
  /** Voltage rise and fall times of the switch node. */
  tr: number;
  tf: number;
  /** Body-diode reverse-recovery charge (C); absent: GENERIC_DEFAULTS.qrrPerAmp × the current. */
  qrr?: number;
}

/** A diode as Shockley's equation with series resistance: Vf = n·Vt·ln(1 + I/Is) + Rs·I. */
export interface DiodeModel {
  is: number;
  n: number;
  rs: number;
  /** ± spread of the forward drop (unit to unit and over temperature), as a ratio. */
  vfSpread: number;
  /**
   * Junction capacitance C(V) = cjo/(1 + Vr/vj)^m at reverse voltage Vr (SPICE CJO, VJ, M).
   * Absent: no capacitance (the coupled-winding model then ignores the leakage ring).
   */
  cjo?: number;
  vj?: number;
  m?: number;
  /** Transit time (SPICE TT): stored charge TT·I at turn-off, the recovery of silicon parts. */
  tt?: number;
}

export interface ControllerParams {
  /** Controller quiescent current drawn from Vin. */
  iq: number;
  minOnTime: number;
  maxDuty: number;
  /** Feedback reference and its tolerance over temperature. */
  vref: number;
  vrefTolerance: number;
  /** Largest reverse (negative) current the low-side switch may carry before the controller trips. */
  negCurrentLimit: number;
  /** Gate-drive voltage. */
  vDrive: number;
  /** Dead time at each edge. */
  deadTime: number;
}

export interface LdoPackage {
  name: string;
  /** Junction-to-ambient thermal resistance (JEDEC JESD51-2 style still-air figure). */
  thetaJA: number;
}

export const GENERIC_DEFAULTS = {
  source: 'generic defaults, from memory',
  /** Rds(on) rises ≈ 1.3–1.5× from 25 °C to a hot junction (common practice: ×1.4). */
  rdsHotFactor: 1.4,
  highSide: { rdsOn: 0.06, qg: 4e-9, coss: 120e-12, tr: 8e-9, tf: 8e-9 } satisfies SwitchParams,
  lowSide: { rdsOn: 0.035, qg: 6e-9, coss: 150e-12, tr: 8e-9, tf: 8e-9 } satisfies SwitchParams,
  /**
   * Body-diode stored charge per ampere it carries when the high side turns on, for the
   * reverse-recovery loss Qrr·Vin·fsw (from memory: small trench switches store a few nC per
   * ampere at the usual 20–50 ns dead times; 4 nC/A gives the ≈ 20 nC of a 5 A part).
   */
  qrrPerAmp: 4e-9,
  /** A silicon body diode (≈ 0.8 V at 1 A). */
  bodyDiode: { is: 5e-14, n: 1.0, rs: 0.02, vfSpread: 0.1 } satisfies DiodeModel,
  /** A small Schottky rectifier (≈ 0.4 V at 1 A). */
  rectifier: { is: 2e-6, n: 1.05, rs: 0.06, vfSpread: 0.1 } satisfies DiodeModel,
  controller: {
    iq: 1.5e-3, minOnTime: 100e-9, maxDuty: 0.9, vref: 0.8, vrefTolerance: 0.01,
    negCurrentLimit: 1.5, vDrive: 5, deadTime: 20e-9,
  } satisfies ControllerParams,
  /** θJA of a switch or controller package on a small board (K/W). */
  switchThetaJA: 60,
  controllerThetaJA: 60,
  /** θJA of a small rectifier package (K/W). */
  rectifierThetaJA: 90,
  /** Hot-spot rise of a small power inductor (K/W). */
  inductorThetaJA: 40,
  /** Inductor DCR ≈ dcrCoeff·√(L/1 µH)/√(Isat/1 A) Ω: a rough fit to shielded power inductors. */
  inductorDcrCoeff: 0.015,
  /**
   * Simple labelled core-loss model: a fraction κ of the ripple energy ½·L·ΔI² is lost each
   * cycle, P = κ·½·L·ΔI²·fsw (ferrite at moderate flux swing).
   */
  coreLossFraction: 0.05,
  /** Magnetizing-current ripple the designer aims for, as a share of the average current. */
  rippleTarget: 0.35,
  /** Coupling factor of a small multi-winding magnetic with interleaved windings. */
  coupling: 0.99,
  /**
   * Tolerances of a custom magnetic that the windows sweep and its specification sheet states
   * (one number each): Lp ±20 % (from memory: a gapped ferrite is usually held to ±10–20 %),
   * and each secondary's leakage between leakageLow × and 1 × the design's value, i.e. the
   * coupling between the design's k and the k that halves the leakage (from memory: leakage
   * varies by up to a factor of two between builds of the same winding instructions).
   */
  magneticTolerance: { inductance: 0.2, leakageLow: 0.5 },
  /** Saturation-current margin over the peak current. */
  saturationMargin: 0.3,
  /** Ceramic capacitor ESR per part. */
  ceramicEsr: 0.005,
  /** Class-2 ceramic DC-bias loss: retained capacitance ≈ 1 − biasLoss·(V/Vrated). */
  ceramicBiasLoss: 0.6,
  /** Ceramic ratings available (V). */
  ceramicRatings: [4, 6.3, 10, 16, 25, 35, 50, 63, 100],
  /** Largest single ceramic the designer uses before paralleling (F). */
  ceramicMaxUnit: 22e-6,
  /** Preload as a share of the secondary's largest current, at least preloadFloor (A). */
  preloadShare: 0.02,
  preloadFloor: 1e-3,
  /** Windings a small magnetic comfortably carries (common practice: 2–4 secondaries). */
  maxSecondaries: 3,
  /** Total output power a coupled-winding buck suits (common practice: ≲ 15 W). */
  coupledPowerLimit: 15,
  /** Duty at Vin min above which secondary regulation degrades (common practice: 0.5–0.6). */
  coupledDutyWarn: 0.55,
  ldo: {
    iq: 50e-6,
    /** Dropout at the rated current; scales linearly with current above a floor. */
    dropoutAtRated: 0.3,
    dropoutFloor: 0.03,
    /** Output accuracy over line, load and temperature. */
    accuracy: 0.015,
    /** Ripple rejection at a few hundred kHz (dB), and the headroom below which it fades. */
    psrrDb: 40,
    /**
     * Two-region PSRR against frequency and load (from memory, a generic LDO): the stated
     * psrrDb holds up to psrrCornerHz, above it the loop's gain runs out and the rejection
     * falls 20 dB per decade to a floor of psrrFloorDb (the output capacitor against the pass
     * device's capacitance); at the rated current it is psrrLoadDb lower (linear in the load).
     */
    psrrCornerHz: 100e3,
    psrrFloorDb: 20,
    psrrLoadDb: 6,
    psrrKnee: 0.5,
    /** Headroom margin kept above dropout (V). */
    headroomMargin: 0.1,
    packages: [
      { name: 'SOT-23-5', thetaJA: 200 },
      { name: 'DFN-6 2x2', thetaJA: 90 },
      { name: 'SOT-223', thetaJA: 60 },
      { name: 'TO-252', thetaJA: 40 },
    ] satisfies LdoPackage[],
    ratedCurrents: [0.15, 0.3, 0.5, 1, 1.5, 3],
  },
} as const;

/** Thermal voltage kT/q at 25 °C. */
export const VT = 0.025852;

/** Forward drop of a diode model at current i ≥ 0. */
export function diodeVf(d: DiodeModel, i: number): number {
  const ia = Math.max(0, i);
  return d.n * VT * Math.log1p(ia / d.is) + d.rs * ia;
}

/**
 * Time average of Vf while the current ramps linearly from 0 to ipk: (1/ipk)∫Vf(i)di.
 */
export function diodeVfRampAverage(d: DiodeModel, ipk: number): number {
  if (!(ipk > 0)) return 0;
  const x = ipk / d.is;
  // ∫0^I ln(1+i/Is) di = (Is+I)·ln(1+I/Is) − I
  const lnAvg = ((1 + x) * Math.log1p(x) - x) / x;
  return d.n * VT * lnAvg + (d.rs * ipk) / 2;
}
