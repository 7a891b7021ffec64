/** One CLI command. Each feature's module exports a list of these; cli.ts routes to them. */
export interface CliIo {
  out(line: string): void;
  err(line: string): void;
}

export interface CliCommand {
  name: string;
  /** One-line summary for `railwright --help`. */
  summary: string;
  /** Full usage text for `railwright <name> --help`. */
  usage: string;
  /** Returns the process exit code. Throw CliError for a one-line failure message. */
  run(args: string[], io: CliIo): Promise<number>;
}

/** A failure the user caused: printed as one line, exit code 1 (2 for usage errors). */
export class CliError extends Error {
  constructor(message: string, readonly exitCode = 1) {
    super(message);
  }
}

/** Minimal flag parser: `--name value`, `--flag`, positionals. Unknown flags are errors. */
export function parseFlags(
  args: string[],
  spec: Record<string, 'string' | 'boolean'>,
): { flags: Record<string, string | boolean>; positional: string[] } {
  const flags: Record<string, string | boolean> = {};
  const positional: string[] = [];
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    if (a.startsWith('--')) {
      const eq = a.indexOf('=');
      const name = eq > 0 ? a.slice(2, eq) : a.slice(2);
      const kind = spec[name];
      if (!kind) throw new CliError(`unknown option --${name}`, 2);
      if (kind === 'boolean') {
        flags[name] = true;
      } else {
        const v = eq > 0 ? a.slice(eq + 1) : args[++i];
        if (v === undefined) throw new CliError(`option --${name} needs a value`, 2);
        flags[name] = v;
      }
    } else {
      positional.push(a);
    }
  }
  return { flags, positional };
}
