/**
 * The stage designs of the demo's candidate feeds, for the identity test of the speed work
 * (test/engine/stages/design-identity.test.ts): each recorded spec is designed again and its
 * whole result (design, reasons, flags, the two full-load corners the planner checks, the
 * windows) is hashed. The recorded hashes were made on the code before the speed changes, so
 * any optimisation that moves a single bit of any result fails the test.
 *
 * Capture (run once, on the code the optimisations must match):
 *   npx tsx test/helpers/stage-design-identity.ts --capture
 * records every spec the planner designs for the demo (generic parts, then the default
 * library), keeps every non-coupled spec and every second coupled-winding one, and writes
 * test/fixtures/stage-design-identity.json with the library rows used and the hashes.
 * Regenerate it only when a model change is meant to move the designs.
 */
import { createHash } from 'node:crypto';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { designStage, evaluateStage, stageWindows, type WindowCorners } from '../../src-main/engine/stages/index.ts';
import type { StageSpec } from '../../src-main/engine/stages/types.ts';
import type { LibraryRow } from '../../src-main/engine/library.ts';
import type { StageEvaluator } from '../../src-main/engine/planner/types.ts';
import type { Amps, Celsius, Ratio } from '../../src-main/engine/units.ts';

export interface IdentityEntry {
  /** The spec without its library (the fixture's rows are added back when `library`). */
  spec: StageSpec;
  library: boolean;
  electrolyticDerating?: number;
  /** The corners the planner swept the windows over, or null (rejected before the windows). */
  corners: WindowCorners | null;
}

export interface IdentityFixture {
  note: string;
  ambient: number;
  libraryRows: LibraryRow[];
  entries: IdentityEntry[];
  hashes: string[];
}

/** Design one entry as the planner does (engine/planner/candidates.ts designAndCheck) and hash the whole result. */
export function designHash(e: IdentityEntry, rows: readonly LibraryRow[], ambient: number): string {
  const spec: StageSpec = e.library
    ? { ...e.spec, library: rows, ...(e.electrolyticDerating !== undefined ? { electrolyticDerating: e.electrolyticDerating as Ratio } : {}) }
    : e.spec;
  const r = designStage(spec);
  let out: unknown;
  if (!r.ok) out = { ok: false, flags: r.flags };
  else {
    const maxI = spec.outputs.map((o) => o.currentMax) as Amps[];
    const at = (vin: number) => evaluateStage(r.design, { vin: vin as never, iout: maxI, ambient: ambient as Celsius });
    const windows = e.corners ? stageWindows(r.design, e.corners) : null;
    out = { ok: true, design: r.design, reasons: r.reasons, flags: r.flags, atMin: at(spec.vinMin), atMax: at(spec.vinMax), windows };
  }
  return createHash('sha256').update(JSON.stringify(out)).digest('hex').slice(0, 24);
}

async function capture(): Promise<void> {
  const { PlanSolver } = await import('../../src-main/engine/planner/solver.ts');
  const { engineEvaluator } = await import('../../src-main/engine/planner/evaluator.ts');
  const { demoDocument } = await import('../../src-main/store/demo.ts');
  const { defaultLibrary } = await import('../../src-main/api/default-library.ts');
  const { fromStoreRows, libraryCostModel } = await import('../../src-main/engine/library.ts');
  const lib = fromStoreRows(defaultLibrary());
  if (!lib.ok) throw new Error('default library has problems');
  const req = demoDocument().requirements;
  const all: IdentityEntry[] = [];
  for (const useLib of [false, true]) {
    const inner = useLib ? engineEvaluator({ library: lib.rows, electrolyticDerating: req.limits.electrolyticDerating }) : engineEvaluator();
    const of = new Map<object, IdentityEntry>();
    const recording: StageEvaluator = {
      design(spec) {
        const r = inner.design(spec);
        const e: IdentityEntry = { spec: JSON.parse(JSON.stringify(spec)) as StageSpec, library: useLib, corners: null,
          ...(useLib ? { electrolyticDerating: req.limits.electrolyticDerating } : {}) };
        all.push(e);
        if (r.ok) of.set(r.design, e);
        return r;
      },
      evaluate: (d, op) => inner.evaluate(d, op),
      windows(d, corners) {
        const e = of.get(d);
        if (e && !e.corners) e.corners = JSON.parse(JSON.stringify(corners)) as WindowCorners;
        return inner.windows(d, corners);
      },
    };
    new PlanSolver(req, {
      evaluator: recording,
      ...(useLib ? { costModel: libraryCostModel(lib.rows, { powerDerating: req.limits.powerDerating, electrolyticDerating: req.limits.electrolyticDerating }) } : {}),
    }).solve();
  }
  let cw = 0;
  const entries = all.filter((e) => e.spec.kind !== 'cwbuck' || cw++ % 2 === 0);
  const ambient = req.limits.ambient as number;
  const fixture: IdentityFixture = {
    note: 'Made by `npx tsx test/helpers/stage-design-identity.ts --capture` on the code before the planning-speed work; see that file.',
    ambient, libraryRows: lib.rows, entries, hashes: entries.map((e) => designHash(e, lib.rows, ambient)),
  };
  writeFileSync(join(import.meta.dirname, '../fixtures/stage-design-identity.json'), `${JSON.stringify(fixture)}\n`);
  console.log(`${entries.length} designs (${all.length} recorded)`);
}

if (process.argv.includes('--capture')) await capture();
