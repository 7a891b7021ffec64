/**
 * Stage commands: `railwright stage <stage.json>` prints the fully computed stage (design,
 * evaluation at the operating point, worst-case windows, magnetic spec) as JSON;
 * `railwright netlist <stage.json>` prints the SPICE netlist of a switching stage.
 * The file format is in docs/stage-json.md.
 */
import { readFileSync, statSync } from 'node:fs';
import { CliError, parseFlags, type CliCommand, type CliIo } from './command.ts';
import { designStage, evaluateStage, stageNetlist, stageWindows, StageInputError, type StageDesign } from '../engine/stages/index.ts';
import { parseStageFile, StageFileError, type StageFile } from '../engine/stages/stage-json.ts';
import { magneticSpec } from '../engine/magnetics.ts';
import type { OperatingPoint } from '../engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../engine/units.ts';

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
    return parseStageFile(json);
  } catch (e) {
    if (e instanceof StageFileError) throw new CliError(`${path}: ${e.message}`);
    throw e;
  }
}

/** The design to work on: the file's own design, or one designed from its spec. */
function resolve(file: StageFile, io: CliIo): { design: StageDesign; reasons: string[]; flags: unknown[] } | null {
  if (file.design) return { design: file.design, reasons: [], flags: [] };
  const r = designStage(file.spec!);
  if (!r.ok) {
    io.out(JSON.stringify({ ok: false, flags: r.flags }, null, 2));
    return null;
  }
  return { design: r.design, reasons: r.reasons, flags: r.flags };
}

function defaultOp(design: StageDesign, file: StageFile): OperatingPoint {
  return file.operatingPoint ?? {
    vin: design.vinNom,
    iout: design.outputs.map((o) => o.currentMax),
    ambient: (file.spec?.ambient ?? 25) as Celsius,
  };
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
    const r = resolve(file, io);
    if (!r) return 1;
    const { design } = r;
    const op = defaultOp(design, file);
    const corners = file.corners ?? {
      vin: [design.vinMin, design.vinNom, design.vinMax] as Volts[],
      iout: design.outputs.map((o) => ({ min: o.currentMin as Amps, max: o.currentMax as Amps })),
    };
    try {
      const evaluation = evaluateStage(design, op);
      const windows = stageWindows(design, corners, file.monteCarlo ? { monteCarlo: file.monteCarlo } : undefined);
      const magnetic = design.kind === 'buck' || design.kind === 'cwbuck' ? magneticSpec(design) : null;
      const result = { ok: true, kind: design.kind, design, reasons: r.reasons, designFlags: r.flags, operatingPoint: op, evaluation, windows, magnetic };
      io.out(flags.compact ? JSON.stringify(result) : JSON.stringify(result, null, 2));
      return 0;
    } catch (e) {
      if (e instanceof StageInputError || e instanceof RangeError) throw new CliError(e.message);
      throw e;
    }
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
    const r = resolve(file, io);
    if (!r) return 1;
    const { design } = r;
    const op = defaultOp(design, file);
    try {
      evaluateStage(design, op); // validates the operating point
      const text = stageNetlist(design, op);
      if (text !== null) io.out(text.trimEnd());
      else throw new CliError(`${design.kind === 'ldo' ? 'an LDO does not switch' : design.kind === 'load-switch' ? 'a load switch does not switch at a frequency' : 'an isolated module is a bought part'}: there is no netlist to write`);
      return 0;
    } catch (e) {
      if (e instanceof StageInputError || e instanceof RangeError) throw new CliError(e.message);
      throw e;
    }
  },
};

export const stageCommands: CliCommand[] = [stage, netlist];
