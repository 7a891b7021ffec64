/**
 * Specification of a stage's magnetic: turns, inductance, leakage target, saturation
 * current with margin, winding RMS and peak currents at the worst operating point, a
 * suggested wire from the AWG table at a stated current density, and the isolation class
 * and working voltage of the barrier the windings cross (from the domain), with cautions.
 */
import type { BuckDesign } from './stages/buck/index.ts';
import { coupledMagneticDemand, leakageProblems, magneticTolerance, windingCurrents, withMagneticCorner, type CoupledBuckDesign } from './stages/cwbuck/index.ts';
import { designMagneticCore, type CoreDesign, type MagneticDesignOptions } from './core-design.ts';
import { buckPoint } from './stages/buck/index.ts';
import { awgDiameterMm, copperOhmsPerMetre, wireFor } from './awg.ts';
import { ISOLATION_CAUTIONS } from './isolation.ts';
import type { IsolationClass } from './model.ts';

export interface WindingSpec {
  name: string;
  role: 'primary' | 'secondary' | 'inductor';
  /** Signed turns (negative = reversed winding sense); null for a single-winding inductor. */
  turns: number | null;
  /** Output the winding feeds. */
  nodeId: string;
  rmsCurrent: number;
  peakCurrent: number;
  wire: { awg: number; strands: number; diameterMm: number; currentDensity: number };
  /** Resistance the engine assumed for the winding (Ω at the hot-spot). */
  resistance: number;
  /** Copper resistance per metre of the suggested wire at 100 °C (Ω/m), for checking a build. */
  ohmsPerMetreHot: number;
}

export interface MagneticSpec {
  kind: 'inductor' | 'coupled';
  inductance: number;
  inductanceTolerance: number;
  switchingFrequency: number;
  /** Saturation current: the worst peak × (1 + margin). */
  saturationCurrent: number;
  saturationMargin: number;
  /**
   * Leakage each secondary may have (H), from minLeakage to maxLeakage (the design value), and
   * the equivalent coupling range at nominal Lp; the windows sweep the same range.
   */
  leakageTargets: { nodeId: string; maxLeakage: number; minCoupling: number; minLeakage: number; maxCoupling: number }[];
  windings: WindingSpec[];
  /** Largest voltage across each winding (V), for the insulation of the wire. */
  windingVoltages: number[];
  isolation: { class: IsolationClass; workingVoltage: number } | null;
  /** The operating point the currents come from. */
  worstCase: string;
  /**
   * The custom magnetic designed on a core of the table (core-design.ts): core, material,
   * physical turns (the design turns times one integer), gap, wire, fill, losses and
   * leakage estimate. Null for a single-winding inductor, which is bought, not wound.
   */
  core: CoreDesign | null;
  cautions: string[];
}

/** Current density for small magnetics [common practice: 4–6 A/mm² with natural cooling]. */
export const DEFAULT_CURRENT_DENSITY = 5;

function winding(name: string, role: WindingSpec['role'], turns: number | null, nodeId: string, rms: number, peak: number, resistance: number, density: number): WindingSpec {
  const w = wireFor(rms, density);
  return {
    name, role, turns, nodeId, rmsCurrent: rms, peakCurrent: peak,
    wire: { awg: w.awg, strands: w.strands, diameterMm: awgDiameterMm(w.awg), currentDensity: w.density },
    resistance, ohmsPerMetreHot: copperOhmsPerMetre(w.awg, 100) / w.strands,
  };
}

