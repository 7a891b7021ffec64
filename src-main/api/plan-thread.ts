/**
 * Worker thread that runs the planner for the window, so the host's event loop (and the
 * window) never waits on a search. Progress is posted every ~60 ms; cancel arrives through
 * a shared flag checked between solver steps, so it takes effect within one step.
 */
import { parentPort, workerData } from 'node:worker_threads';
import type { Requirements } from '../engine/model.ts';
import { PlanSolver } from '../engine/planner/solver.ts';
import { engineEvaluator } from '../engine/planner/evaluator.ts';

export interface PlanThreadInput {
  requirements: Requirements;
  /** Int32Array over a SharedArrayBuffer; [0] = 1 asks the solver to stop. */
  cancelFlag: SharedArrayBuffer;
}

export type PlanThreadMessage =
  | { type: 'progress'; fraction: number; explored: number; incumbent: number | null; message: string; elapsedMs: number }
  | { type: 'done'; result: unknown }
  | { type: 'error'; message: string };

if (parentPort && workerData) {
  const port = parentPort;
  const input = workerData as PlanThreadInput;
  const flag = new Int32Array(input.cancelFlag);
  const t0 = performance.now();
  try {
    const solver = new PlanSolver(input.requirements, { evaluator: engineEvaluator() });
    let last = 0;
    for (;;) {
      if (Atomics.load(flag, 0) === 1) solver.cancel();
      const finished = solver.step(100);
      const now = performance.now();
      if (finished) break;
      if (now - last > 60) {
        last = now;
        const p = solver.progress;
        port.postMessage({ type: 'progress', fraction: p.fraction, explored: p.explored, incumbent: p.incumbent ?? null, message: p.message, elapsedMs: now - t0 } satisfies PlanThreadMessage);
      }
    }
    port.postMessage({ type: 'done', result: solver.getResult() } satisfies PlanThreadMessage);
  } catch (e) {
    port.postMessage({ type: 'error', message: (e as Error).message } satisfies PlanThreadMessage);
  }
}
