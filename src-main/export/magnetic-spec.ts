/**
 * Specification sheet (Markdown) for each custom coupled-winding magnetic: turns, primary
 * inductance, leakage target, saturation current, winding currents (average, peak, RMS),
 * a suggested wire gauge, the isolation class and working voltage, and the cautions.
 *
 * Currents use the linear-ramp model of DESIGN.md §4 at the heaviest mode and the lowest
 * input voltage (highest duty, hence the highest secondary peaks): Im = Ipri + Σ|n|·Isec,
 * ΔIm = (Vin − Vpri)·D/(Lp·fsw), Isec_pk = 2·Isec/(1 − D), Isec_rms = Isec_pk·√((1 − D)/3).
 * The primary winding carries Im during the on-time and Im − Σ|n|·isec(t) during the
 * off-time; its RMS is taken numerically over one period.
 * Wire: ASTM B258 gauge diameter d = 0.127 mm·92^((36 − n)/39), annealed copper
 * ρ = 1/58 Ω·mm²/m at 20 °C, current density 5 A/mm² (common practice for small magnetics).
 */
import type { Requirements } from '../engine/model.ts';
import type { PlanStage } from '../engine/plan-types.ts';
import type { CoupledBuckDesign } from '../engine/stages/index.ts';
import type { Rollup } from '../engine/rollup.ts';
import { heaviestMode } from '../engine/rollup.ts';
import { fmtQty } from '../engine/layout.ts';

export const CURRENT_DENSITY = 5e6; // A/m² (5 A/mm², common practice)

/** ASTM B258: bare diameter in metres of gauge n. */
export function awgDiameter(n: number): number {
  return 0.127e-3 * 92 ** ((36 - n) / 39);
}

/** The thinnest gauge (largest number, up to 40) whose diameter is at least d. */
export function awgFor(d: number): number {
  for (let n = 40; n >= 0; n--) if (awgDiameter(n) >= d * (1 - 1e-12)) return n;
  return 0;
}

export interface WindingRow {
  name: string;
  turns: number;
  output: string;
  voltage: number;
  iavg: number;
  ipk: number;
  irms: number;
  awg: number;
  diameter: number;
  ohmPerMetre: number;
  resistance: number;
}

export interface MagneticFigures {
  duty: number;
  vin: number;
  im: number;
  dim: number;
  ipk: number;
  windings: WindingRow[];
}

/** Winding currents at the stage's worst point for the magnetic (heaviest mode, Vin min). */
export function magneticFigures(stage: PlanStage, d: CoupledBuckDesign, rollup: Rollup, names: Map<string, string>): MagneticFigures {
  const mode = heaviestMode(rollup);
  const f = mode?.cases.min.stages.find((s) => s.stageId === stage.id);
  const iOut = (nodeId: string) => f?.outputs.find((o) => o.nodeId === nodeId)?.i ?? 0;
  const duty = Math.min(0.95, Math.max(0.01, f?.duty ?? (d.outputs[0]!.voltage / d.vinMin)));
  const vin = f?.vin ?? d.vinMin;
  const vpri = d.divider.vout;
  const np = d.primaryTurns;
  const ipri = iOut(d.outputs[0]!.nodeId);
  const secs = d.secondaries.map((w) => {
    const n = Math.abs(w.turns) / np;
    const isec = iOut(w.nodeId) + (w.preload?.current ?? 0);
    const pk = (2 * isec) / (1 - duty);
    return { w, n, isec, pk, rms: pk * Math.sqrt((1 - duty) / 3) };
  });
  const im = ipri + secs.reduce((a, s) => a + s.n * s.isec, 0);
  const dim = ((vin - vpri) * duty) / (d.inductance * d.fsw);
  // Primary RMS by sampling one period (1000 points).
  const N = 1000;
  let sum = 0;
  for (let k = 0; k < N; k++) {
    const t = (k + 0.5) / N;
    let i: number;
    if (t < duty) i = im - dim / 2 + (dim * t) / duty;
    else {
      const u = (t - duty) / (1 - duty);
      i = im + dim / 2 - dim * u - secs.reduce((a, s) => a + s.n * s.pk * u, 0);
    }
    sum += i * i;
  }
  const priRms = Math.sqrt(sum / N);
  const wire = (irms: number) => {
    const area = Math.max(irms, 1e-3) / CURRENT_DENSITY;
    const dmin = Math.sqrt((4 * area) / Math.PI);
    const awg = awgFor(dmin);
    const dia = awgDiameter(awg);
    const ohmPerMetre = (1 / 58) / ((Math.PI * (dia * 1e3) ** 2) / 4);
    return { awg, diameter: dia, ohmPerMetre };
  };
  const rows: WindingRow[] = [
    { name: 'Primary (regulated)', turns: np, output: names.get(d.outputs[0]!.nodeId) ?? d.outputs[0]!.nodeId, voltage: vpri, iavg: im, ipk: im + dim / 2, irms: priRms, ...wire(priRms), resistance: d.primaryResistance },
    ...secs.map((s, k) => ({
      name: `Secondary ${k + 1}${s.w.turns < 0 ? ' (reversed)' : ''}`, turns: s.w.turns,
      output: names.get(s.w.nodeId) ?? s.w.nodeId,
      voltage: d.outputs.find((o) => o.nodeId === s.w.nodeId)?.voltage ?? 0,
      iavg: s.isec, ipk: s.pk, irms: s.rms, ...wire(s.rms), resistance: s.w.resistance,
    })),
  ];
  return { duty, vin, im, dim, ipk: im + dim / 2, windings: rows };
}

