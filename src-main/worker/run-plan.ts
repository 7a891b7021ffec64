/**
 * runPlanInWorker: plan off the main thread. The worker (boot.mjs) registers the tsx loader
 * and loads the TypeScript planner, so it works the same under the CLI, the tests and the
 * local host.
 *
 * Cancel (AbortSignal): the worker is asked to stop and answers with the incumbent
 * (stats.cancelled = true); if it has not answered within CANCEL_GRACE_MS (one engine
 * evaluation can take longer than that) it is terminated and the promise rejects with an
 * AbortError. Either way the caller is released within 100 ms.
 *
 * Any other failure (an error event, an unreadable message, the worker exiting, a value
 * that cannot be copied into it, a stack overflow inside it) terminates the worker and
 * rejects with one clear message, so the CLI exits and the hosts keep serving.
 */
import { Worker } from 'node:worker_threads';
import type { Requirements } from '../engine/model.ts';
import type { PlanResult } from '../engine/plan-types.ts';
import type { PlanProgress } from '../engine/planner/solver.ts';
import type { FromWorker, WorkerPlanOptions } from './protocol.ts';

export const CANCEL_GRACE_MS = 60;

export type { WorkerPlanOptions };

export class PlanAbortError extends Error {
  override name = 'AbortError';
}

function describe(e: unknown): string {
  const m = e instanceof Error ? e.message : String(e);
  return m.length > 300 ? m.slice(0, 300) + '…' : m;
}

export function runPlanInWorker(
  requirements: Requirements,
  options: WorkerPlanOptions = {},
  onProgress?: (p: PlanProgress) => void,
  signal?: AbortSignal,
  onTrace?: (lines: string[]) => void,
): Promise<PlanResult> {
  return new Promise<PlanResult>((resolve, reject) => {
    if (signal?.aborted) { reject(new PlanAbortError('planning cancelled before it started')); return; }
    const worker = new Worker(new URL('./boot.mjs', import.meta.url), {
      workerData: { entry: new URL('./plan-worker.ts', import.meta.url).href },
    });
    let settled = false;
    let killTimer: ReturnType<typeof setTimeout> | null = null;
    const settle = (fn: () => void) => {
      if (settled) return;
      settled = true;
      if (killTimer) clearTimeout(killTimer);
      signal?.removeEventListener('abort', onAbort);
      void worker.terminate();
      fn();
    };
    const onAbort = () => {
      worker.postMessage({ type: 'cancel' });
      killTimer = setTimeout(() => settle(() => reject(new PlanAbortError('planning cancelled'))), CANCEL_GRACE_MS);
    };
    signal?.addEventListener('abort', onAbort, { once: true });
    worker.on('message', (m: FromWorker) => {
      if (m.type === 'progress') onProgress?.(m.progress);
      else if (m.type === 'result') { onTrace?.(m.trace); settle(() => resolve(m.result)); }
      else if (m.type === 'error') settle(() => reject(new Error(`planner: ${m.message}`)));
    });
    worker.on('error', (e) => settle(() => reject(new Error(`planner failed: ${describe(e)}`))));
    worker.on('messageerror', (e) => settle(() => reject(new Error(`planner: a message from the planner could not be read (${describe(e)})`))));
    worker.on('exit', (code) => settle(() => reject(new Error(`planner worker stopped unexpectedly (exit code ${code})`))));
    try {
      // Copying the requirements into the worker walks them recursively: a value nested
      // deep enough overflows the stack here. Any failure ends the worker (or it would keep
      // the process alive) and becomes the answer.
      worker.postMessage({ type: 'plan', requirements, options });
    } catch (e) {
      settle(() => reject(new Error(`planner: the requirements could not be handed to the planner (${describe(e)})`)));
    }
  });
}