export function magneticSpec(d: BuckDesign | CoupledBuckDesign, opts: { currentDensity?: number; core?: MagneticDesignOptions; withCore?: boolean } = {}): MagneticSpec {
  const density = opts.currentDensity ?? DEFAULT_CURRENT_DENSITY;
  if (d.kind === 'buck') {
    // Worst inductor current: Vin max (largest ripple) at full load.
    const io = d.outputs[0]!.currentMax as number;
    const p = buckPoint(d, d.vinMax, io);
    return {
      kind: 'inductor',
      inductance: d.inductance, inductanceTolerance: 0.2, switchingFrequency: d.fsw,
      saturationCurrent: d.isat, saturationMargin: d.isat / p.ipk - 1,
      leakageTargets: [],
      windings: [winding('L1', 'inductor', null, d.outputs[0]!.nodeId, p.irms, p.ipk, d.dcr, density)],
      windingVoltages: [d.vinMax],
      isolation: null,
      worstCase: `Vin ${d.vinMax} V, ${io} A`,
      core: null,
      cautions: ['Values are estimates from generic defaults; confirm the part with its own data.'],
    };
  }
  const full = d.outputs.map((o) => o.currentMax as number);
  const lightPri = [d.outputs[0]!.currentMin as number, ...full.slice(1)];
  // The largest RMS of each winding over Vin min/max and the two load patterns.
  const points = [d.vinMin, d.vinMax].flatMap((vin) => [full, lightPri].map((iout) => windingCurrents(d, vin, iout)));
  const rms = points[0]!.map((_, i) => Math.max(...points.map((p) => p[i]!.rms)));
  const peak = points[0]!.map((_, i) => Math.max(...points.map((p) => p[i]!.peak)));
  const vpri = d.divider.vout;
  const windings: WindingSpec[] = [
    winding('P', 'primary', d.primaryTurns, d.outputs[0]!.nodeId, rms[0]!, peak[0]!, d.primaryResistance, density),
    ...d.secondaries.map((w, i) => winding(`S${i + 1}`, 'secondary', w.turns, w.nodeId, rms[i + 1]!, peak[i + 1]!, w.resistance, density)),
  ];
  const cautions = ['Values are estimates from generic defaults; the magnetic\'s maker confirms turns, gap and leakage.'];
  if (d.isolation && d.isolation.class !== 'none') {
    cautions.push(`The windings cross a ${d.isolation.class} barrier rated for ${d.isolation.workingVoltage} V working voltage: insulation system, creepage and clearance per the applicable safety standard.`);
    cautions.push(...ISOLATION_CAUTIONS);
  }
  // The core: the one the stage design was made with (its losses are those the evaluation
  // uses), unless other core-design options are asked for here.
  const own = d.magneticCore && !opts.core && opts.currentDensity === undefined;
  const core = opts.withCore === false ? null
    : own ? structuredClone(d.magneticCore!)
    : designMagneticCore(coupledMagneticDemand(d), { currentDensity: density, ...opts.core });
  const tol = magneticTolerance(d);
  const tight = withMagneticCorner(d, 1, tol.leakageLow);
  const leakageTargets = d.secondaries.map((w, i) => {
    const n = Math.abs(w.turns) / d.primaryTurns;
    const maxLeakage = (n * n * d.inductance * (1 - w.coupling ** 2)) / w.coupling ** 2;
    return { nodeId: w.nodeId, maxLeakage, minCoupling: w.coupling, minLeakage: maxLeakage * tol.leakageLow, maxCoupling: tight.secondaries[i]!.coupling };
  });
  // The construction's estimated leakage, referred to each secondary (× n²), must not exceed
  // what the stage design assumed, or the secondaries sag below the computed windows (the
  // stage's own core already carries this check).
  if (core) {
    for (const text of leakageProblems(d, core)) {
      if (core.problems.includes(text)) continue;
      core.problems.push(text);
      core.ok = false;
    }
  }
  if (core && !core.ok) cautions.push(`The core design did not close: ${core.problems.join('; ')}.`);
  return {
    kind: 'coupled',
    core,
    inductance: d.inductance, inductanceTolerance: tol.inductance, switchingFrequency: d.fsw,
    saturationCurrent: d.isat, saturationMargin: d.isat / peak[0]! - 1,
    leakageTargets,
    windings,
    // Primary: Vin max − Vpri in the on-time; a secondary: n·(Vin max − Vpri) reversed.
    windingVoltages: [Math.max(d.vinMax - vpri, vpri), ...d.secondaries.map((w) => (Math.abs(w.turns) / d.primaryTurns) * Math.max(d.vinMax - vpri, vpri))],
    isolation: d.isolation,
    worstCase: `largest of Vin ${d.vinMin}/${d.vinMax} V × (all outputs at full load | primary at its minimum)`,
    cautions,
  };
}
