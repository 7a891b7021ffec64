/**
 * The stage JSON format (docs/stage-json.md): a StageSpec or a StageDesign, an optional
 * operating point, optional window corners and an optional Monte Carlo request. Quantities
 * may be SI numbers or engineering-notation strings ("24V", "400k", "±5%"). Parsing is pure
 * and reports the first bad field by its path.
 */
import { parseQuantity, parseTolerance } from '../notation.ts';
import type { QuantityKind } from '../units.ts';
import type { OperatingPoint, OutputSpec, StageSpec } from './types.ts';
import type { StageDesign, WindowCorners } from './index.ts';
import { isStageDesign, missingDesignFields } from './registry.ts';
import { ISOLATION_CLASSES, STAGE_MODEL_KINDS, type IsolationClass, type StageModelKind } from '../model.ts';

const kindOk = (k: unknown): k is StageModelKind => STAGE_MODEL_KINDS.includes(k as StageModelKind);
const KIND_LIST = STAGE_MODEL_KINDS.map((k) => `"${k}"`).join(', ');

export interface StageFile {
  spec: StageSpec | null;
  design: StageDesign | null;
  operatingPoint: OperatingPoint | null;
  corners: WindowCorners | null;
  monteCarlo: { runs: number; seed: number } | null;
}

export class StageFileError extends Error {}

function fail(path: string, why: string): never {
  throw new StageFileError(`${path}: ${why}`);
}

function obj(v: unknown, path: string): Record<string, unknown> {
  if (!v || typeof v !== 'object' || Array.isArray(v)) fail(path, 'expected an object');
  return v as Record<string, unknown>;
}

function qty(v: unknown, kind: QuantityKind, path: string): number {
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) fail(path, 'not a finite number');
    return v;
  }
  if (typeof v !== 'string') fail(path, `expected a number or a string like ${kind === 'voltage' ? '"3V3"' : kind === 'current' ? '"250mA"' : '"400k"'}`);
  const r = parseQuantity(v, kind, path);
  if (!r.ok) throw new StageFileError(r.message);
  return r.value;
}

function tol(v: unknown, path: string): number {
  if (typeof v === 'number') {
    if (!(Number.isFinite(v) && v >= 0 && v < 1)) fail(path, 'a ratio in 0…1 (0.05 = ±5 %) or a string like "±5%"');
    return v;
  }
  const r = parseTolerance(String(v), path);
  if (!r.ok) throw new StageFileError(r.message);
  return r.value;
}

function optional<T>(o: Record<string, unknown>, key: string, f: (v: unknown, p: string) => T, path: string): T | undefined {
  return o[key] === undefined ? undefined : f(o[key], `${path}.${key}`);
}

function parseOutput(v: unknown, path: string): OutputSpec {
  const o = obj(v, path);
  const nodeId = o.nodeId ?? o.name;
  if (typeof nodeId !== 'string' || nodeId === '') fail(`${path}.nodeId`, 'a non-empty name is required');
  return {
    nodeId,
    voltage: qty(o.voltage, 'voltage', `${path}.voltage`),
    tolerance: tol(o.tolerance, `${path}.tolerance`),
    currentMin: qty(o.currentMin ?? 0, 'current', `${path}.currentMin`),
    currentMax: qty(o.currentMax, 'current', `${path}.currentMax`),
    rippleLimit: qty(o.rippleLimit, 'voltage', `${path}.rippleLimit`),
  } as OutputSpec;
}