export const MAGNETIC_CAUTIONS = [
  'Mains and isolation barriers can kill. Creepage, clearance, insulation system, hi-pot test voltage and touch current follow the applicable safety standard and local codes; this sheet does not compute them.',
  'A qualified engineer and the test lab decide whether the construction meets the isolation class; the tool certifies nothing.',
  'Windings are hot in use: check the hot-spot temperature at the highest ambient on the real board.',
];

export function magneticSpecMarkdown(req: Requirements, stage: PlanStage, d: CoupledBuckDesign, rollup: Rollup, ref: string, names: Map<string, string>): string {
  const f = magneticFigures(stage, d, rollup, names);
  const k = d.secondaries[0]?.coupling ?? 0.99;
  const iso = d.isolation ?? (stage.barriers[0] ? { class: stage.barriers[0].isolation, workingVoltage: stage.barriers[0].workingVoltage } : null);
  const domainsCrossed = stage.barriers.map((b) => {
    const from = req.domains.find((x) => x.id === b.fromDomainId)?.name ?? b.fromDomainId;
    const to = req.domains.find((x) => x.id === b.toDomainId)?.name ?? b.toDomainId;
    return `${from} → ${to}: ${b.isolation}, ${fmtQty(b.workingVoltage, 'V')} working`;
  });
  const q = (x: number, u: string) => fmtQty(x, u).replace(/\|/g, '/');
  const lines: string[] = [
    `# Magnetic specification ${ref}: ${stage.name}`,
    '',
    `Project: ${req.meta.name} (revision ${req.meta.revision}). Stage: ${stage.name} (${stage.id}), coupled-winding buck.`,
    '',
    'Custom part. This sheet states what the circuit needs from the magnetic; the winder chooses core, bobbin and construction and confirms each value.',
    '',
    '## Electrical requirements',
    '',
    '| Parameter | Requirement |',
    '| --- | --- |',
    `| Primary inductance Lp | ${q(d.inductance, 'H')} (tolerance to agree with the winder; ±20 % is usual, common practice) |`,
    `| Switching frequency | ${q(d.fsw, 'Hz')} |`,
    `| Input voltage | ${q(d.vinMin, 'V')} … ${q(d.vinMax, 'V')} (nominal ${q(d.vinNom, 'V')}) |`,
    `| Duty cycle at Vin min, heaviest mode | ${(f.duty * 100).toFixed(1)} % |`,
    `| Magnetizing current (average / ripple p-p / peak) | ${q(f.im, 'A')} / ${q(f.dim, 'A')} / ${q(f.ipk, 'A')} |`,
    `| Saturation current (at highest ambient, ${req.limits.ambient} °C) | ≥ ${q(d.isat, 'A')} (peak plus margin) |`,
    `| Coupling primary to each secondary | ≥ ${k} |`,
    ...d.secondaries.map((w, i) => {
      const n = Math.abs(w.turns) / d.primaryTurns;
      const llk = (n * n * d.inductance * (1 - w.coupling * w.coupling)) / (w.coupling * w.coupling);
      return `| Leakage of secondary ${i + 1}, measured at the secondary with the primary shorted | ≤ ${q(llk, 'H')} |`;
    }),
    `| Turns ratio Np : Ns | ${[d.primaryTurns, ...d.secondaries.map((w) => w.turns)].join(' : ')} (integers; a negative count is a reversed winding) |`,
    '',
    '## Windings',
    '',
    '| Winding | Turns | Feeds | Voltage | Avg current | Peak current | RMS current | Suggested wire | DC resistance (design value) |',
    '| --- | --- | --- | --- | --- | --- | --- | --- | --- |',
    ...f.windings.map((w) => `| ${w.name} | ${w.turns} | ${w.output.replace(/\|/g, '/')} | ${q(w.voltage, 'V')} | ${q(w.iavg, 'A')} | ${q(w.ipk, 'A')} | ${q(w.irms, 'A')} | AWG ${w.awg} (${(w.diameter * 1e3).toFixed(3)} mm, ${q(w.ohmPerMetre, 'Ω')}/m at 20 °C) | ≤ ${q(w.resistance, 'Ω')} |`),
    '',
    'Wire: ASTM B258 gauge diameters, annealed copper at 1/58 Ω·mm²/m (20 °C, +0.393 %/K), 5 A/mm² current density (common practice for small magnetics). Parallel strands or foil may replace a single wire if the winder prefers.',
    '',
    '## Isolation',
    '',
    iso && iso.class !== 'none'
      ? `Isolation class ${iso.class}, working voltage ${q(iso.workingVoltage, 'V')} between the primary and the secondaries that cross the barrier.`
      : 'No galvanic barrier is required by the domains this magnetic serves (functional insulation between windings only).',
    ...domainsCrossed.map((x) => `- ${x}`),
    '',
    '## Cautions',
    '',
    ...MAGNETIC_CAUTIONS.map((c) => `- ${c}`),
    '',
  ];
  return lines.join('\n');
}
