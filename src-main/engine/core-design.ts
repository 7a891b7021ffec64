/**
 * Design of a custom magnetic on a real core: core choice by area product, turns from the
 * flux limit, air gap for the inductance, wire from the AWG table with a window-fill check,
 * AC resistance at the switching frequency, copper and core loss, temperature rise and a
 * leakage estimate. Pure computation in SI units.
 *
 * Sources, beside each equation:
 * - [McLyman] W. T. McLyman, *Transformer and Inductor Design Handbook*: area product
 *   Ap = Ae·Aw ≥ L·Ipk·Irms/(Bmax·J·Ku) (inductor design by the area-product method), the
 *   surface temperature rise ΔT = 450·ψ^0.826 °C with ψ the loss per surface in W/cm².
 * - [Erickson] R. W. Erickson, D. Maksimović, *Fundamentals of Power Electronics*, ch. 13
 *   (Dowell's one-dimensional winding loss: F_R for m layers of thickness h, penetration
 *   ratio Δ = h/δ, and its low-frequency form 1 + (5m² − 1)·Δ⁴/45) and ch. 14 (turns from
 *   the flux limit N ≥ L·Ipk/(Bmax·Ae), gap lg = µ0·N²·Ae/L − le/µr from the reluctance of
 *   core plus gap, leakage of two concentric windings).
 * - Steinmetz's equation Pv = k·f^α·B^β with coefficients per material (core-table.ts,
 *   from memory). It is written for sinusoidal flux; a triangular flux of the same peak
 *   loses somewhat differently (the improved form would need the duty cycle), so the core
 *   loss is an estimate and says so.
 * - Copper: ASTM B258 gauge diameters and 1/58 Ω·mm²/m at 20 °C rising 0.393 %/K (awg.ts);
 *   skin depth δ ≈ 66/√f mm for copper at 20 °C (common textbook value), scaled by
 *   √(ρ(T)/ρ20).
 *
 * Design turns (the integers that set the voltage ratio) are scaled by one common integer
 * so the ratio is kept exactly while the primary has enough turns for the flux limit.
 */
import { awgAreaMm2, awgDiameterMm, COPPER_TEMPCO, wireFor } from './awg.ts';
import { GENERIC_CORES, GENERIC_MATERIALS, type CoreMaterial, type CoreShape } from './core-table.ts';
import type { IsolationClass } from './model.ts';

export const MU0 = 4e-7 * Math.PI;
const COPPER_RHO_20C_SI = (1 / 58) * 1e-6; // Ω·m

export interface WindingDemand {
  name: string;
  /** Signed design turns (the ratio-setting integers; negative = reversed sense). */
  designTurns: number;
  /** RMS and average current of the winding at its worst point (A). */
  rms: number;
  average: number;
  peak: number;
  /** Largest voltage across the winding (V), for its insulation. */
  voltage: number;
  /** True when this winding sits on the far side of a galvanic barrier from the primary. */
  crossesBarrier: boolean;
  /**
   * RMS and average current at the operating point the losses are stated for (default: rms
   * and average above). The wire is sized from `rms`, the worst of several points; the
   * losses belong to one point so the stage evaluation there gives the same numbers.
   */
  lossRms?: number;
  lossAverage?: number;
}

export interface MagneticDemand {
  /** Primary (magnetizing) inductance the stage needs (H). */
  inductance: number;
  /** Peak magnetizing current at the worst point (Vin max, full load) (A). */
  peakCurrent: number;
  /** Peak-to-peak magnetizing ripple at the same point (A). */
  rippleCurrent: number;
  fsw: number;
  /** windings[0] is the primary (or the only winding of an inductor). */
  windings: WindingDemand[];
  isolation: IsolationClass;
}

export interface MagneticDesignOptions {
  cores?: readonly CoreShape[];
  materials?: readonly CoreMaterial[];
  /** Peak flux density as a share of the hot saturation flux density [common practice 0.7–0.8]. */
  bsatShare?: number;
  /** Winding current density (A/mm²) [common practice 4–6 A/mm² with natural cooling]. */
  currentDensity?: number;
  /** Window utilisation Ku [DESIGN §4: 0.3–0.4 with isolation tape and margins]. */
  windowUtilisation?: number;
  /** Hot-spot temperature for copper resistance (°C). */
  hotTemperature?: number;
  /** Largest temperature rise of the wound part (K) [common practice 40 K]. */
  maxTemperatureRise?: number;
  /** Fewest primary turns accepted (a one- or two-turn primary is hard to make repeatable). */
  minPrimaryTurns?: number;
  /** Tolerance of the material's permeability [from memory: ±25 % is usual for ferrite]. */
  permeabilityTolerance?: number;
  /** Largest inductance spread the permeability tolerance may cause, so the gap sets L. */
  maxInductanceSpread?: number;
}

