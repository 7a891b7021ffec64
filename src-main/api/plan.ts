/**
 * Planning handlers: start a planning job (off the main thread, with progress events and
 * cancel), and choose which alternative the window shows.
 */
import { z } from 'zod';
import { ApiFailure, handler, noArgs } from './registry.ts';
import type { Session } from './session.ts';
import { buildSnapshot } from './snapshot.ts';
import { startPlanJob } from './plan-job.ts';

export const planHandlers = {
  'plan.start': handler('plan.start', noArgs, (s: Session) => startPlanJob(s)),
  'plan.cancel': handler('plan.cancel', z.object({ jobId: z.string().min(1).max(100) }).strict(), (s: Session, a) => {
    if (!s.planJob || s.planJob.jobId !== a.jobId) return { cancelled: false };
    s.planJob.abort.abort();
    return { cancelled: true };
  }),
  'plan.drawingMode': handler('plan.drawingMode', z.object({ modeId: z.string().min(1).max(200).nullable() }).strict(), (s: Session, a) => {
    if (a.modeId !== null && !s.requirements.modes.some((m) => m.id === a.modeId)) throw new ApiFailure(`modeId: no operating mode "${a.modeId}"`, 'modeId');
    s.drawingModeId = a.modeId;
    return buildSnapshot(s);
  }),
  'plan.select': handler('plan.select', z.object({ planId: z.string().min(1).max(200) }).strict(), (s: Session, a) => {
    const r = s.planResult;
    if (!r) throw new ApiFailure('planId: there is no plan yet (run the planner first)', 'planId');
    if (!r.alternatives.some((p) => p.id === a.planId) && r.best?.id !== a.planId) {
      throw new ApiFailure(`planId: no alternative "${a.planId}"`, 'planId');
    }
    s.selectedId = a.planId;
    s.markDirty();
    return buildSnapshot(s);
  }),
};
