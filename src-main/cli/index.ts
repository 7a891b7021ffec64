/** The command modules the CLI routes to, one per feature. */
import type { CliCommand } from './command.ts';

export const commandModules: CliCommand[][] = [];
