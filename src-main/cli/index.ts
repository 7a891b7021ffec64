/** The command modules the CLI routes to, one per feature. */
import type { CliCommand } from './command.ts';
import { projectCommands } from './project.ts';
import { exportCommands } from './export.ts';
import { stageCommands } from './stage.ts';
import { planCommands } from './plan.ts';
import { loadCommands } from './loads.ts';

export const commandModules: CliCommand[][] = [
  projectCommands,
  exportCommands,
  stageCommands,
  planCommands,
  loadCommands,
];
