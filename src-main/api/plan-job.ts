/** Runs the planner for the session in a worker thread and streams its progress as events. */
import { Worker } from 'node:worker_threads';
import { randomUUID } from 'node:crypto';
import type { PlanResult } from '../engine/plan-types.ts';
import { validateRequirements } from '../engine/validate.ts';
import type { PlanJob } from './contract.ts';
import { ApiFailure } from './registry.ts';
import { clone, type Session } from './session.ts';
import type { PlanThreadInput, PlanThreadMessage } from './plan-thread.ts';

export function startPlanJob(s: Session): PlanJob {
  if (s.planJob) throw new ApiFailure('the planner is already running: wait for it or cancel it');
  const problems = validateRequirements(s.requirements);
  if (problems.length) {
    const p = problems[0]!;
    throw new ApiFailure(`cannot plan yet: ${p.path}: ${p.message}${problems.length > 1 ? ` (and ${problems.length - 1} more)` : ''}`, p.path);
  }
  const jobId = randomUUID();
  const abort = new AbortController();
  const req = clone(s.requirements);
  const cancelFlag = new SharedArrayBuffer(4);
  const flag = new Int32Array(cancelFlag);
  // The worker loads TypeScript through tsx's loader, registered inside the thread (a
  // loader registered on the main thread does not reach workers).
  const entry = new URL('./plan-thread.ts', import.meta.url).href;
  const boot = `import('tsx/esm/api').then((m) => { m.register(); return import(${JSON.stringify(entry)}); })`
    + `.catch((e) => require('node:worker_threads').parentPort.postMessage({ type: 'error', message: String(e && e.message || e) }));`;
  const worker = new Worker(boot, { eval: true, workerData: { requirements: req, cancelFlag } satisfies PlanThreadInput });
  s.planJob = { jobId, abort };
  abort.signal.addEventListener('abort', () => Atomics.store(flag, 0, 1));
  let settled = false;
  let gotResult = false;
  const finish = (outcome: 'done' | 'cancelled' | 'failed', message: string) => {
    if (settled) return;
    settled = true;
    if (s.planJob?.jobId === jobId) s.planJob = null;
    s.emit('plan.finished', { jobId, outcome, message });
    void worker.terminate();
  };
  worker.on('message', (m: PlanThreadMessage) => {
    if (m.type === 'progress') {
      s.emit('plan.progress', { jobId, fraction: m.fraction, explored: m.explored, bestLoss: m.incumbent, elapsedMs: m.elapsedMs, message: m.message });
    } else if (m.type === 'done') {
      gotResult = true;
      const result = m.result as PlanResult;
      void s.serialise(() => {
        // Adopt only if the project is still the one planned (same requirements object).
        if (s.planJob?.jobId !== jobId) return;
        // Edits made while planning leave the plan stale: it keeps the revision it was made at.
        const sameReq = JSON.stringify(req) === JSON.stringify(s.requirements);
        result.revision = sameReq ? s.requirements.meta.revision : req.meta.revision;
        s.planResult = result;
        s.plannedFrom = req;
        s.selectedId = result.best?.id ?? result.alternatives[0]?.id ?? null;
        s.markDirty();
        const n = result.alternatives.length;
        const msg = result.best
          ? `Planned: ${result.best.stages.length} stages, ${n} alternative${n === 1 ? '' : 's'} in ${result.stats.elapsedMs.toFixed(0)} ms${result.stats.cancelled ? ' (cancelled: best found so far)' : ''}.`
          : `No feasible tree: ${result.infeasible[0]?.text ?? 'see the reasons'}`;
        finish(result.stats.cancelled ? 'cancelled' : 'done', msg);
      });
    } else {
      finish('failed', `planning failed: ${m.message}`);
    }
  });
  worker.on('error', (e) => finish('failed', `planning failed: ${e.message}`));
  worker.on('exit', () => { if (!gotResult) finish('failed', 'the planning worker stopped'); });
  return { jobId };
}