export interface WindingDesign {
  name: string;
  turns: number;
  awg: number;
  strands: number;
  /** Bare and insulated wire diameters (m). */
  bareDiameter: number;
  insulatedDiameter: number;
  insulation: 'single-coat enamel' | 'triple-insulated';
  layers: number;
  turnsPerLayer: number;
  /** DC resistance at the hot-spot temperature (Ω). */
  rdc: number;
  /** Dowell AC-resistance factor at fsw. */
  fr: number;
  copperLoss: number;
  currentDensity: number;
}

export interface CoreDesign {
  ok: boolean;
  core: CoreShape;
  material: CoreMaterial;
  /** The common factor applied to the design turns. */
  turnsMultiplier: number;
  windings: WindingDesign[];
  /** Area product needed by McLyman's inequality and that of the chosen core (m⁴). */
  areaProductNeeded: number;
  areaProduct: number;
  /** Peak and peak-to-peak flux density at the worst point (T), and the limit. */
  peakFlux: number;
  fluxSwing: number;
  fluxLimit: number;
  /** Air gap (m; 0 = ungapped) and the resulting inductance factor AL (H/turn²). */
  gap: number;
  /** Largest relative change of L when µr moves by its tolerance with this gap. */
  inductanceSpread: number;
  inductanceFactor: number;
  /** Copper fill of the bobbin window (share of Aw) and the allowed utilisation. */
  fill: number;
  windowUtilisation: number;
  coreLoss: number;
  copperLoss: number;
  temperatureRise: number;
  skinDepth: number;
  /** Estimated leakage of each secondary referred to the primary (H), two-winding formula. */
  leakage: number[];
  /** Winding order from the bobbin outwards, with the insulation between layers. */
  windingOrder: string[];
  /** Why this core (or why none fitted), with numbers. */
  reasons: string[];
  problems: string[];
}

export const CORE_DESIGN_DEFAULTS: Required<Omit<MagneticDesignOptions, 'cores' | 'materials'>> = {
  bsatShare: 0.75,
  currentDensity: 5,
  windowUtilisation: 0.35,
  hotTemperature: 100,
  maxTemperatureRise: 40,
  minPrimaryTurns: 4,
  permeabilityTolerance: 0.25,
  maxInductanceSpread: 0.1,
};

/** Skin depth in copper (m) at frequency f and temperature tC: 66/√f mm at 20 °C. */
export function skinDepth(f: number, tC = 20): number {
  return (66e-3 / Math.sqrt(f)) * Math.sqrt(1 + COPPER_TEMPCO * (tC - 20));
}

/**
 * Dowell's AC-resistance factor F_R for m layers of (equivalent foil) thickness h at
 * penetration ratio delta = h/δ [Erickson ch. 13]:
 * F_R = Δ·[ (sinh 2Δ + sin 2Δ)/(cosh 2Δ − cos 2Δ) + (2/3)(m² − 1)·(sinh Δ − sin Δ)/(cosh Δ + cos Δ) ].
 */
export function dowellFr(delta: number, layers: number): number {
  if (!(delta > 0)) return 1;
  if (delta < 1e-3) return 1 + ((5 * layers * layers - 1) * delta ** 4) / 45;
  const d2 = 2 * delta;
  const a = (Math.sinh(d2) + Math.sin(d2)) / (Math.cosh(d2) - Math.cos(d2));
  const b = (Math.sinh(delta) - Math.sin(delta)) / (Math.cosh(delta) + Math.cos(delta));
  return delta * (a + (2 / 3) * (layers * layers - 1) * b);
}

/** Steinmetz core loss density (W/m³) at frequency f and peak flux density bPeak (T). */
export function steinmetzLoss(m: CoreMaterial, f: number, bPeak: number): number {
  const s = m.steinmetz;
  return s.k * f ** s.alpha * Math.abs(bPeak) ** s.beta;
}

/**
 * Copper loss of a winding carrying `rms` with DC part `average`: the DC part sees Rdc, the
 * AC part Rdc·F_R [Erickson ch. 13, harmonics lumped at fsw: an estimate for the
 * non-sinusoidal current].
 */
