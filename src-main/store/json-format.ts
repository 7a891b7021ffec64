/**
 * JSON interchange: a whole project as one JSON document (docs/project-json.md).
 * Export writes base SI numbers; import accepts SI numbers or engineering-notation strings
 * (parsed with engine/notation.ts) and reports every problem with its path and reason.
 * The same schema, in strict mode (numbers only), guards what the store accepts.
 */
import { z } from 'zod';
import {
  DEFAULT_LIMITS, DEFAULT_PREFERENCES, ISOLATION_CLASSES, NOISE_CLASSES, STAGE_KINDS,
  type PartLibraryRow, type Requirements,
} from '../engine/model.ts';
import type { PlanResult } from '../engine/plan-types.ts';
import type { QuantityKind } from '../engine/units.ts';
import { parseQuantity, parseTolerance } from '../engine/notation.ts';
import { validateRequirements, type Problem } from '../engine/validate.ts';
import { checkText, type TextKind } from '../engine/text-rules.ts';

export const FORMAT_TAG = 'railwright-project';
export const FORMAT_VERSION = 1;

/** A saved plan result with the requirements revision it was computed from. */
export interface StoredPlan {
  revision: number;
  /** ISO 8601 time the plan was computed. */
  computedAt: string;
  result: PlanResult;
}

/** Everything a project file holds, as plain data. */
export interface ProjectDocument {
  requirements: Requirements;
  /** ISO 8601 times kept by the store (absent for a document never saved). */
  created?: string;
  modified?: string;
  plan?: StoredPlan;
  library?: PartLibraryRow[];
}

export type { Problem };

type Mode = 'import' | 'strict';

/** `loads[3].current.run` from a zod path. */
export function formatPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const p of path) {
    if (typeof p === 'number') out += `[${p}]`;
    else out += out === '' ? String(p) : `.${String(p)}`;
  }
  return out;
}

function quantity(kind: QuantityKind, mode: Mode) {
  if (mode === 'strict') return z.number();
  return z.union([z.number(), z.string()]).transform((v, ctx) => {
    if (typeof v === 'number') return v;
    const r = parseQuantity(v, kind, '');
    if (!r.ok) {
      ctx.addIssue({ code: 'custom', message: r.message });
      return z.NEVER;
    }
    return r.value;
  });
}

function tolerance(mode: Mode) {
  if (mode === 'strict') return z.number();
  return z.union([z.number(), z.string()]).transform((v, ctx) => {
    if (typeof v === 'number') return v;
    const r = parseTolerance(v, '');
    if (!r.ok) {
      ctx.addIssue({ code: 'custom', message: r.message });
      return z.NEVER;
    }
    return r.value;
  });
}

const idSchema = z.string().min(1, 'id must not be empty').max(200, 'id is longer than 200 characters');
const nameSchema = z.string().max(500, 'name is longer than 500 characters');

/**
 * On import, text also follows the one rule of engine/text-rules.ts (a refusal, like a
 * wrong type). The store's strict mode keeps only the size limits: a file breaking the rule
 * still opens, and validation lists each breach.
 */
function ruled<T extends z.ZodString>(schema: T, mode: Mode, kind: TextKind = 'name', limit = 500) {
  if (mode === 'strict') return schema;
  return schema.superRefine((v, ctx) => {
    if (v.length > limit) return; // already refused by the size limit
    const m = checkText(v, kind);
    if (m) ctx.addIssue({ code: 'custom', message: m });
  });
}

