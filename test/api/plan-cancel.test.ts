// A cancelled plan never reads as "no feasible tree": cancelled before any feasible tree, the
// previous plan stays; cancelled with a best-so-far, that tree is kept and marked cancelled.
// The worker is replaced by a stub that answers as the real one does on cancel
// (src-main/worker/run-plan.ts: the incumbent with stats.cancelled = true).
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';
import type { Events, Snapshot } from '../../src-main/api/contract.ts';

const answer: { next: (() => PlanResult) | null } = { next: null };
vi.mock('../../src-main/worker/run-plan.ts', () => ({
  runPlanInWorker: () => new Promise<PlanResult>((resolve) => setTimeout(() => resolve(answer.next!()), 5)),
}));

const { createApi } = await import('../../src-main/api/index.ts');
const { openDemo } = await import('../../src-main/api/files.ts');
const { makePathPolicy } = await import('../../src-main/host/paths.ts');

let dir: string;
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'rw-cancel-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function cancelledResult(best: PlanResult['best'], base?: PlanResult): PlanResult {
  return {
    revision: 0, rails: base?.rails ?? [], best, alternatives: best ? [best] : [], infeasible: [],
    stats: { explored: 3, provedOptimal: false, elapsedMs: 40, cancelled: true },
  };
}

async function planOnce(api: ReturnType<typeof createApi>, events: { e: string; p: unknown }[]): Promise<Events['plan.finished']> {
  const r = (await api.request('plan.start', {})) as { ok: true; value: { jobId: string } } | { ok: false; error: { message: string } };
  if (!r.ok) throw new Error(r.error.message);
  const jobId = r.value.jobId;
  for (;;) {
    const f = events.find((x) => x.e === 'plan.finished' && (x.p as Events['plan.finished']).jobId === jobId);
    if (f) return f.p as Events['plan.finished'];
    await new Promise((res) => setTimeout(res, 5));
  }
}

describe('cancelled planning', () => {
  it('cancelled before any feasible tree: says so, keeps no empty result, and the window sees no "infeasible" plan', async () => {
    const events: { e: string; p: unknown }[] = [];
    const api = createApi({ host: 'test', userDataDir: join(dir, 'a'), pathPolicy: makePathPolicy({ allowedRoots: [dir], baseDir: dir }), emit: (e, p) => events.push({ e, p }) });
    openDemo(api.session);
    answer.next = () => cancelledResult(null);
    const f = await planOnce(api, events);
    expect(f.outcome).toBe('cancelled');
    expect(f.message).toMatch(/^Planning cancelled/);
    expect(f.message).not.toMatch(/feasible tree:/i);
    const snap = (await api.request('project.snapshot', {})) as { ok: true; value: Snapshot };
    expect(snap.value.plan).toBeNull();
  });

  it('cancelled with a best tree so far: keeps it, marked cancelled, and the previous plan is not lost to an empty one', { timeout: 60_000 }, async () => {
    const events: { e: string; p: unknown }[] = [];
    const api = createApi({ host: 'test', userDataDir: join(dir, 'b'), pathPolicy: makePathPolicy({ allowedRoots: [dir], baseDir: dir }), emit: (e, p) => events.push({ e, p }) });
    openDemo(api.session);
    // A real (complete) plan first, from the engine's own planner in this thread.
    const { PlanSolver } = await import('../../src-main/engine/planner/solver.ts');
    const { engineEvaluator } = await import('../../src-main/engine/planner/evaluator.ts');
    const real = new PlanSolver(structuredClone(api.session.requirements), { evaluator: engineEvaluator(), budgetMs: 8000 }).solve();
    expect(real.best).not.toBeNull();
    answer.next = () => cancelledResult(real.best, real);
    const f = await planOnce(api, events);
    expect(f.outcome).toBe('cancelled');
    expect(f.message).toMatch(/best tree found so far/);
    const snap = ((await api.request('project.snapshot', {})) as { ok: true; value: Snapshot }).value;
    expect(snap.plan?.result.stats.cancelled).toBe(true);
    expect(snap.plan?.selected?.id).toBe(real.best!.id);
    // A second cancel before anything feasible keeps that tree rather than replacing it.
    answer.next = () => cancelledResult(null);
    const g = await planOnce(api, events);
    expect(g.message).toMatch(/previous plan is kept/);
    const again = ((await api.request('project.snapshot', {})) as { ok: true; value: Snapshot }).value;
    expect(again.plan?.selected?.id).toBe(real.best!.id);
  });
});
