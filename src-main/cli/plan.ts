/**
 * `railwright plan <project.rwproj>`: plan the power tree in a worker thread, print the tree
 * with the reason for every decision (or the PlanResult as JSON), and save it into the
 * project file with the requirements revision it was computed from.
 */
import { CliError, parseFlags, type CliCommand, type CliIo } from './command.ts';
import { OpenError, ProjectStore, SaveRefused, StoreError } from '../store/project-store.ts';
import { formatQuantity } from '../api/window-shared.ts';
import { DEFAULT_WINDOW_MARGIN, runtimeText, showText, type Objective, type Plan, type PlanResult, type Requirements } from '../api/cli-shared.ts';
import { planningProblems, planWithLibrary } from '../api/plan-job.ts';
import { rollupOf } from '../api/figures.ts';
import { projectLibrary } from './open-project.ts';
import { safeJsonText } from '../store/json-format.ts';

const OBJECTIVES: Objective[] = ['loss', 'cost', 'parts', 'balanced'];

const ISOLATION_CAUTION =
  'Caution: isolation barriers and mains-connected inputs can kill. The plan records the isolation class ' +
  'and working voltage each barrier needs and certifies nothing; creepage, clearance, insulation and touch ' +
  'current follow the applicable safety standard and local codes, and a qualified engineer and the test lab decide.';

const USAGE = `Usage: railwright plan <project.rwproj> [--objective loss|cost|parts|balanced] [--json] [--budget-ms N] [--verbose]

Plans the power tree of the project (which stage feeds each rail, shared coupled-winding
magnetics, LDO post-regulators and tap windings), prints it with the reason for every decision,
and saves the result into the project file with the requirements revision it was made from.

  --objective   what "best" means: loss, cost, parts or balanced (default: balanced, weighted
                by the project's planner preferences)
  --json        print the whole PlanResult as JSON instead of the tree
  --budget-ms   time budget in milliseconds (default: the project's preference)
  --verbose     print the planner's trace and progress to stderr`;

function v(x: number): string {
  return formatQuantity(x, 'voltage', 4);
}

export function renderPlan(req: Requirements, result: PlanResult, plan: Plan): string[] {
  const out: string[] = [];
  const railName = new Map(result.rails.map((r) => [r.id, r.name]));
  const nodeName = (id: string) =>
    railName.get(id) ?? plan.internalNodes.find((n) => n.id === id)?.name ?? req.sources.find((s) => s.id === id)?.name ?? id;
  const byInput = new Map<string, Plan['stages']>();
  for (const st of plan.stages) byInput.set(st.inputNodeId, [...(byInput.get(st.inputNodeId) ?? []), st]);
  const s = plan.score;
  out.push(`Plan ${plan.id} [${plan.labels.join(', ')}]: loss ${formatQuantity(s.loss, 'power', 3)} (mode-weighted), cost ${s.cost.toFixed(2)} and ${s.parts} parts (the BOM of the parts the stages were designed with, priced by the project's part library; default rows are invented estimates), score ${s.weighted.toFixed(4)}`);
  const walk = (nodeId: string, depth: number, seen: Set<string>) => {
    for (const st of byInput.get(nodeId) ?? []) {
      if (seen.has(st.id)) continue;
      seen.add(st.id);
      const pad = '  '.repeat(depth);
      const barrier = st.barriers.length ? `  ‖ barrier: ${st.barriers.map((b) => `${b.isolation} to ${req.domains.find((d) => d.id === b.toDomainId)?.name ?? b.toDomainId}, ${v(b.workingVoltage)} working`).join('; ')}` : '';
      out.push(`${pad}└ ${st.name} (${st.kind})${barrier}`);
      for (const o of st.outputs) {
        const turns = o.turns !== undefined ? `, ${o.turns} turns` : '';
        out.push(`${pad}   → ${nodeName(o.nodeId)} (${o.role}${turns})`);
        walk(o.nodeId, depth + 2, seen);
      }
    }
  };
  for (const src of req.sources) {
    out.push(`${src.name} (${v(src.vMin)}…${v(src.vMax)})`);
    walk(src.id, 1, new Set());
  }
  const marginal = plan.reasons.filter((r) => r.code === 'marginal');
  if (marginal.length) {
    out.push('', `Marginal (worst-case window within ${+(100 * (req.limits.windowMargin ?? DEFAULT_WINDOW_MARGIN)).toPrecision(3)} % of its band half-width from an edge): ` +
      marginal.map((r) => result.rails.find((x) => x.id === r.subjectId)?.name ?? r.subjectId).join(', '));
  }
  out.push('', 'Reasons:');
  for (const r of plan.reasons) out.push(`  - ${r.text}`);
  return out;
}

/** Battery runtime of the plan (its roll-up: conversion losses included), one line per battery source. */
export function runtimeLines(req: Requirements, plan: Plan): string[] {
  if (!req.sources.some((s) => s.battery)) return [];
  try {
    const r = rollupOf(req, plan);
    return r.batteries.map((b) => showText(`Battery runtime (roll-up, at nominal input) — ${runtimeText(b, req.sources.find((s) => s.id === b.sourceId)?.name ?? b.sourceId)}.`));
  } catch (e) {
    return [`Battery runtime: the roll-up failed (${(e as Error).message})`];
  }
}