export function parseSpec(v: unknown, path = 'spec'): StageSpec {
  const o = obj(v, path);
  if (!kindOk(o.kind)) fail(`${path}.kind`, `one of ${KIND_LIST} (got ${JSON.stringify(o.kind)})`);
  if (!Array.isArray(o.outputs) || o.outputs.length === 0) fail(`${path}.outputs`, 'a non-empty list of outputs is required');
  const spec: StageSpec = {
    kind: o.kind,
    vinMin: qty(o.vinMin, 'voltage', `${path}.vinMin`),
    vinNom: qty(o.vinNom, 'voltage', `${path}.vinNom`),
    vinMax: qty(o.vinMax, 'voltage', `${path}.vinMax`),
    outputs: o.outputs.map((x, i) => parseOutput(x, `${path}.outputs[${i}]`)),
    fsw: qty(o.fsw ?? 0, 'frequency', `${path}.fsw`),
    ambient: qty(o.ambient ?? 25, 'temperature', `${path}.ambient`),
    tjMax: qty(o.tjMax ?? 125, 'temperature', `${path}.tjMax`),
    ceramicDerating: tol(o.ceramicDerating ?? 0.6, `${path}.ceramicDerating`),
  } as StageSpec;
  const ripple = optional(o, 'vinRipple', (x, p) => qty(x, 'voltage', p), path);
  if (ripple !== undefined) spec.vinRipple = ripple as StageSpec['vinRipple'];
  const coupling = optional(o, 'coupling', (x, p) => {
    if (typeof x !== 'number' || !(x > 0.5 && x < 1)) fail(p, 'a number between 0.5 and 1');
    return x;
  }, path);
  if (coupling !== undefined) spec.coupling = coupling;
  const maxSec = optional(o, 'maxSecondaries', (x, p) => {
    if (typeof x !== 'number' || !Number.isInteger(x) || x < 1) fail(p, 'a whole number ≥ 1');
    return x;
  }, path);
  if (maxSec !== undefined) spec.maxSecondaries = maxSec;
  // cwbuck: the rectifier model (numbers in SI units; the designer checks their ranges) and
  // the coupling between secondaries.
  const rect = optional(o, 'rectifier', (x, p) => {
    const r = obj(x, p);
    const out: Record<string, number> = {};
    for (const [key, val] of Object.entries(r)) {
      if (!['is', 'n', 'rs', 'vfSpread', 'cjo', 'vj', 'm', 'tt'].includes(key)) fail(`${p}.${key}`, 'not a rectifier field (is, n, rs, vfSpread, cjo, vj, m, tt)');
      if (typeof val !== 'number' || !Number.isFinite(val)) fail(`${p}.${key}`, 'a finite number in SI units');
      out[key] = val;
    }
    return out;
  }, path);
  if (rect !== undefined) spec.rectifier = rect as unknown as NonNullable<StageSpec['rectifier']>;
  const kss = optional(o, 'secondaryCoupling', (x, p) => {
    if (!Array.isArray(x) || x.some((row) => !Array.isArray(row) || row.some((v) => typeof v !== 'number' || !Number.isFinite(v)))) fail(p, 'a square list of lists of numbers, one row per secondary');
    return x as number[][];
  }, path);
  if (kss !== undefined) spec.secondaryCoupling = kss;
  const mt = optional(o, 'magneticTolerance', (x, p) => {
    const r = obj(x, p);
    for (const key of Object.keys(r)) if (key !== 'inductance' && key !== 'leakageLow') fail(`${p}.${key}`, 'not a tolerance field (inductance, leakageLow)');
    const ind = r.inductance ?? 0.2;
    const low = r.leakageLow ?? 0.5;
    if (typeof ind !== 'number' || !(ind >= 0 && ind < 0.5)) fail(`${p}.inductance`, 'a share of Lp from 0 to below 0.5');
    if (typeof low !== 'number' || !(low > 0 && low <= 1)) fail(`${p}.leakageLow`, 'a share of the leakage above 0, at most 1');
    return { inductance: ind as number, leakageLow: low as number };
  }, path);
  if (mt !== undefined) spec.magneticTolerance = mt;
  if (o.loadSwitch !== undefined) {
    const ls = obj(o.loadSwitch, `${path}.loadSwitch`);
    const out: NonNullable<StageSpec['loadSwitch']> = {};
    const c = optional(ls, 'cload', (x, p) => qty(x, 'capacitance', p), `${path}.loadSwitch`);
    if (c !== undefined) out.cload = c;
    const lim = optional(ls, 'inrushLimit', (x, p) => qty(x, 'current', p), `${path}.loadSwitch`);
    if (lim !== undefined) out.inrushLimit = lim;
    const slew = optional(ls, 'slewRate', (x, p) => {
      if (typeof x !== 'number' || !(x > 0) || !Number.isFinite(x)) fail(p, 'a positive number of volts per second');
      return x;
    }, `${path}.loadSwitch`);
    if (slew !== undefined) out.slewRate = slew;
    if (ls.offModes !== undefined) {
      if (!Array.isArray(ls.offModes) || ls.offModes.some((m) => typeof m !== 'string' || m === '')) fail(`${path}.loadSwitch.offModes`, 'a list of mode ids');
      out.offModes = [...(ls.offModes as string[])];
    }
    spec.loadSwitch = out;
  }
  if (o.isolation !== undefined && o.isolation !== null) {
    const iso = obj(o.isolation, `${path}.isolation`);
    if (!ISOLATION_CLASSES.includes(iso.class as IsolationClass)) fail(`${path}.isolation.class`, `one of ${ISOLATION_CLASSES.join(', ')}`);
    spec.isolation = { class: iso.class as IsolationClass, workingVoltage: qty(iso.workingVoltage ?? 0, 'voltage', `${path}.isolation.workingVoltage`) as never };
  }
  return spec;
}

