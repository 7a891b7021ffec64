/**
 * Specification sheet (Markdown) for each custom coupled-winding magnetic. The numbers come
 * from the stage engine's magnetic specification (engine/magnetics.ts: turns, Lp, leakage
 * targets, saturation current, winding RMS and peak currents at the worst point, wire from
 * the AWG table at a stated current density, winding voltages, isolation); this writer adds
 * the project context (names, domains, barriers) and the cautions, and lays it out.
 */
import type { Requirements } from '../engine/model.ts';
import type { PlanStage } from '../engine/plan-types.ts';
import type { CoupledBuckDesign } from '../engine/stages/index.ts';
import { magneticSpec, type MagneticSpec } from '../engine/magnetics.ts';
import { fmtQty } from '../engine/layout.ts';
import { GENERIC_DEFAULTS } from '../engine/stages/index.ts';
import { showText } from '../engine/text-rules.ts';

export const MAGNETIC_CAUTIONS = [
  'Mains and isolation barriers can kill. Creepage, clearance, insulation system, hi-pot test voltage and touch current follow the applicable safety standard and local codes; this sheet does not compute them.',
  'A qualified engineer and the test lab decide whether the construction meets the isolation class; the tool certifies nothing.',
  'Windings run hot: check the hot-spot temperature at the highest ambient on the real board.',
];

/**
 * Any text as inline Markdown that renders as itself: control, line-break and bidi
 * characters written as `\u{..}` (text-rules.ts), so it stays on its line; HTML's
 * `& < >` as entities, so no tag or entity is formed; and the inline Markdown marks
 * (`\ \` * _ [ ] ~ | #`) backslash-escaped, so no emphasis, code, link, table cell or
 * heading closer is formed. Every name, id and figure in the sheet goes through it.
 */