function renderResult(req: Requirements, result: PlanResult, io: CliIo): void {
  if (!result.best) {
    io.out(result.stats.cancelled ? 'Planning was cancelled before a plan was found.' : 'No feasible power tree:');
    for (const i of result.infeasible) {
      io.out(`  - ${i.text}${i.shortfall ? ` (short by ${+i.shortfall.toPrecision(3)} ${i.unit})` : ''}`);
      for (const r of i.remedies) io.out(`      remedy: ${r}`);
    }
    return;
  }
  for (const line of renderPlan(req, result, result.best)) io.out(line);
  const others = result.alternatives.filter((p) => p !== result.best && p.id !== result.best!.id);
  if (others.length) {
    io.out('');
    io.out('Alternatives:');
    for (const p of others) {
      io.out(`  ${p.labels.join(', ')}: loss ${formatQuantity(p.score.loss, 'power', 3)}, cost ${p.score.cost.toFixed(2)}, ${p.score.parts} parts, ${p.stages.length} stages (${p.stages.map((s) => s.kind).join(', ')})`);
    }
  }
  io.out('');
  const st = result.stats;
  io.out(`${st.provedOptimal ? 'Proved optimal' : `Best found, not proved optimal${st.notProved ? ` (${st.notProved})` : ''}`}; ${st.explored} search nodes, ${st.elapsedMs.toFixed(0)} ms.`);
  if (st.space) io.out(`${st.provedOptimal ? 'Proved over' : 'Searched'}: ${st.space.summary}.`);
  for (const line of runtimeLines(req, result.best)) io.out(line);
  if (result.best.stages.some((s) => s.barriers.length)) { io.out(''); io.out(ISOLATION_CAUTION); }
}

export const planCommands: CliCommand[] = [{
  name: 'plan',
  summary: 'plan the power tree (stages, shared magnetics, LDOs) with reasons and save it',
  usage: USAGE,
  async run(args: string[], io: CliIo): Promise<number> {
    const { flags, positional } = parseFlags(args, { objective: 'string', json: 'boolean', 'budget-ms': 'string', verbose: 'boolean' });
    if (positional.length !== 1) throw new CliError('give exactly one project file (see --help)', 2);
    const objective = (flags.objective ?? 'balanced') as string;
    if (!OBJECTIVES.includes(objective as Objective)) throw new CliError(`--objective: "${objective}" is not one of ${OBJECTIVES.join(', ')}`, 2);
    let budgetMs: number | undefined;
    if (flags['budget-ms'] !== undefined) {
      budgetMs = Number(flags['budget-ms']);
      if (!Number.isFinite(budgetMs) || budgetMs <= 0 || budgetMs > 3_600_000) throw new CliError(`--budget-ms: "${String(flags['budget-ms'])}" must be a number of milliseconds between 1 and 3600000`, 2);
    }
    let store: ProjectStore;
    try {
      store = ProjectStore.open(positional[0]!);
    } catch (e) {
      if (e instanceof OpenError) throw new CliError(e.message);
      throw e;
    }
    try {
      const req = store.getRequirements();
      const problems = planningProblems(req);
      if (problems.length) {
        io.err('the requirements have problems; fix them before planning (nothing was changed):');
        for (const p of problems) io.err(`  ${p.path}: ${p.message}`);
        return 1;
      }
      const verbose = flags.verbose === true;
      let last = '';
      // The project's part library designs and prices the stages (the default library when
      // the project has none), as in the window: the BOM then lists the analysed parts.
      const library = projectLibrary(store, io);
      const result = await planWithLibrary(
        req,
        library,
        { objective: objective as Objective, ...(budgetMs !== undefined ? { budgetMs } : {}) },
        verbose ? (p) => { const line = `[${p.phase}] ${p.message}: ${p.candidates} stage designs, ${p.explored} nodes${p.incumbent !== undefined ? `, incumbent ${p.incumbent.toFixed(4)}` : ''}`; if (line !== last) io.err(line); last = line; } : undefined,
        undefined,
        verbose ? (lines) => { for (const l of lines) io.err(`trace: ${l}`); } : undefined,
      );
      if (flags.json === true) io.out(safeJsonText(result));
      else renderResult(req, result, io);
      try {
        store.setPlanResult(result);
        store.save();
      } catch (e) {
        if (e instanceof SaveRefused && e.kind === 'changed') {
          throw new CliError(`the plan could not be saved: ${positional[0]} changed on disk while planning (another program or window saved it), and it was left as that program wrote it; run plan again`);
        }
        if (e instanceof StoreError) throw new CliError(`the plan could not be saved: ${e.message}`);
        throw e;
      }
      if (flags.json !== true) io.out(`Saved to ${positional[0]} (requirements revision ${result.revision}).`);
      return result.best ? 0 : 3;
    } finally {
      store.close();
    }
  },
}];
