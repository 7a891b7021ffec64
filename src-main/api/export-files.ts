/**
 * Exports written to files, for the command line: the same bundle the window's export
 * handler renders (export.ts → export/bundle.ts), written by export/write-all.ts (every
 * target checked first, all files or none). The CLI (src-main/cli/export.ts) reaches the
 * exports only through this module (test/boundaries.test.ts).
 */
import type { Requirements } from '../engine/model.ts';
import type { PlanResult } from '../engine/plan-types.ts';
import type { ElkLike } from '../engine/layout.ts';
import type { LibraryRow } from '../engine/library.ts';
import { prepareExport, type ExportBundle } from '../export/bundle.ts';
import { writeAll, type ExportTargets } from '../export/write-all.ts';

export { ExportError } from '../export/bundle.ts';
export { checkTargets, existsMessage, writeFiles, TargetError, TargetExists, type ExportTargets } from '../export/write-all.ts';

/** What a written export tells the user besides the files: the parts without a row, source overloads, windows outside their band. */
export interface ExportNotes {
  partsWithoutRow: number;
  sourceOverloads: string[];
  windowsOutside: string[];
}

/**
 * Render the plan's exports and write them to the targets (with `extra` files in the same
 * all-or-nothing step); returns the "wrote …" lines and the notes.
 */
export async function writeExportFiles(args: {
  req: Requirements;
  result: PlanResult;
  library: LibraryRow[];
  elk: ElkLike;
  modeId?: string;
  replanned: boolean;
  targets: ExportTargets;
  force: boolean;
  extra: { option: string; path: string; bytes: Uint8Array }[];
}): Promise<{ lines: string[]; notes: ExportNotes }> {
  const bundle: ExportBundle = await prepareExport({
    req: args.req, result: args.result, library: args.library, elk: args.elk, modeId: args.modeId, replanned: args.replanned,
  });
  const lines = await writeAll(bundle, args.targets, { force: args.force, extra: args.extra });
  return {
    lines,
    notes: {
      partsWithoutRow: bundle.bom.problems.length,
      sourceOverloads: bundle.rollup.sourceOverloads.map((o) => o.text),
      windowsOutside: bundle.rollup.windows.filter((w) => !w.inside).map((w) => w.name),
    },
  };
}
