/**
 * The parts of a synchronous buck for the BOM (its registry entry's `parts`, called by
 * library.ts partsForStage): a single-inductor switching stage rated for its largest input
 * and its output current (library.ts inductorStageParts).
 */
import { inductorStageParts, type LibraryRow, type PartPick, type PickOptions } from '../../library.ts';
import type { BuckDesign } from './index.ts';

export function buckParts(stageId: string, d: BuckDesign, library: LibraryRow[], opts: Partial<PickOptions> = {}): PartPick[] {
  return inductorStageParts(stageId, d, library, opts, { vRating: d.vinMax ?? 0, iNeed: d.outputs[0]!.currentMax });
}