export function windingCopperLoss(rdc: number, fr: number, rms: number, average: number): number {
  return rdc * (average * average + fr * Math.max(0, rms * rms - average * average));
}

/**
 * Core loss (W) of a designed core at a peak-to-peak flux swing (T): Steinmetz at the
 * switching frequency with B the half swing, times Ve (the same expression tryCore uses).
 */
export function coreLossAt(core: Pick<CoreDesign, 'core' | 'material'>, fsw: number, fluxSwing: number): number {
  return steinmetzLoss(core.material, fsw, fluxSwing / 2) * core.core.ve;
}

/** McLyman's surface temperature rise (K) of a wound part losing p (W) over surface (m²). */
export function temperatureRise(p: number, surface: number): number {
  const psi = p / (surface / 1e-4); // W/cm²
  return psi > 0 ? 450 * psi ** 0.826 : 0;
}

/** Insulated diameter of a magnet wire (m) from its bare diameter, and of triple-insulated wire. */
function insulatedDiameter(bare: number, triple: boolean): number {
  // Grade-2 enamel adds about 8 % + 15 µm; triple-insulated wire about 0.2 mm (from memory).
  return triple ? bare + 0.2e-3 : bare * 1.08 + 15e-6;
}

/** Tape between windings (m) per isolation class [common practice: 1, 2 or 3 layers of ~50 µm film]. */
function interWindingInsulation(iso: IsolationClass, crosses: boolean): number {
  if (!crosses) return 50e-6;
  return iso === 'reinforced' ? 150e-6 : iso === 'basic' ? 100e-6 : 50e-6;
}

interface Trial { design: CoreDesign; score: number }