export function markdownText(s: string): string {
  return showText(String(s))
    .replace(/[\\`*_[\]~|#]/g, (c) => `\\${c}`)
    .replace(/[&<>]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;' })[c]!);
}
const cell = markdownText;

/**
 * The core, turns, gap, wire and loss the tool designed (engine/core-design.ts), with the
 * tolerances the design assumed and the turns-ratio convention, so a winding shop can quote
 * and build it; every value is a first design to be confirmed on a sample.
 */
function coreSection(spec: MagneticSpec, d: CoupledBuckDesign, q: (x: number, u: string) => string): string[] {
  const c = spec.core;
  if (!c) return [];
  const mm = (x: number) => `${(x * 1e3).toFixed(x < 1e-3 ? 3 : 2)} mm`;
  const physical = c.windings.map((w) => w.turns);
  return [
    '## Core and construction (first design)',
    '',
    c.ok ? `Designed on a ${cell(c.core.name)} core, ${cell(c.material.name)}.` : `**No core of the table passes every check** (${cell(c.problems.join('; '))}); the best attempt is shown and needs a larger core or a custom bobbin.`,
    '',
    '| Parameter | Value |',
    '| --- | --- |',
    `| Core shape (generic family) | ${cell(c.core.name)}: Ae ${(c.core.ae * 1e6).toFixed(1)} mm², le ${mm(c.core.le)}, Ve ${(c.core.ve * 1e9).toFixed(0)} mm³, bobbin window ${(c.core.aw * 1e6).toFixed(1)} mm² |`,
    `| Material | ${cell(c.material.name)}: µr ${c.material.mur}, Bsat ${(c.material.bsatHot * 1e3).toFixed(0)} mT at 100 °C (${cell(c.material.source)}) |`,
    `| Area product | ${(c.areaProduct * 1e12).toFixed(0)} mm⁴ available, ${(c.areaProductNeeded * 1e12).toFixed(0)} mm⁴ needed (Ap = L·Ipk·ΣIrms/(Bmax·J·Ku)) |`,
    `| Turns as wound | ${physical.map((t) => Math.abs(t)).join(' : ')} (the design ratio ${[d.primaryTurns, ...d.secondaries.map((w) => w.turns)].map((t) => Math.abs(t)).join(' : ')} × ${c.turnsMultiplier}); reversed sense: ${physical.slice(1).some((t) => t < 0) ? physical.map((t, i) => (t < 0 ? `S${i}` : '')).filter(Boolean).join(', ') : 'none'} |`,
    `| Peak flux density | ${(c.peakFlux * 1e3).toFixed(0)} mT at the worst peak current, limit ${(c.fluxLimit * 1e3).toFixed(0)} mT; flux swing ${(c.fluxSwing * 1e3).toFixed(0)} mT peak to peak |`,
    `| Air gap (centre leg, fringing ignored) | ${c.gap > 0 ? mm(c.gap) : 'none'}; AL ${(c.inductanceFactor * 1e9).toFixed(0)} nH/turn²; a ±25 % permeability spread moves Lp by ${(c.inductanceSpread * 100).toFixed(0)} % |`,
    `| Window fill | ${(c.fill * 100).toFixed(0)} % copper of the bobbin window (allowed ${(c.windowUtilisation * 100).toFixed(0)} %) |`,
    `| Skin depth at fsw, 100 °C | ${mm(c.skinDepth)} |`,
    `| Core loss (Steinmetz, estimate) at Vin max, all outputs at full load | ${q(c.coreLoss, 'W')} (the stage's loss breakdown uses this core at every operating point) |`,
    `| Copper loss (DC + Dowell AC factor) at the same point | ${q(c.copperLoss, 'W')} (the winding resistances the stage was analysed with) |`,
    `| Temperature rise (surface estimate) | ${c.temperatureRise.toFixed(0)} K |`,
    ...c.leakage.map((l, i) => `| Leakage estimate P–S${i + 1}, referred to the primary | ${q(l, 'H')} |`),
    '',
    '| Winding | Turns as wound | Wire | Layers | Turns per layer | DC resistance at 100 °C | AC factor at fsw | Copper loss |',
    '| --- | --- | --- | --- | --- | --- | --- | --- |',
    ...c.windings.map((w) => `| ${cell(w.name)} | ${Math.abs(w.turns)}${w.turns < 0 ? ' (reversed)' : ''} | ${w.strands > 1 ? `${w.strands} × ` : ''}AWG ${w.awg}, ${w.insulation} | ${w.layers} | ${w.turnsPerLayer} | ${q(w.rdc, 'Ω')} | ${w.fr.toFixed(2)} | ${q(w.copperLoss, 'W')} |`),
    '',
    'Winding order, from the bobbin outwards:',
    '',
    ...c.windingOrder.map((l, i) => `${i + 1}. ${cell(l)}`),
    '',
    `Tolerances the design assumed, and over which the output windows were computed: Lp ±${Math.round(spec.inductanceTolerance * 100)} %; each secondary's leakage (and so its coupling) within the range in the electrical table, with the leakage held while Lp moves. Turns-ratio convention: the ratio is that of the open-circuit winding voltages (mutual inductance over the primary inductance); leakage is stated as measured at each secondary with the primary shorted. A winding shop that splits the leakage differently must keep those two measured quantities, not only the turns.`,
    '',
    c.reasons.map((r) => `- ${cell(r)}`).join('\n'),
    '',
  ];
}

export function magneticSpecMarkdown(req: Requirements, stage: PlanStage, d: CoupledBuckDesign, ref: string, names: Map<string, string>): { text: string; spec: MagneticSpec; saturation: number } {
  const spec = magneticSpec(d);
  const q = (x: number, u: string) => cell(fmtQty(x, u));
  const name = (id: string) => cell(names.get(id) ?? id);
  const barriers = stage.barriers.map((b) => {
    const from = cell(req.domains.find((x) => x.id === b.fromDomainId)?.name ?? b.fromDomainId);
    const to = cell(req.domains.find((x) => x.id === b.toDomainId)?.name ?? b.toDomainId);
    return `${from} → ${to}: ${cell(String(b.isolation))} isolation, ${q(b.workingVoltage, 'V')} working voltage`;
  });
  const iso = spec.isolation && spec.isolation.class !== 'none'
    ? spec.isolation
    : stage.barriers[0] ? { class: stage.barriers[0].isolation, workingVoltage: stage.barriers[0].workingVoltage } : null;
  // Never ask for less than the worst winding peak plus the usual margin, even where the
  // stage design's own saturation figure came from a milder operating point.
  const worstPeak = Math.max(0, ...spec.windings.filter((w) => w.role === 'primary').map((w) => w.peakCurrent));
  const needSat = Math.max(spec.saturationCurrent, worstPeak * (1 + GENERIC_DEFAULTS.saturationMargin));
  const satNote = needSat > spec.saturationCurrent * (1 + 1e-9)
    ? `worst primary peak ${fmtQty(worstPeak, 'A')} + ${Math.round(GENERIC_DEFAULTS.saturationMargin * 100)} % margin; the stage design assumed ${fmtQty(spec.saturationCurrent, 'A')}`
    : `worst peak + ${Math.round(spec.saturationMargin * 100)} % margin`;
  const lines = [
    `# Magnetic specification ${cell(ref)}: ${cell(stage.name)}`,
    '',
    `Project: ${cell(req.meta.name)} (requirements revision ${cell(String(req.meta.revision))}). Stage: ${cell(stage.name)} (${cell(stage.id)}), coupled-winding buck.`,
    '',
    'Custom part. This sheet states what the circuit needs from the magnetic; the winder chooses core, gap, bobbin and construction and confirms every value.',
    '',
    '## Electrical requirements',
    '',
    '| Parameter | Requirement |',
    '| --- | --- |',
    `| Primary inductance Lp | ${q(spec.inductance, 'H')} ±${Math.round(spec.inductanceTolerance * 100)} % |`,
    `| Switching frequency | ${q(spec.switchingFrequency, 'Hz')} |`,
    `| Input voltage | ${q(d.vinMin, 'V')} … ${q(d.vinMax, 'V')} (nominal ${q(d.vinNom, 'V')}) |`,
    `| Saturation current (at ${req.limits.ambient} °C ambient and above) | ≥ ${q(needSat, 'A')} (${cell(satNote)}) |`,
    ...spec.leakageTargets.map((l, i) => `| Leakage of secondary ${i + 1} (${name(l.nodeId)}), measured at the secondary with the primary shorted | ${q(l.minLeakage, 'H')} … ${q(l.maxLeakage, 'H')} (coupling ${l.minCoupling} … ${Number(l.maxCoupling.toFixed(4))}) |`),
    `| Turns Np : Ns | ${cell([d.primaryTurns, ...d.secondaries.map((w) => w.turns)].join(' : '))} (integers; a negative count is a reversed winding) |`,
    `| Worst operating point for the currents | ${cell(spec.worstCase)} |`,
    '',
    '## Windings',
    '',
    '| Winding | Turns | Feeds | Peak voltage across | RMS current | Peak current | Suggested wire | Winding resistance (design value) |',
    '| --- | --- | --- | --- | --- | --- | --- | --- |',
    ...spec.windings.map((w, i) => `| ${cell(w.name)} (${cell(w.role)}) | ${cell(String(w.turns ?? '—'))} | ${name(w.nodeId)} | ${q(spec.windingVoltages[i] ?? 0, 'V')} | ${q(w.rmsCurrent, 'A')} | ${q(w.peakCurrent, 'A')} | ${w.wire.strands > 1 ? `${w.wire.strands} × ` : ''}AWG ${w.wire.awg} (${w.wire.diameterMm.toFixed(3)} mm, ${w.wire.currentDensity.toFixed(1)} A/mm², ${q(w.ohmsPerMetreHot, 'Ω')}/m at 100 °C) | ≤ ${q(w.resistance, 'Ω')} |`),
    '',
    'Wire diameters follow the AWG series of ASTM B258; copper resistivity 1/58 Ω·mm²/m at 20 °C rising 0.393 %/K. Parallel strands or foil may replace a single wire if the winder prefers.',
    '',
    ...coreSection(spec, d, q),
    '## Isolation',
    '',
    iso ? `Isolation class **${cell(String(iso.class))}**, working voltage **${q(iso.workingVoltage, 'V')}**, between the primary and the windings that cross the barrier.`
      : 'No galvanic barrier is required by the domains this magnetic serves (functional insulation between windings only).',
    ...barriers.map((x) => `- ${x}`),
    '',
    '## Cautions',
    '',
    ...[...spec.cautions, ...MAGNETIC_CAUTIONS].filter((c, i, a) => a.indexOf(c) === i).map((c) => `- ${cell(c)}`),
    '',
  ];
  return { text: lines.join('\n'), spec, saturation: needSat };
}
