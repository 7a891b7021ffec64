/**
 * `railwright` command-line entry: a thin router over the same handlers the window uses.
 * Each feature contributes its commands from src-main/cli/<feature>.ts.
 */
import { CliError, type CliCommand, type CliIo } from './cli/command.ts';
import { commandModules } from './cli/index.ts';
import { showText } from './api/cli-shared.ts';

export function allCommands(): CliCommand[] {
  return commandModules.flat();
}

function mainHelp(cmds: CliCommand[]): string {
  const w = Math.max(...cmds.map((c) => c.name.length));
  return [
    'railwright: plan the power tree of an electronic product',
    '',
    'Usage: railwright <command> [options]   (railwright <command> --help for details)',
    '',
    ...cmds.map((c) => `  ${c.name.padEnd(w)}  ${c.summary}`),
  ].join('\n');
}

/**
 * Everything the CLI prints passes here: control, bidi and other characters a name may not
 * hold are shown as `\u{1B}` (engine/text-rules.ts through api/cli-shared.ts), so text from a project file cannot
 * clear the screen, retitle the terminal or reorder a line. The program's own line breaks
 * and tabs stay.
 */
function terminalSafe(io: CliIo): CliIo {
  return {
    out: (line) => io.out(showText(line, { keepLineFeeds: true })),
    err: (line) => io.err(showText(line, { keepLineFeeds: true })),
  };
}

export async function runCli(argv: string[], rawIo: CliIo): Promise<number> {
  const io = terminalSafe(rawIo);
  const cmds = allCommands();
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    io.out(mainHelp(cmds));
    return name ? 0 : 2;
  }
  const cmd = cmds.find((c) => c.name === name);
  if (!cmd) {
    io.err(`railwright: unknown command "${name}" (try railwright --help)`);
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    io.out(cmd.usage);
    return 0;
  }
  try {
    return await cmd.run(rest, io);
  } catch (e) {
    if (e instanceof CliError) {
      io.err(`railwright ${name}: ${e.message}`);
      return e.exitCode;
    }
    io.err(`railwright ${name}: ${(e as Error)?.message ?? String(e)}`);
    return 1;
  }
}