function tryCore(dem: MagneticDemand, core: CoreShape, mat: CoreMaterial, o: typeof CORE_DESIGN_DEFAULTS): CoreDesign {
  const problems: string[] = [];
  const reasons: string[] = [];
  const p = dem.windings[0]!;
  const np0 = Math.abs(p.designTurns) || 1;
  const bmax = o.bsatShare * mat.bsatHot;
  // [Erickson ch. 14] N ≥ L·Ipk/(Bmax·Ae); also the gap must not come out negative.
  const nFlux = (dem.inductance * dem.peakCurrent) / (bmax * core.ae);
  const nUngapped = Math.sqrt((dem.inductance * core.le) / (MU0 * mat.mur * core.ae));
  const nMin = Math.max(nFlux, nUngapped, o.minPrimaryTurns);
  // A gap that is small beside le/µr leaves L at the mercy of the material's µr tolerance:
  // add turns (and so gap) until the spread µr causes stays within maxInductanceSpread.
  const spreadAt = (n: number) => {
    const g = Math.max(0, (MU0 * n * n * core.ae) / dem.inductance - core.le / mat.mur);
    const low = (MU0 * n * n * core.ae) / (g + core.le / (mat.mur * (1 - o.permeabilityTolerance)));
    return Math.abs(1 - low / dem.inductance);
  };
  let mult = Math.max(1, Math.ceil(nMin / np0 - 1e-9));
  while (spreadAt(np0 * mult) > o.maxInductanceSpread && mult < 64) mult++;
  const np = np0 * mult;
  const inductanceSpread = spreadAt(np);
  const peakFlux = (dem.inductance * dem.peakCurrent) / (np * core.ae);
  const fluxSwing = (dem.inductance * dem.rippleCurrent) / (np * core.ae);
  // [Erickson ch. 14] L = µ0·N²·Ae/(lg + le/µr)  ⇒  lg = µ0·N²·Ae/L − le/µr (fringing ignored).
  const gap = Math.max(0, (MU0 * np * np * core.ae) / dem.inductance - core.le / mat.mur);
  const delta0 = skinDepth(dem.fsw, o.hotTemperature);
  const rhoHot = COPPER_RHO_20C_SI * (1 + COPPER_TEMPCO * (o.hotTemperature - 20));
  let copperArea = 0;
  let build = 0;
  const windings: WindingDesign[] = dem.windings.map((w) => {
    const turns = Math.abs(w.designTurns) * mult;
    let wire = wireFor(Math.max(w.rms, 1e-6), o.currentDensity);
    // A wire thicker than two skin depths carries its AC current in a thin skin: use parallel
    // strands of the gauge nearest 2δ instead [common practice].
    if (awgDiameterMm(wire.awg) * 1e-3 > 2 * delta0) {
      let g = 14;
      while (g < 44 && awgDiameterMm(g) * 1e-3 > 2 * delta0) g++;
      const strands = Math.ceil(Math.max(w.rms, 1e-6) / o.currentDensity / awgAreaMm2(g));
      wire = { awg: g, strands, areaMm2: strands * awgAreaMm2(g), density: w.rms / (strands * awgAreaMm2(g)) };
    }
    const bare = awgDiameterMm(wire.awg) * 1e-3;
    const triple = w.crossesBarrier && (dem.isolation === 'basic' || dem.isolation === 'reinforced');
    const ins = insulatedDiameter(bare, triple);
    const perLayer = Math.max(1, Math.floor(core.breadth / (ins * Math.max(1, Math.ceil(Math.sqrt(wire.strands))))));
    const layers = Math.max(1, Math.ceil((turns * wire.strands) / perLayer));
    const area = awgAreaMm2(wire.awg) * 1e-6;
    copperArea += turns * wire.strands * area;
    build += layers * ins + interWindingInsulation(dem.isolation, w.crossesBarrier);
    const rdc = (turns * core.mlt * rhoHot) / (wire.strands * area);
    // [Erickson ch. 13] round wire as an equivalent foil: h = √(π/4)·d, porosity η = n·d/breadth,
    // Δ = h·√η/δ; the AC part of the current sees F_R, the DC part Rdc.
    const eta = Math.min(1, (Math.min(turns * wire.strands, perLayer) * bare) / core.breadth);
    const delta = (Math.sqrt(Math.PI / 4) * bare * Math.sqrt(eta)) / delta0;
    const fr = dowellFr(delta, layers);
    const copperLoss = windingCopperLoss(rdc, fr, w.lossRms ?? w.rms, w.lossAverage ?? w.average);
    return {
      name: w.name, turns: w.designTurns < 0 ? -turns : turns, awg: wire.awg, strands: wire.strands,
      bareDiameter: bare, insulatedDiameter: ins, insulation: triple ? 'triple-insulated' : 'single-coat enamel',
      layers, turnsPerLayer: perLayer, rdc, fr, copperLoss, currentDensity: wire.density,
    };
  });
  const fill = copperArea / core.aw;
  const s = mat.steinmetz;
  const coreLoss = coreLossAt({ core, material: mat }, dem.fsw, fluxSwing);
  const copperLoss = windings.reduce((a, w) => a + w.copperLoss, 0);
  const rise = temperatureRise(coreLoss + copperLoss, core.surface);
  // [McLyman] Ap ≥ L·Ipk·ΣIrms'/(Bmax·J·Ku), the secondaries' RMS referred to the primary by turns.
  const irmsReferred = dem.windings.reduce((a, w) => a + (w.rms * Math.abs(w.designTurns)) / np0, 0);
  const apNeeded = (dem.inductance * dem.peakCurrent * irmsReferred) / (bmax * o.currentDensity * 1e6 * o.windowUtilisation);
  const ap = core.ae * core.aw;
  // [Erickson ch. 14] leakage of two concentric windings, referred to the primary:
  // Llk ≈ µ0·Np²·MLT·(c + (a + b)/3)/breadth, a and b the builds, c the insulation between.
  const primaryBuild = windings[0]!.layers * windings[0]!.insulatedDiameter;
  const leakage = windings.slice(1).map((w, i) => {
    const c = interWindingInsulation(dem.isolation, dem.windings[i + 1]!.crossesBarrier);
    return (MU0 * np * np * core.mlt * (c + (primaryBuild + w.layers * w.insulatedDiameter) / 3)) / core.breadth;
  });
  if (fill > o.windowUtilisation) problems.push(`copper fills ${(fill * 100).toFixed(0)} % of the ${core.name} window, more than the ${(o.windowUtilisation * 100).toFixed(0)} % allowed`);
  if (rise > o.maxTemperatureRise) problems.push(`estimated temperature rise ${rise.toFixed(0)} K exceeds ${o.maxTemperatureRise} K (core ${(coreLoss * 1e3).toFixed(0)} mW, copper ${(copperLoss * 1e3).toFixed(0)} mW)`);
  if (dem.fsw < s.fMin || dem.fsw > s.fMax) problems.push(`${mat.name} is characterised for ${s.fMin / 1e3}–${s.fMax / 1e3} kHz, not ${(dem.fsw / 1e3).toFixed(0)} kHz`);
  if (inductanceSpread > o.maxInductanceSpread) problems.push(`the ±${Math.round(o.permeabilityTolerance * 100)} % permeability tolerance moves L by ${(inductanceSpread * 100).toFixed(0)} %, more than ${(o.maxInductanceSpread * 100).toFixed(0)} %`);
  if (np < o.minPrimaryTurns) problems.push(`primary of ${np} turns is below ${o.minPrimaryTurns}`);
  reasons.push(`${core.name}: Ap ${(ap * 1e12).toFixed(0)} mm⁴ against ${(apNeeded * 1e12).toFixed(0)} mm⁴ needed; primary ${np} turns (flux limit needs ${nFlux.toFixed(1)}) keeps the peak flux at ${(peakFlux * 1e3).toFixed(0)} mT against ${(bmax * 1e3).toFixed(0)} mT (${Math.round(o.bsatShare * 100)} % of ${(mat.bsatHot * 1e3).toFixed(0)} mT at 100 °C)`);
  const order: string[] = [];
  const sorted = windings.map((w, i) => ({ w, i })).sort((a, b) => Number(dem.windings[a.i]!.crossesBarrier) - Number(dem.windings[b.i]!.crossesBarrier));
  for (const { w, i } of sorted) {
    order.push(`${w.name}: ${Math.abs(w.turns)} turns${w.turns < 0 ? ' (reversed sense)' : ''}, ${w.layers} layer${w.layers > 1 ? 's' : ''} of ${w.strands > 1 ? `${w.strands} × ` : ''}AWG ${w.awg} ${w.insulation}`);
    const crosses = dem.windings[i]!.crossesBarrier;
    order.push(crosses && dem.isolation !== 'none' && dem.isolation !== 'functional'
      ? `insulation: ${dem.isolation === 'reinforced' ? 3 : 2} layers of polyester film tape, margin tape per the applicable safety standard`
      : 'insulation: 1 layer of polyester film tape');
  }
  return {
    ok: problems.length === 0, core, material: mat, turnsMultiplier: mult, windings,
    areaProductNeeded: apNeeded, areaProduct: ap, peakFlux, fluxSwing, fluxLimit: bmax,
    gap, inductanceSpread, inductanceFactor: dem.inductance / (np * np), fill, windowUtilisation: o.windowUtilisation,
    coreLoss, copperLoss, temperatureRise: rise, skinDepth: delta0, leakage, windingOrder: order, reasons, problems,
  };
}