function requirementsShape(mode: Mode) {
  const imp = mode === 'import';
  const source = z.looseObject({
    id: ruled(idSchema, mode, 'name', 200),
    name: ruled(nameSchema, mode),
    vNom: quantity('voltage', mode),
    vMin: quantity('voltage', mode),
    vMax: quantity('voltage', mode),
    currentLimit: quantity('current', mode),
  });
  const domain = z.looseObject({
    id: ruled(idSchema, mode, 'name', 200),
    name: ruled(nameSchema, mode),
    isolation: z.enum(ISOLATION_CLASSES as [string, ...string[]]),
    workingVoltage: quantity('voltage', mode),
  });
  const opMode = z.looseObject({
    id: ruled(idSchema, mode, 'name', 200),
    name: ruled(nameSchema, mode),
    share: quantity('ratio', mode),
  });
  const load = z.looseObject({
    id: ruled(idSchema, mode, 'name', 200),
    name: ruled(nameSchema, mode),
    domainId: ruled(idSchema, mode, 'name', 200),
    voltage: quantity('voltage', mode),
    tolerance: tolerance(mode),
    current: z.record(z.string(), quantity('current', mode)),
    rippleLimit: quantity('voltage', mode),
    noiseClass: imp
      ? z.enum(NOISE_CLASSES as [string, ...string[]]).default('standard')
      : z.enum(NOISE_CLASSES as [string, ...string[]]),
    railKey: ruled(z.string().max(200, 'rail key is longer than 200 characters'), mode, 'name', 200).optional(),
  });
  const limitsFields = {
    ambient: quantity('temperature', mode),
    tjMax: quantity('temperature', mode),
    tjMargin: quantity('temperature', mode),
    ceramicDerating: quantity('ratio', mode),
    electrolyticDerating: quantity('ratio', mode),
    powerDerating: quantity('ratio', mode),
    inputRatingMargin: quantity('ratio', mode).optional(),
  };
  const prefFields = {
    weights: z.strictObject({ loss: z.number(), cost: z.number(), parts: z.number() }),
    maxSecondaries: z.number().int(),
    allowedKinds: z.array(z.enum(STAGE_KINDS as [string, ...string[]])),
    switchingFrequency: quantity('frequency', mode),
    budgetMs: z.number(),
  };
  // Ids are keys: a repeated id is refused here (validate.ts reports it for other callers).
  const uniqueIds = <T extends { id: string }>(what: string) => (items: T[], ctx: z.core.$RefinementCtx<T[]>) => {
    const seen = new Map<string, number>();
    items.forEach((it, i) => {
      const prev = seen.get(it.id);
      if (prev !== undefined) ctx.addIssue({ code: 'custom', path: [i, 'id'], message: `${what} id "${it.id}" is already used by entry ${prev}` });
      else seen.set(it.id, i);
    });
  };
  return {
    meta: z.looseObject({
      name: ruled(nameSchema, mode),
      description: imp ? ruled(z.string().max(20_000), mode, 'description', 20_000).default('') : z.string().max(20_000),
      revision: imp ? z.number().int().min(0).default(0) : z.number().int().min(0),
    }),
    sources: z.array(source).superRefine(uniqueIds('source')),
    domains: z.array(domain).superRefine(uniqueIds('domain')),
    modes: z.array(opMode).superRefine(uniqueIds('mode')),
    loads: z.array(load).superRefine(uniqueIds('load')),
    // On import, missing limits or preferences take the defaults field by field.
    limits: imp ? z.looseObject(limitsFields).partial().default({}) : z.looseObject(limitsFields),
    preferences: imp ? z.looseObject(prefFields).partial().default({}) : z.looseObject(prefFields),
  };
}

const planSchema = z.strictObject({
  revision: z.number().int().min(0),
  computedAt: z.string(),
  result: z.looseObject({
    revision: z.number().int().min(0),
    rails: z.array(z.unknown()),
    best: z.unknown(),
    alternatives: z.array(z.unknown()),
    infeasible: z.array(z.unknown()),
    stats: z.looseObject({}),
  }),
}).superRefine((p, ctx) => {
  if (p.revision !== p.result.revision) {
    ctx.addIssue({ code: 'custom', path: ['revision'], message: `plan revision ${p.revision} differs from its result's revision ${p.result.revision}` });
  }
});

const libraryRow = (mode: Mode) => z.strictObject({
  id: ruled(idSchema, mode, 'name', 200),
  partClass: ruled(z.string().min(1, 'part class must not be empty'), mode),
  name: ruled(nameSchema, mode),
  cost: z.number().min(0, 'cost must not be negative'),
  params: z.record(z.string(), z.unknown()),
});
const libraryRowSchema = libraryRow('strict');

function documentSchema() {
  const r = requirementsShape('import');
  return z.strictObject({
    format: z.literal(FORMAT_TAG, { error: `format must be "${FORMAT_TAG}"` }),
    version: z.number().int().min(1).max(FORMAT_VERSION, {
      error: `format version is newer than this program understands (${FORMAT_VERSION}): made by a newer Railwright`,
    }),
    meta: r.meta.extend({ created: z.string().optional(), modified: z.string().optional() }),
    sources: r.sources,
    domains: r.domains,
    modes: r.modes,
    loads: r.loads,
    limits: r.limits,
    preferences: r.preferences,
    plan: planSchema.optional(),
    library: z.array(libraryRow('import')).optional(),
  });
}

const strictRequirements = z.strictObject(requirementsShape('strict'));
let docSchemaCache: ReturnType<typeof documentSchema> | null = null;

