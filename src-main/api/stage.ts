/**
 * One converter stage from a stage JSON file (docs/stage-json.md): its design (the file's own,
 * or designed from its spec), evaluation at the operating point, worst-case windows, magnetic
 * specification, and SPICE netlist. The window has no such request yet; the CLI's `stage` and
 * `netlist` commands call these thin functions over the engine. Failures the file causes are
 * ApiFailure with a one-line message.
 */
import { designStage, evaluateStage, stageNetlist as kindNetlist, stageWindows, StageInputError, type StageDesign } from '../engine/stages/index.ts';
import { parseStageFile, StageFileError, type StageFile } from '../engine/stages/stage-json.ts';
import { magneticSpec } from '../engine/magnetics.ts';
import type { OperatingPoint } from '../engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../engine/units.ts';
import { ApiFailure } from './registry.ts';

export type { StageFile };

/** A spec the engine could not design: its flags say why. */
export interface StageNotDesigned { ok: false; flags: unknown[] }

/** Parsed JSON of a stage file, checked; ApiFailure names the field and the reason. */
export function readStageJson(json: unknown): StageFile {
  try {
    return parseStageFile(json);
  } catch (e) {
    if (e instanceof StageFileError) throw new ApiFailure(e.message);
    throw e;
  }
}

/** The design to work on: the file's own design, or one designed from its spec. */
function resolve(file: StageFile): { ok: true; design: StageDesign; reasons: string[]; flags: unknown[] } | StageNotDesigned {
  if (file.design) return { ok: true, design: file.design, reasons: [], flags: [] };
  const r = designStage(file.spec!);
  if (!r.ok) return { ok: false, flags: r.flags };
  return { ok: true, design: r.design, reasons: r.reasons, flags: r.flags };
}

function defaultOp(design: StageDesign, file: StageFile): OperatingPoint {
  return file.operatingPoint ?? {
    vin: design.vinNom,
    iout: design.outputs.map((o) => o.currentMax),
    ambient: (file.spec?.ambient ?? 25) as Celsius,
  };
}

/** An operating point or corner the engine refuses becomes a one-line failure. */
function engineCall<T>(fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof StageInputError || e instanceof RangeError) throw new ApiFailure(e.message);
    throw e;
  }
}

/** The fully computed stage: design, reasons, evaluation, windows and (buck, coupled-winding) magnetic. */
export function stageReport(file: StageFile) {
  const r = resolve(file);
  if (!r.ok) return r;
  const { design } = r;
  const op = defaultOp(design, file);
  const corners = file.corners ?? {
    vin: [design.vinMin, design.vinNom, design.vinMax] as Volts[],
    iout: design.outputs.map((o) => ({ min: o.currentMin as Amps, max: o.currentMax as Amps })),
  };
  return engineCall(() => {
    const evaluation = evaluateStage(design, op);
    const windows = stageWindows(design, corners, file.monteCarlo ? { monteCarlo: file.monteCarlo } : undefined);
    const magnetic = design.kind === 'buck' || design.kind === 'cwbuck' ? magneticSpec(design) : null;
    return { ok: true as const, kind: design.kind, design, reasons: r.reasons, designFlags: r.flags, operatingPoint: op, evaluation, windows, magnetic };
  });
}

/** The open-loop SPICE netlist of a switching stage at its operating point (default: nominal input, full load). */
export function stageNetlist(file: StageFile): { ok: true; text: string } | StageNotDesigned {
  const r = resolve(file);
  if (!r.ok) return r;
  const { design } = r;
  const op = defaultOp(design, file);
  return engineCall(() => {
    evaluateStage(design, op); // validates the operating point
    // Through the kind registry: every switching kind's module has its netlist writer.
    const text = kindNetlist(design, op);
    if (text !== null) return { ok: true as const, text };
    throw new ApiFailure(`${design.kind === 'ldo' ? 'an LDO does not switch' : design.kind === 'load-switch' ? 'a load switch does not switch at a frequency' : 'an isolated module is a bought part'}: there is no netlist to write`);
  });
}
