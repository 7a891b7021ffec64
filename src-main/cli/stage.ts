/**
 * Stage commands: `railwright stage <stage.json>` prints the fully computed stage (design,
 * evaluation at the operating point, worst-case windows, magnetic spec) as JSON;
 * `railwright netlist <stage.json>` prints the SPICE netlist of a switching stage.
 * The file format is in docs/stage-json.md.
 */
import { readFileSync, statSync } from 'node:fs';
import { CliError, parseFlags, type CliCommand, type CliIo } from './command.ts';
import { readStageJson, stageNetlist, stageReport, type StageFile, type StageNotDesigned } from '../api/stage.ts';
import { ApiFailure } from '../api/registry.ts';

const MAX_BYTES = 4 << 20;

function readStageFile(path: string | undefined): StageFile {
  if (!path) throw new CliError('missing stage file (see --help)', 2);
  let text: string;
  try {
    if (statSync(path).size > MAX_BYTES) throw new CliError(`${path}: larger than ${MAX_BYTES >> 20} MB, not a stage file`);
    text = readFileSync(path, 'utf8');
  } catch (e) {
    if (e instanceof CliError) throw e;
    throw new CliError(`${path}: cannot read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    throw new CliError(`${path}: not valid JSON (${(e as Error).message})`);
  }
  try {
    return readStageJson(json);
  } catch (e) {
    if (e instanceof ApiFailure) throw new CliError(`${path}: ${e.message}`);
    throw e;
  }
}

/** A spec the engine could not design: print its flags as JSON (exit code 1). */
function notDesigned(r: StageNotDesigned, io: CliIo): number {
  io.out(JSON.stringify({ ok: false, flags: r.flags }, null, 2));
  return 1;
}

/** An engine call through the api: its one-line refusal becomes the CLI's. */
function stageCall<T>(fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof ApiFailure) throw new CliError(e.message);
    throw e;
  }
}

const stage: CliCommand = {
  name: 'stage',
  summary: 'design or evaluate one converter stage from a stage JSON file',
  usage: [
    'Usage: railwright stage <stage.json> [--compact]',
    '',
    'Prints the stage as JSON: the chosen values and the reasons for them, the evaluation at the',
    'operating point (losses term by term, efficiency, duty, outputs, junction temperatures,',
    'flags), the worst-case output windows and, for buck and coupled-winding stages, the magnetic specification.',
    'The file holds a "spec" (designed here) or a "design"; see docs/stage-json.md.',
    'Exit code 1 when the spec cannot be designed (the flags say why).',
    '',
    '  --compact   one line of JSON',
  ].join('\n'),
  async run(args, io) {
    const { flags, positional } = parseFlags(args, { compact: 'boolean' });
    const file = readStageFile(positional[0]);
    const result = stageCall(() => stageReport(file));
    if (!result.ok) return notDesigned(result, io);
    io.out(flags.compact ? JSON.stringify(result) : JSON.stringify(result, null, 2));
    return 0;
  },
};

const netlist: CliCommand = {
  name: 'netlist',
  summary: 'print the ngspice netlist of a switching stage from a stage JSON file',
  usage: [
    'Usage: railwright netlist <stage.json>',
    '',
    'Prints an open-loop SPICE netlist of the buck, coupled-winding buck, boost, inverting or four-switch buck-boost stage at the duty the',
    'engine computes for the operating point (default: nominal input, full load). Run it with',
    '"ngspice -b file.cir"; the .meas lines report v_out<i> and i_in.',
  ].join('\n'),
  async run(args, io) {
    const { positional } = parseFlags(args, {});
    const file = readStageFile(positional[0]);
    const r = stageCall(() => stageNetlist(file));
    if (!r.ok) return notDesigned(r, io);
    io.out(r.text.trimEnd());
    return 0;
  },
};

export const stageCommands: CliCommand[] = [stage, netlist];
