/** Messages between the main thread and the planning worker (plain serialisable data). */
import type { Requirements } from '../engine/model.ts';
import type { PlanResult } from '../engine/plan-types.ts';
import type { PlanProgress } from '../engine/planner/solver.ts';
import type { Objective } from '../engine/planner/score.ts';
import type { PartCounts } from '../engine/planner/types.ts';
import type { LibraryRow } from '../engine/library.ts';

/** Planner options that can cross a thread boundary. */
export interface WorkerPlanOptions {
  objective?: Objective;
  budgetMs?: number;
  allowRailFeeds?: boolean;
  /** Unit costs per part category (the part library's prices); default: invented estimates. */
  unitCosts?: Record<keyof PartCounts, number>;
  /**
   * The project's part library: stages are designed with its parts and trees priced by the
   * parts the BOM will list (takes precedence over unitCosts).
   */
  library?: LibraryRow[];
}

export type ToWorker =
  | { type: 'plan'; requirements: Requirements; options: WorkerPlanOptions }
  | { type: 'cancel' };

export type FromWorker =
  | { type: 'progress'; progress: PlanProgress }
  | { type: 'result'; result: PlanResult; trace: string[] }
  | { type: 'error'; message: string };
