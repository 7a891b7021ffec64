/** Runs the planner for the session in a worker thread and streams its progress. */
import type { PlanJob } from './contract.ts';
import { ApiFailure } from './registry.ts';
import type { Session } from './session.ts';

export function startPlanJob(_s: Session): PlanJob {
  throw new ApiFailure('the planner is not part of this build yet');
}
