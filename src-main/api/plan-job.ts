/**
 * Runs the planner for the session off the main thread (the shared planning worker,
 * src-main/worker) and streams its progress as events; cancel goes through an AbortSignal.
 */
import { randomUUID } from 'node:crypto';
import type { PlanResult } from '../engine/plan-types.ts';
import type { Requirements } from '../engine/model.ts';
import type { PlanProgress } from '../engine/planner/solver.ts';
import { validateRequirements, type Problem } from '../engine/validate.ts';
import { runPlanInWorker, type WorkerPlanOptions } from '../worker/run-plan.ts';
import type { PlanJob } from './contract.ts';
import { ApiFailure } from './registry.ts';
import { clone, type Session } from './session.ts';
import { libraryRows } from './figures.ts';
import type { LibraryRow } from '../engine/library.ts';

/**
 * The gate before planning and exporting (window and CLI): the requirements' problems;
 * none means the planner accepts them.
 */
export function planningProblems(req: Requirements): Problem[] {
  return validateRequirements(req);
}

/**
 * Plan in the shared planning worker with the project's typed part library (left out when
 * empty: the planner's own estimates). The window's job and the CLI's plan and export use it.
 */
export function planWithLibrary(
  req: Requirements,
  library: LibraryRow[],
  options: Omit<WorkerPlanOptions, 'library'> = {},
  onProgress?: (p: PlanProgress) => void,
  signal?: AbortSignal,
  onTrace?: (lines: string[]) => void,
): Promise<PlanResult> {
  return runPlanInWorker(req, { ...options, ...(library.length ? { library } : {}) }, onProgress, signal, onTrace);
}

export function startPlanJob(s: Session): PlanJob {
  if (s.planJob) throw new ApiFailure('the planner is already running: wait for it or cancel it');
  const problems = planningProblems(s.requirements);
  if (problems.length) {
    const p = problems[0]!;
    throw new ApiFailure(`cannot plan yet: ${p.path}: ${p.message}${problems.length > 1 ? ` (and ${problems.length - 1} more)` : ''}`, p.path);
  }
  const jobId = randomUUID();
  const abort = new AbortController();
  const req = clone(s.requirements);
  const t0 = performance.now();
  s.planJob = { jobId, abort };
  s.planOnOpen = false;
  s.emit('project.state', s.state());
  let last = 0;
  const onProgress = (p: { fraction: number; phase: string; candidates: number; explored: number; incumbent?: number; message: string }) => {
    const now = performance.now();
    if (now - last < 50) return;
    last = now;
    s.emit('plan.progress', { jobId, fraction: p.fraction, phase: p.phase, candidates: p.candidates, explored: p.explored, bestScore: p.incumbent ?? null, elapsedMs: now - t0, message: p.message });
  };
  const finish = (outcome: 'done' | 'cancelled' | 'failed', message: string) => {
    if (s.planJob?.jobId === jobId) s.planJob = null;
    s.emit('plan.finished', { jobId, outcome, message });
  };
  // The project's parts design and price the stages, so the tree, its losses and the BOM agree.
  let library: LibraryRow[];
  try { library = libraryRows(s); } catch (e) { throw new ApiFailure(`cannot plan yet: ${(e as Error).message}`, 'library'); }
  planWithLibrary(req, library, { budgetMs: req.preferences.budgetMs }, onProgress, abort.signal).then(
    (result: PlanResult) => s.serialise(() => {
      // A job replaced by opening another project is dropped.
      if (s.planJob?.jobId !== jobId) return;
      // Cancelled before any feasible tree: nothing was learned, so the previous plan stays
      // (an empty result would read as "no feasible tree", which the search never showed).
      if (result.stats.cancelled && !result.best) {
        finish('cancelled', s.planResult ? 'Planning cancelled before a feasible tree was found; the previous plan is kept.' : 'Planning cancelled before a feasible tree was found; there is no plan yet.');
        return;
      }
      // Edits made while planning leave the plan stale: it keeps the revision it was made at.
      const sameReq = JSON.stringify(req) === JSON.stringify(s.requirements);
      result.revision = sameReq ? s.requirements.meta.revision : req.meta.revision;
      s.planResult = result;
      s.plannedFrom = req;
      s.selectedId = result.best?.id ?? result.alternatives[0]?.id ?? null;
      s.markDirty();
      const n = result.alternatives.length;
      const msg = result.best
        ? result.stats.cancelled
          ? `Planning cancelled after ${result.stats.elapsedMs.toFixed(0)} ms: showing the best tree found so far (${result.best.stages.length} stages, ${n} alternative${n === 1 ? '' : 's'}), not proven the best.`
          : `Planned: ${result.best.stages.length} stages, ${n} alternative${n === 1 ? '' : 's'} in ${result.stats.elapsedMs.toFixed(0)} ms.`
        : `No feasible tree: ${result.infeasible[0]?.text ?? 'see the reasons'}`;
      finish(result.stats.cancelled ? 'cancelled' : 'done', msg);
    }),
    (e: Error) => finish(e.name === 'AbortError' ? 'cancelled' : 'failed', e.name === 'AbortError' ? s.planResult ? 'Planning cancelled; the previous plan is kept.' : 'Planning cancelled; there is no plan yet.' : `planning failed: ${e.message}`),
  );
  return { jobId };
}