function describeInput(x: unknown): string {
  if (x === undefined) return 'nothing';
  if (x === null) return 'null';
  if (typeof x === 'string') return `"${x.length > 40 ? x.slice(0, 40) + '…' : x}"`;
  if (typeof x === 'number') return String(x);
  if (Array.isArray(x)) return 'a list';
  return `a ${typeof x}`;
}

/** zod issues → our problems, one per issue, with readable reasons. */
function toProblems(issues: readonly z.core.$ZodIssue[]): Problem[] {
  const out: Problem[] = [];
  for (const is of issues) {
    const path = formatPath(is.path);
    const input = (is as { input?: unknown }).input;
    let message = is.message;
    if (is.code === 'invalid_type') {
      message = input === undefined ? 'required field is missing' : `expected ${is.expected}, got ${describeInput(input)}`;
    } else if (is.code === 'unrecognized_keys') {
      for (const k of is.keys) {
        const key = k === '' ? '(empty name)' : k;
        out.push({ path: path ? `${path}.${key}` : key, message: 'unknown field' });
      }
      continue;
    } else if (is.code === 'invalid_value') {
      message = `${describeInput(input)} is not one of ${is.values.map((v) => JSON.stringify(v)).join(', ')}`;
      if (is.path.length === 1 && is.path[0] === 'format') message = `not a Railwright project document (format must be "${FORMAT_TAG}")`;
    } else if (is.code === 'invalid_union') {
      message = input === undefined ? 'required field is missing' : `expected a number or a text like "3V3", got ${describeInput(input)}`;
    }
    out.push({ path: path || '(document)', message });
  }
  return out;
}

/** Check that a value is a structurally sound Requirements in SI numbers (for the store). */
export function checkRequirementsShape(value: unknown): Problem[] {
  const r = strictRequirements.safeParse(value, { reportInput: true });
  if (r.success) return [];
  // Extra fields on the entities are allowed (additive model changes); the top level is strict.
  return toProblems(r.error.issues);
}

export type ImportResult =
  | { ok: true; doc: ProjectDocument; problems: Problem[] }
  | { ok: false; problems: Problem[] };

/**
 * Import a project document from JSON text. Structural problems (bad JSON, wrong types,
 * unreadable quantities) make the import fail with every problem listed; a structurally
 * sound document is returned with the semantic problems of validate.ts in `problems`.
 */
export function importProjectJson(text: string): ImportResult {
  let data: unknown;
  try {
    // Editors on some systems start UTF-8 files with a byte-order mark; JSON.parse refuses it.
    data = JSON.parse(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text);
  } catch (e) {
    return { ok: false, problems: [{ path: '(document)', message: `not valid JSON: ${(e as Error).message}` }] };
  }
  return importProjectValue(data);
}

/** Deepest nesting a document may have: far beyond any real project, well below the stack. */
export const MAX_DEPTH = 64;
/** Longest JSON text accepted, imported or stored (the window's import limit). */
export const MAX_JSON_CHARS = 16_000_000;

/**
 * Check JSON text before parsing it: a reason when it is longer than MAX_JSON_CHARS or
 * nests objects and arrays deeper than `limit`, else null. One pass over the characters,
 * no recursion (brackets inside strings do not count), so hostile text cannot exhaust the
 * stack here or in whatever walks the parsed value later.
 */
export function jsonTextProblem(text: string, limit = MAX_DEPTH): string | null {
  if (text.length > MAX_JSON_CHARS) return `${text.length} characters of JSON, more than the ${MAX_JSON_CHARS} a project value may have`;
  let depth = 0;
  let inString = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (inString) {
      if (c === 0x5c) i++; // backslash: skip the escaped character
      else if (c === 0x22) inString = false;
    } else if (c === 0x22) {
      inString = true;
    } else if (c === 0x7b || c === 0x5b) {
      if (++depth > limit) return `nested more than ${limit} levels deep; a project document never needs that`;
    } else if (c === 0x7d || c === 0x5d) {
      depth--;
    }
  }
  return null;
}

/** Path of the first value nested deeper than `limit`, or null. Iterative: no recursion. */
function findTooDeep(root: unknown, limit: number): string | null {
  const stack: { v: unknown; path: (string | number)[] }[] = [{ v: root, path: [] }];
  while (stack.length) {
    const { v, path } = stack.pop()!;
    if (typeof v !== 'object' || v === null) continue;
    if (path.length >= limit) return formatPath(path);
    if (Array.isArray(v)) v.forEach((x, i) => stack.push({ v: x, path: [...path, i] }));
    else for (const [k, x] of Object.entries(v)) stack.push({ v: x, path: [...path, k] });
  }
  return null;
}

