// Regression found while building the bad-file corpus: a project saved with a stale plan
// (the requirements changed after planning, which the store allows and marks) opened
// through the host could not be saved again: the host marked the stale plan with revision
// -1 and the store refuses a plan revision below 0. Fixed in api/files.ts (stale plans keep
// their own revision); this keeps it fixed.
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { readFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { createApi } from '../../src-main/api/index.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';
import { scratchDir } from './bundle.ts';

function fileWithStalePlan(): string {
  const dir = scratchDir();
  const path = join(dir, 'stale.rwproj');
  const s = ProjectStore.fromDocument(demoDocument());
  const plan: PlanResult = {
    revision: s.revision, rails: [], best: null, alternatives: [],
    infeasible: [{ railId: '', constraint: 'input', shortfall: 0, unit: '', text: 'invented test plan', remedies: [] }],
    stats: { explored: 0, provedOptimal: false, elapsedMs: 0, cancelled: false },
  };
  s.setPlanResult(plan);
  const req = s.getRequirements();
  req.meta.description += ' (edited after planning)';
  s.setRequirements(req);
  expect(s.getPlanResult()!.stale).toBe(true);
  s.save(path);
  s.close();
  return path;
}

describe('a project saved with a stale plan', () => {
  it('opens through the host with the plan marked stale, and the file is untouched', async () => {
    const path = fileWithStalePlan();
    const before = createHash('sha256').update(readFileSync(path)).digest('hex');
    const api = createApi({ host: 'test', userDataDir: null, pathPolicy: (p) => p });
    const r = await api.request('project.open', { path });
    expect(r.ok, JSON.stringify(r)).toBe(true);
    expect(api.session.planStale()).toBe(true);
    expect(createHash('sha256').update(readFileSync(path)).digest('hex')).toBe(before);
  });

  it('saves again after reopening (Save As to a new file), keeping the plan stale', async () => {
    const path = fileWithStalePlan();
    const api = createApi({ host: 'test', userDataDir: null, pathPolicy: (p) => p });
    expect((await api.request('project.open', { path })).ok).toBe(true);
    const w = await api.request('project.save', { path: path.replace(/\.rwproj$/, '-again.rwproj') });
    expect(w.ok, JSON.stringify(w)).toBe(true);
    const again = ProjectStore.open(path.replace(/\.rwproj$/, '-again.rwproj'));
    expect(again.getPlanResult()?.stale).toBe(true);
    again.close();
  });
});
