/** The planner's public entry points. */
export { PlanSolver, plan, type PlannerOptions, type PlanProgress, type PlannerPhase } from './solver.ts';
export { engineEvaluator } from './evaluator.ts';
export { inventedCostModel, INVENTED_UNIT_COST } from './cost-model.ts';
export type { Objective } from './score.ts';
export type { StageEvaluator, CostModel, PartCounts } from './types.ts';
