/**
 * The parts of a coupled-winding buck for the BOM (its registry entry's `parts`, called by
 * library.ts partsForStage): regulator or controller and switch pair, the custom magnetic
 * (to its specification sheet), capacitors, feedback divider, and per secondary its
 * rectifier, output bank, snubber and preload. The pick rules are library.ts's.
 */
import { isolationRank } from '../../model.ts';
import { magneticSpec } from '../../magnetics.ts';
import {
  capFromRefs, cheapest, eng, missing, numParam, pickCap, pickDivider, pickFromRow, pickOptions, pickResistor, pickSwitcher, switcherFromRefs,
  type LibraryRow, type PartPick, type PickOptions,
} from '../../library.ts';
import type { CoupledBuckDesign } from './index.ts';

export function coupledBuckParts(stageId: string, d: CoupledBuckDesign, library: LibraryRow[], opts: Partial<PickOptions> = {}): PartPick[] {
  const o = pickOptions(opts);
  const picks: PartPick[] = [];
  // The `?.` and `??` below also hold for a saved design that is incomplete (plan-types.ts).
  const out0 = d.outputs[0]!;
  const secs = d.secondaries ?? [];
  // Worst primary peak over the input range and load patterns (engine/magnetics.ts); the
  // magnetic saturates no lower than that plus the usual 30 % margin.
  let peak = (d.isat ?? out0.currentMax) / 1.3;
  try {
    const spec = magneticSpec(d, { withCore: false });
    peak = Math.max(peak, ...spec.windings.filter((w) => w.role === 'primary').map((w) => w.peakCurrent));
  } catch { /* an incomplete design: keep the design's own figure */ }
  const isat = Math.max(d.isat ?? 0, peak * 1.3);
  picks.push(...(switcherFromRefs(library, stageId, d.parts) ?? pickSwitcher(library, stageId, d.vinMax ?? 0, peak, true, isat)));
  const pTotal = (d.outputs ?? []).reduce((a, q) => a + Math.abs(q.voltage) * q.currentMax, 0);
  const isoOf = [d.isolation, o.isolation].filter((x): x is { class: string; workingVoltage: number } => !!x && x.class !== 'none')
    .sort((a, b) => isolationRank(b.class) - isolationRank(a.class) || b.workingVoltage - a.workingVoltage)[0] ?? null;
  const needIso = isolationRank(isoOf?.class);
  const windings = 1 + secs.length;
  const mag = cheapest(library, 'magnetic-custom', (r) =>
    numParam(r, 'maxWindings') >= windings && numParam(r, 'pMax') >= pTotal && numParam(r, 'isolation') >= needIso);
  const specRef = `magnetic-${stageId.replace(/[^A-Za-z0-9._-]+/g, '_')}.md`;
  const turns = [d.primaryTurns ?? 0, ...secs.map((s) => s.turns)].join(':');
  const magValue = `Lp ${eng(d.inductance ?? 0, 'H')}, ${turns} T`;
  const magRating = `Isat ≥ ${eng(isat, 'A')}${isoOf ? `, ${isoOf.class} isolation ${eng(isoOf.workingVoltage, 'V')}` : ''}`;
  picks.push(mag
    ? { ...pickFromRow(stageId, 'coupled-winding magnetic (custom)', 'T', mag, magValue, magRating, 1, { specRef }), unitCost: mag.cost + numParam(mag, 'costPerWinding', 0) * secs.length }
    : { ...missing(stageId, 'coupled-winding magnetic (custom)', 'T', 'magnetic-custom', magValue, magRating, 1, `no custom-magnetic former in the library takes ${windings} windings, ${eng(pTotal, 'W')}${needIso > 0 ? ` and ${isoOf?.class} isolation` : ''}`), specRef });
  if (d.cin) picks.push(capFromRefs(library, stageId, d.parts, d.cin, o));
  if (d.cout) picks.push(capFromRefs(library, stageId, d.parts, d.cout, o));
  if (d.divider) picks.push(...pickDivider(library, stageId, d.divider, o));
  secs.forEach((s, k) => {
    const spec = d.outputs?.find((q) => q.nodeId === s.nodeId);
    const iAvg = (spec?.currentMax ?? 0) + (s.preload?.current ?? 0);
    // Rectifier ratings: Vr ≥ reverse voltage / 0.8 and If ≥ 1.5·average (common practice margins).
    const vr = s.rectifierReverseVoltage / 0.8;
    const role = `rectifier, winding ${k + 1}`;
    const rectRef = d.parts?.find((r) => r.role === role);
    const rect = (rectRef ? library.find((r) => r.id === rectRef.libraryId) : undefined)
      ?? cheapest(library, 'rectifier', (r) => numParam(r, 'vr') >= vr && numParam(r, 'if') >= 1.5 * iAvg);
    picks.push(rect
      ? pickFromRow(stageId, role, 'D', rect, '', `${numParam(rect, 'vr')} V, ${numParam(rect, 'if')} A`, 1)
      : missing(stageId, role, 'D', 'rectifier', '', `≥ ${eng(vr, 'V')}, ≥ ${eng(1.5 * iAvg, 'A')}`, 1, `no rectifier in the library blocks ${eng(vr, 'V')} and carries ${eng(1.5 * iAvg, 'A')}`));
    picks.push(capFromRefs(library, stageId, d.parts, s.cout, o));
    if (s.snubber) {
      // RC snubber across the rectifier: the capacitor sees the (snubbed) reverse peak, the
      // resistor dissipates Cs·Vr²·fsw (common practice).
      const vrs = s.rectifierReverseVoltage;
      picks.push(pickCap(library, stageId, { role: `snubber capacitor, winding ${k + 1}`, value: s.snubber.c, count: 1, ratedVoltage: vrs / 0.8, workingVoltage: vrs }, o));
      picks.push(pickResistor(library, stageId, `snubber resistor, winding ${k + 1}`, s.snubber.r, s.snubber.c * vrs * vrs * (d.fsw ?? 0), o));
    }
    if (s.preload) {
      const v = Math.abs(spec?.voltage ?? 0) * 1.1;
      picks.push(pickResistor(library, stageId, `preload, winding ${k + 1}`, s.preload.resistance, (v * v) / s.preload.resistance, o));
    }
  });
  return picks;
}
