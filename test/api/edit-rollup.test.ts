// The edit → roll-up path reuses work: stage results cached per design and operating point
// (engine/rollup.ts), each alternative's BOM kept while the plan, the library rows and the
// derating limits are unchanged, the typed library and its shape check kept per library
// object, node sizes kept per text, and the undo step keeps the replaced objects instead of
// copying them. None of that may change a figure: after every edit the snapshot's plan view
// (roll-up, BOM, layout, alternatives) must equal the one computed from scratch, with copies
// of the same project in a new session (no object shared, so no cache hit) after the stage
// result caches are cleared.
import { describe, expect, it } from 'vitest';
import { createApi } from '../../src-main/api/index.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { defaultLibrary } from '../../src-main/api/default-library.ts';
import { buildSnapshot } from '../../src-main/api/snapshot.ts';
import { clearRollupCache } from '../../src-main/engine/rollup.ts';
import type { Snapshot } from '../../src-main/api/contract.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';
import { demoHandPlan } from '../export/demo-plan.ts';

async function fromScratch(s: ReturnType<typeof createApi>['session']): Promise<Snapshot> {
  clearRollupCache();
  const fresh = createApi({ host: 'test', userDataDir: null }).session;
  fresh.requirements = structuredClone(s.requirements);
  fresh.library = structuredClone(s.library);
  fresh.planResult = structuredClone(s.planResult);
  fresh.plannedFrom = structuredClone(s.plannedFrom);
  fresh.selectedId = s.selectedId;
  return buildSnapshot(fresh);
}

describe('edit → roll-up reuses work without changing a figure', () => {
  it('equals the full computation after each edit, undo and redo (demo, hand plan, two alternatives)', async () => {
    const doc = demoDocument();
    doc.library = defaultLibrary();
    const api = createApi({ host: 'test', userDataDir: null });
    const s = api.session;
    const store = ProjectStore.fromDocument(doc);
    s.replace({ requirements: store.getRequirements(), library: store.getLibrary(), planResult: null, path: null, store });
    const best = demoHandPlan(s.requirements).best!;
    // A second alternative: the same tree as its own object (its own BOM and roll-up entries).
    const other = { ...structuredClone(best), id: 'alt-2', labels: [] };
    const result: PlanResult = { ...demoHandPlan(s.requirements), alternatives: [best, other] };
    s.planResult = { ...result, revision: s.requirements.meta.revision };
    s.plannedFrom = structuredClone(s.requirements);
    s.selectedId = best.id;
    const load = s.requirements.loads[0]!;
    const mode = s.requirements.modes[0]!;

    const steps: Array<[string, unknown]> = [
      ['requirements.editCell', { table: 'loads', rowId: load.id, field: `current:${mode.id}`, text: '95m' }],
      ['requirements.editCell', { table: 'loads', rowId: load.id, field: `current:${mode.id}`, text: '120m' }],
      // Back to a value met before: the stage results come from the cache.
      ['requirements.editCell', { table: 'loads', rowId: load.id, field: `current:${mode.id}`, text: '95m' }],
      // A derating limit is read by the BOM: its kept BOM must not be reused.
      ['requirements.editCell', { table: 'limits', rowId: 'limits', field: 'powerDerating', text: '0.1' }],
      ['requirements.undo', {}],
      ['requirements.redo', {}],
      ['requirements.undo', {}],
      ['requirements.undo', {}],
    ];
    for (const [name, args] of steps) {
      const r = await api.request(name, args);
      if (!r.ok) throw new Error(`${name}: ${r.error.message}`);
      const got = (await buildSnapshot(s)).plan!;
      const want = (await fromScratch(s)).plan!;
      expect(got.rollup).not.toBeNull();
      expect(got.bom).not.toBeNull();
      expect(got.rollup).toEqual(want.rollup);
      expect(got.bom).toEqual(want.bom);
      expect(got.alternatives).toEqual(want.alternatives);
      expect(got.layout).toEqual(want.layout);
    }
    // A current edit does move the roll-up (the comparison is not between two unchanged views):
    const a = (await buildSnapshot(s)).plan!.rollup!.weightedLoss;
    await api.request('requirements.editCell', { table: 'loads', rowId: load.id, field: `current:${mode.id}`, text: '400m' });
    const b = (await buildSnapshot(s)).plan!.rollup!.weightedLoss;
    expect(b).not.toBe(a);
    expect((await buildSnapshot(s)).plan!.rollup).toEqual((await fromScratch(s)).plan!.rollup);
  });
});