/**
 * The custom magnetic on the smallest core of the table that meets every check, trying
 * cores in order of area product from the first whose Ap meets McLyman's inequality, on the
 * materials characterised at fsw (others only when none is). When no core fits, the best
 * attempt (fewest problems, then lowest loss) is returned with ok = false and its problems.
 */
export function designMagneticCore(dem: MagneticDemand, opts: MagneticDesignOptions = {}): CoreDesign {
  if (!(dem.inductance > 0) || !(dem.peakCurrent > 0) || !(dem.fsw > 0) || dem.windings.length === 0) {
    throw new RangeError('magnetic design: needs inductance, peak current and switching frequency above zero and at least one winding');
  }
  const o = { ...CORE_DESIGN_DEFAULTS, ...opts };
  const cores = [...(opts.cores ?? GENERIC_CORES)].sort((a, b) => a.ae * a.aw - b.ae * b.aw);
  const all = opts.materials ?? GENERIC_MATERIALS;
  const inRange = all.filter((m) => dem.fsw >= m.steinmetz.fMin && dem.fsw <= m.steinmetz.fMax);
  const materials = inRange.length > 0 ? inRange : all;
  let best: Trial | null = null;
  for (const core of cores) {
    let fitted: CoreDesign | null = null;
    for (const mat of materials) {
      const d = tryCore(dem, core, mat, o);
      if (d.areaProduct < d.areaProductNeeded) {
        d.problems.push(`area product ${(d.areaProduct * 1e12).toFixed(0)} mm⁴ is below the ${(d.areaProductNeeded * 1e12).toFixed(0)} mm⁴ needed`);
        d.ok = false;
      }
      const score = d.problems.length * 1e6 + d.coreLoss + d.copperLoss;
      if (!best || score < best.score) best = { design: d, score };
      if (d.ok && (!fitted || d.coreLoss + d.copperLoss < fitted.coreLoss + fitted.copperLoss)) fitted = d;
    }
    if (fitted) {
      fitted.reasons.push(`smallest core of the table that passes the flux, window-fill and ${o.maxTemperatureRise} K temperature-rise checks`);
      return fitted;
    }
  }
  const d = best!.design;
  d.reasons.push('no core of the table passes every check: the best attempt is shown with its problems; a larger core, a lower current density or a custom bobbin is needed');
  return d;
}