export function importProjectValue(data: unknown): ImportResult {
  if (typeof data !== 'object' || data === null || Array.isArray(data)) {
    return { ok: false, problems: [{ path: '(document)', message: 'expected a JSON object' }] };
  }
  const deep = findTooDeep(data, MAX_DEPTH);
  if (deep !== null) {
    return { ok: false, problems: [{ path: deep || '(document)', message: `nested more than ${MAX_DEPTH} levels deep; a project document never needs that` }] };
  }
  docSchemaCache ??= documentSchema();
  const r = docSchemaCache.safeParse(data, { reportInput: true });
  if (!r.success) return { ok: false, problems: toProblems(r.error.issues) };
  const d = r.data;
  const libProblems = d.library ? checkLibraryShape(d.library) : [];
  if (libProblems.length) return { ok: false, problems: libProblems };
  const { created, modified, ...metaRest } = d.meta;
  const requirements = {
    meta: metaRest,
    sources: d.sources,
    domains: d.domains,
    modes: d.modes,
    loads: d.loads.map((l) => {
      const { railKey, ...rest } = l;
      return railKey === undefined ? rest : { ...rest, railKey };
    }),
    limits: { ...DEFAULT_LIMITS, ...d.limits },
    preferences: { ...DEFAULT_PREFERENCES, ...d.preferences },
  } as unknown as Requirements;
  const doc: ProjectDocument = { requirements };
  if (created !== undefined) doc.created = created;
  if (modified !== undefined) doc.modified = modified;
  if (d.plan) doc.plan = d.plan as unknown as StoredPlan;
  if (d.library) doc.library = d.library as PartLibraryRow[];
  return { ok: true, doc, problems: validateRequirements(requirements) };
}

/** The JSON value of a project document (SI numbers, stable key order). */
export function exportProjectValue(doc: ProjectDocument): Record<string, unknown> {
  const r = doc.requirements;
  const meta: Record<string, unknown> = { ...r.meta };
  if (doc.created !== undefined) meta.created = doc.created;
  if (doc.modified !== undefined) meta.modified = doc.modified;
  const out: Record<string, unknown> = {
    format: FORMAT_TAG,
    version: FORMAT_VERSION,
    meta,
    sources: r.sources,
    domains: r.domains,
    modes: r.modes,
    loads: r.loads,
    limits: r.limits,
    preferences: r.preferences,
  };
  if (doc.plan) out.plan = doc.plan;
  if (doc.library) out.library = doc.library;
  return out;
}

/**
 * JSON.stringify escapes C0 controls only. Every other character a name may not hold
 * (DEL, C1 controls, line and paragraph separators, bidirectional formatting, noncharacters)
 * is written as a \u escape too: the same value, but nothing in the file can steer a
 * terminal or an editor. Such characters only occur inside strings, so this is lossless.
 */
const JSON_UNSAFE = /[\u007f-\u009f\u061c\u200e\u200f\u2028\u2029\u202a-\u202e\u2066-\u2069\ufdd0-\ufdef\ufffe\uffff]/g;

/** JSON text (2-space indent) in which no character can steer a terminal or an editor. */
export function safeJsonText(value: unknown): string {
  return JSON.stringify(value, null, 2).replace(JSON_UNSAFE, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

export function exportProjectJson(doc: ProjectDocument): string {
  return safeJsonText(exportProjectValue(doc)) + '\n';
}

/** Check a stored plan ({ revision, computedAt, result }) before the store keeps it. */
export function checkPlanShape(value: unknown): Problem[] {
  const r = planSchema.safeParse(value, { reportInput: true });
  return r.success ? [] : toProblems(r.error.issues).map((p) => ({ ...p, path: `plan.${p.path}` }));
}

/** Check part library rows (shape and unique ids) before the store keeps them. */
export function checkLibraryShape(value: unknown): Problem[] {
  const r = z.array(libraryRowSchema).safeParse(value, { reportInput: true });
  if (!r.success) return toProblems(r.error.issues).map((p) => ({ ...p, path: `library${p.path.startsWith('[') ? '' : '.'}${p.path}` }));
  const seen = new Set<string>();
  const out: Problem[] = [];
  r.data.forEach((row, i) => {
    if (seen.has(row.id)) out.push({ path: `library[${i}].id`, message: `part id "${row.id}" is used twice` });
    seen.add(row.id);
  });
  return out;
}
