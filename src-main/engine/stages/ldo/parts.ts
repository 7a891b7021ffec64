/**
 * The parts of an LDO for the BOM (its registry entry's `parts`, called by library.ts
 * partsForStage): the regulator the design was analysed with (else one in the same package,
 * else the cheapest that fits) and its capacitors. The pick rules are library.ts's.
 */
import { capFromRefs, cheapest, eng, missing, numParam, pickFromRow, pickOptions, strParam, type LibraryRow, type PartPick, type PickOptions } from '../../library.ts';
import type { LdoDesign } from './index.ts';

export function ldoParts(stageId: string, d: LdoDesign, library: LibraryRow[], opts: Partial<PickOptions> = {}): PartPick[] {
  const o = pickOptions(opts);
  const picks: PartPick[] = [];
  // The `?.` and `??` below also hold for a saved design that is incomplete (plan-types.ts).
  const out0 = d.outputs[0]!;
  const neg = out0.voltage < 0 ? 1 : 0;
  const vinMax = Math.abs(d.vinMax ?? 0);
  const fits = (r: LibraryRow) => numParam(r, 'iMax') >= out0.currentMax && numParam(r, 'vinMax') >= vinMax && numParam(r, 'negative', 0) === neg
    && numParam(r, 'thetaJA') <= (d.package?.thetaJA ?? Infinity) + 1e-9;
  const ref = d.parts?.find((r) => r.role === 'LDO' || r.role === 'negative LDO');
  const refRow = ref ? library.find((r) => r.id === ref.libraryId) ?? null : null;
  const samePkg = refRow ? null : cheapest(library, 'ldo', (r) => fits(r) && strParam(r, 'package') === d.package?.name);
  const row = refRow ?? samePkg ?? cheapest(library, 'ldo', fits);
  picks.push(row
    ? pickFromRow(stageId, neg ? 'negative LDO' : 'LDO', 'U', row, eng(out0.voltage, 'V', 4), `${numParam(row, 'iMax')} A, ${numParam(row, 'vinMax')} V in`, 1)
    : missing(stageId, 'LDO', 'U', 'ldo', eng(out0.voltage, 'V', 4), `≥ ${eng(out0.currentMax, 'A')}, θJA ≤ ${d.package?.thetaJA ?? '—'} K/W`, 1,
      `no ${neg ? 'negative ' : ''}LDO in the library carries ${eng(out0.currentMax, 'A')} from ${eng(vinMax, 'V')} with θJA ≤ ${d.package?.thetaJA} K/W`));
  if (d.cin) picks.push(capFromRefs(library, stageId, d.parts, d.cin, o));
  if (d.cout) picks.push(capFromRefs(library, stageId, d.parts, d.cout, o));
  return picks;
}