/** A design is taken as written (it is the engine's own output); numbers must be finite. */
function checkDesign(v: unknown, path = 'design'): Record<string, unknown> {
  const o = obj(v, path);
  if (!kindOk(o.kind)) fail(`${path}.kind`, `one of ${KIND_LIST} (got ${JSON.stringify(o.kind)})`);
  if (!Array.isArray(o.outputs) || o.outputs.length === 0) fail(`${path}.outputs`, 'a non-empty list of outputs is required');
  const walk = (x: unknown, p: string, depth: number): void => {
    if (depth > 8) fail(p, 'nested too deeply');
    if (typeof x === 'number' && !Number.isFinite(x)) fail(p, 'not a finite number');
    if (x && typeof x === 'object') for (const [k, y] of Object.entries(x)) walk(y, Array.isArray(x) ? `${p}[${k}]` : `${p}.${k}`, depth + 1);
  };
  walk(o, path, 0);
  return o;
}

/** A checked design is its kind's design when it carries every field of that kind (registry.ts designFields). */
function asDesign(o: Record<string, unknown>, path: string): StageDesign {
  if (!isStageDesign(o)) {
    const missing = missingDesignFields(o);
    fail(`${path}.${missing[0]}`, `a ${String(o.kind)} design carries ${missing.length > 1 ? `these fields: ${missing.join(', ')}` : 'this field'} (write the design the engine gave, or give a spec instead)`);
  }
  return o;
}

export function parseStageFile(v: unknown): StageFile {
  const o = obj(v, 'stage file');
  const spec = o.spec !== undefined ? parseSpec(o.spec, 'spec') : null;
  const raw = o.design !== undefined ? checkDesign(o.design, 'design') : null;
  if (!spec && !raw) fail('stage file', 'needs "spec" (what to design) or "design" (a designed stage)');
  if (spec && raw) fail('stage file', 'give "spec" or "design", not both');
  const design = raw ? asDesign(raw, 'design') : null;
  const n = (spec ?? design)!.outputs.length;
  let operatingPoint: OperatingPoint | null = null;
  if (o.operatingPoint !== undefined) {
    const p = obj(o.operatingPoint, 'operatingPoint');
    if (!Array.isArray(p.iout) || p.iout.length !== n) fail('operatingPoint.iout', `one current per output (${n})`);
    operatingPoint = {
      vin: qty(p.vin, 'voltage', 'operatingPoint.vin'),
      iout: p.iout.map((x, i) => qty(x, 'current', `operatingPoint.iout[${i}]`)),
      ambient: qty(p.ambient ?? spec?.ambient ?? 25, 'temperature', 'operatingPoint.ambient'),
    } as OperatingPoint;
    if (p.mode !== undefined) {
      if (typeof p.mode !== 'string' || p.mode === '') fail('operatingPoint.mode', 'a mode id');
      operatingPoint.mode = p.mode;
    }
  }
  let corners: WindowCorners | null = null;
  if (o.corners !== undefined) {
    const c = obj(o.corners, 'corners');
    if (!Array.isArray(c.vin) || c.vin.length === 0) fail('corners.vin', 'a non-empty list of input voltages');
    if (!Array.isArray(c.iout) || c.iout.length !== n) fail('corners.iout', `one {min, max} per output (${n})`);
    corners = {
      vin: c.vin.map((x, i) => qty(x, 'voltage', `corners.vin[${i}]`)),
      iout: c.iout.map((x, i) => {
        const r = obj(x, `corners.iout[${i}]`);
        return { min: qty(r.min, 'current', `corners.iout[${i}].min`), max: qty(r.max, 'current', `corners.iout[${i}].max`) };
      }),
    } as WindowCorners;
  }
  let monteCarlo: StageFile['monteCarlo'] = null;
  if (o.monteCarlo !== undefined) {
    const m = obj(o.monteCarlo, 'monteCarlo');
    if (typeof m.runs !== 'number' || !Number.isInteger(m.runs) || m.runs < 1 || m.runs > 100_000) fail('monteCarlo.runs', 'a whole number in 1…100000');
    if (typeof m.seed !== 'number' || !Number.isInteger(m.seed)) fail('monteCarlo.seed', 'a whole number');
    monteCarlo = { runs: m.runs, seed: m.seed };
  }
  return { spec, design, operatingPoint, corners, monteCarlo };
}
