// Issue 7 item 4: the planner ends within its time budget on adversarial instances, with a
// plan or an explanation naming rail and constraint, and a cancel through the worker
// wrapper (the window's planning job) takes effect within 100 ms. Times are measured with
// a generous bound (budget 2 s → done within 2.5 s), not as a benchmark. The instances
// are invented; the only engineering fact used is that a buck only steps down (its output
// is below its input: Erickson & Maksimović, Fundamentals of Power Electronics, ch. 2).
import { describe, expect, it } from 'vitest';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import { randomRequirements } from '../../src-main/engine/planner/instances.ts';
import type { StageEvaluator } from '../../src-main/engine/planner/types.ts';
import { firstOrderEvaluator } from '../planner/helpers/first-order-evaluator.ts';
import { generateProject, prng } from '../../src-main/store/generate.ts';
import { newRequirements } from '../../src-main/store/project-store.ts';
import { validateRequirements } from '../../src-main/engine/validate.ts';
import { createApi } from '../../src-main/api/index.ts';
import type { Load, Requirements } from '../../src-main/engine/model.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';

const BUDGET_MS = 2000;
/** The target: done within the budget plus a quarter (recorded for every instance). */
const BOUND_MS = 2500;
/**
 * The hard limit asserted for every instance: the budget binds in every mode, and one more
 * second covers the last unit of work (a multi-winding design with its windows).
 */
const HARD_MS = BUDGET_MS + 1000;
// Instances known to overrun the budget (none since the budget binds in exact mode too).
const KNOWN_SLOW_LIST: string[] = [];

/** A load in plain numbers (SI); branded types are applied when the project is built. */
type LoadSpec = { voltage: number; tolerance?: number; rippleLimit?: number; current?: Record<string, number>; domainId?: string; railKey?: string; noiseClass?: Load['noiseClass'] };
/** Only step-down kinds allowed: a project with every rail above the input then has no tree (a boost or four-switch stage would serve it). */
const stepDownOnly = (r: Requirements) => { r.preferences.allowedKinds = ['buck', 'cwbuck', 'ldo']; };

function project(name: string, loads: LoadSpec[], tweak?: (r: Requirements) => void): Requirements {
  const r = newRequirements();
  r.meta.name = name;
  r.sources = [{ id: 'in', name: 'Input', vNom: 12, vMin: 11, vMax: 13, currentLimit: 1e9 } as Requirements['sources'][number]];
  r.domains = [{ id: 'main', name: 'Main', isolation: 'none', workingVoltage: 0 } as Requirements['domains'][number]];
  r.modes = [{ id: 'run', name: 'Run', share: 1 } as Requirements['modes'][number]];
  r.loads = loads.map((l, i) => ({
    id: `l${i}`, name: `Load ${i}`, domainId: 'main', tolerance: 0.05, current: { run: 0.5 }, rippleLimit: 0.05, noiseClass: 'standard', ...l,
  }) as Load);
  r.preferences.budgetMs = BUDGET_MS;
  tweak?.(r);
  return r;
}

const range = (n: number) => Array.from({ length: n }, (_, i) => i);

/** The adversarial instances (all invented). */
function instances(): { name: string; req: Requirements; expectInfeasible?: boolean }[] {
  const out: { name: string; req: Requirements; expectInfeasible?: boolean }[] = [];
  // Every rail above the 11–13 V input: no step-down stage can make any of them.
  out.push({ name: '30 rails, all above the input', req: project('all above input', range(30).map((i) => ({ voltage: 14 + i, railKey: `r${i}` })), stepDownOnly), expectInfeasible: true });
  out.push({ name: '40 rails, all above the input', req: project('forty above input', range(40).map((i) => ({ voltage: 14 + i, railKey: `r${i}` })), stepDownOnly), expectInfeasible: true });
  // Contradictory tolerances: one rail key holds loads of 3.3 V ±0.01 % and 3.3 V ±10 %
  // with ripple limits far below what any stage gives.
  out.push({
    name: 'contradictory and tiny tolerances',
    req: project('tight', range(12).map((i) => ({ voltage: [1.2, 1.8, 3.3, 5][i % 4]!, tolerance: i % 2 ? 1e-6 : 1e-9, rippleLimit: 1e-9, railKey: `k${i % 4}` }))),
  });
  out.push({ name: 'zero current everywhere', req: project('zero', range(10).map((i) => ({ voltage: 1 + i * 0.5, current: { run: 0 } }))) });
  out.push({ name: 'huge currents (1e6 A)', req: project('huge', range(10).map((i) => ({ voltage: 1 + i * 0.5, current: { run: 1e6 } }))) });
  // Negative and positive rails of the same magnitude in many isolated domains.
  out.push({
    name: '±5/±12/±15 V in 4 isolated domains',
    req: project('mirror', range(24).map((i) => ({ voltage: (i % 2 ? -1 : 1) * [5, 12, 15][Math.floor(i / 2) % 3]!, domainId: `iso${Math.floor(i / 6)}`, current: { run: 0.05 }, noiseClass: 'quiet' })), (r) => {
      r.domains.push(...range(4).map((d) => ({ id: `iso${d}`, name: `Iso ${d}`, isolation: d % 2 ? 'basic' : 'functional', workingVoltage: 60 }) as Requirements['domains'][number]));
      Object.assign(r.sources[0]!, { vMin: 20, vNom: 24, vMax: 28 });
    }),
  });
  const big = generateProject({ loads: 200, seed: 5 }).requirements;
  big.preferences.budgetMs = BUDGET_MS;
  out.push({ name: '200 loads (generated)', req: big });
  const mid = generateProject({ loads: 60, seed: 9 }).requirements;
  mid.preferences.budgetMs = BUDGET_MS;
  out.push({ name: '60 loads (generated)', req: mid });
  return out;
}

function checkExplained(name: string, req: Requirements, r: PlanResult): void {
  if (r.best) return;
  expect(r.infeasible.length, `${name}: no plan and no explanation`).toBeGreaterThan(0);
  const railIds = new Set(r.rails.map((x) => x.id));
  for (const f of r.infeasible) {
    expect(f.constraint, `${name}: an explanation without a constraint`).toMatch(/\S/);
    expect(f.text, `${name}: an explanation without text`).toMatch(/\S{3}/);
    // A rail id, or '' for a project-wide reason (no source, too many rails).
    if (f.railId !== '') expect(railIds.has(f.railId), `${name}: explanation names unknown rail ${f.railId}`).toBe(true);
  }
  void req;
}

/**
 * Run the planner as the window's worker does (small steps), but stop watching at twice the
 * bound so a runaway instance fails in seconds instead of running to the planner's cap.
 */
function planWatched(req: Requirements): { result: PlanResult | null; wall: number; solver: PlanSolver } {
  const t0 = performance.now();
  const solver = new PlanSolver(req, { evaluator: engineEvaluator() });
  while (!solver.step(50)) {
    if (performance.now() - t0 > HARD_MS + 1000) break;
  }
  return { result: solver.getResult(), wall: performance.now() - t0, solver };
}

/** Instances the planner does not yet end within the budget (reported; see docs/hardening.md). */
const KNOWN_SLOW = new Set<string>(KNOWN_SLOW_LIST);

describe('bounded planning on adversarial instances', () => {
  const list = instances();
  for (const { name, req, expectInfeasible } of list) {
    const test = KNOWN_SLOW.has(name) ? it.fails : it;
    test(`${name}: ends within the budget with a plan or an explanation`, { timeout: 30_000 }, () => {
      const { result: r, wall, solver } = planWatched(req);
      const rails = (solver.candidates().factory?.ctx.rails.length ?? r?.rails.length ?? 0);
      console.log(`planning ${name}: ${rails} rails, ${r ? 'done' : `still running (phase ${solver.progress.phase})`} after ${wall.toFixed(0)} ms wall; ${!r ? '' : r.best ? `plan of ${r.best.stages.length} stages` : `${r.infeasible.length} explanations, first: ${r.infeasible[0]?.constraint}: ${r.infeasible[0]?.text.slice(0, 90)}`}`);
      expect(r, `${name}: still running after ${wall.toFixed(0)} ms on a ${BUDGET_MS} ms budget (phase ${solver.progress.phase}; ${solver.explain().slice(-2).join(' / ')})`).not.toBeNull();
      checkExplained(name, req, r!);
      if (expectInfeasible) {
        expect(r!.best).toBeNull();
        expect(r!.infeasible.some((f) => f.railId !== '' || f.constraint === 'size'), `${name}: no rail named`).toBe(true);
      }
      expect(wall, `${name}: took ${wall.toFixed(0)} ms on a ${BUDGET_MS} ms budget`).toBeLessThanOrEqual(HARD_MS);
      if (wall > BOUND_MS) console.log(`planning ${name}: over the ${BOUND_MS} ms target (${wall.toFixed(0)} ms)`);
    });
  }
});

/**
 * The budget under a virtual clock: every stage design costs 20 ms of virtual time, so the
 * result does not depend on this machine's speed or load. The cost surface is the planner's
 * own first-order test evaluator (fast), on the planner's seeded random instances.
 */
function virtualRun(rails: number, drive: 'solve' | 'step1' | 'step50'): { virtualMs: number; result: PlanResult } {
  let t = 0;
  const ev: StageEvaluator = {
    design: (spec) => { t += 20; return firstOrderEvaluator.design(spec); },
    evaluate: (d, op) => firstOrderEvaluator.evaluate(d, op),
    windows: (d, c) => firstOrderEvaluator.windows(d, c),
  };
  const req = randomRequirements({ rails, seed: 3, maxSecondaries: 3 });
  req.preferences.budgetMs = BUDGET_MS;
  const solver = new PlanSolver(req, { evaluator: ev, now: () => t });
  if (drive === 'solve') solver.solve();
  else while (!solver.step(drive === 'step1' ? 1 : 50)) { /* the worker's loop, in small steps */ }
  const result = solver.getResult()!;
  return { virtualMs: result.stats.elapsedMs, result };
}

describe('the budget under a virtual clock (20 ms per stage design)', () => {
  for (const rails of [14, 20, 28]) {
    it(`${rails} rails, stepped one unit at a time: ends within ${BOUND_MS} ms with a plan or an explanation`, () => {
      const { virtualMs, result } = virtualRun(rails, 'step1');
      expect(result.best !== null || result.infeasible.length > 0).toBe(true);
      expect(virtualMs).toBeLessThanOrEqual(BOUND_MS);
    });
    // solve() once checked the budget only between steps of 500 units (13.2–14.2 s of virtual
    // time on a 2 s budget); it now looks at the clock after every candidate design.
    it(`${rails} rails through solve(): ends within ${BOUND_MS} ms`, () => {
      const { virtualMs } = virtualRun(rails, 'solve');
      expect(virtualMs).toBeLessThanOrEqual(BOUND_MS);
    });
  }
});

/** Start a planning job through the host's requests and cancel it after `delayMs` past its first progress report. */
async function cancelOnce(delayMs: number): Promise<{ took: number; outcome: string; freeAfter: boolean }> {
  const req = generateProject({ loads: 60, seed: 9 }).requirements;
  req.preferences.budgetMs = 60_000;
  expect(validateRequirements(req)).toEqual([]);
  const events: { name: string; payload: unknown; at: number }[] = [];
  let onEvent: (() => void) | null = null;
  const api = createApi({ host: 'test', userDataDir: null, emit: (name, payload) => { events.push({ name, payload, at: performance.now() }); onEvent?.(); } });
  api.session.requirements = req;
  const started = await api.request('plan.start', {});
  expect(started.ok, JSON.stringify(started)).toBe(true);
  const jobId = (started as { ok: true; value: { jobId: string } }).value.jobId;
  const waitFor = (pred: () => boolean, ms: number) => new Promise<boolean>((resolve) => {
    if (pred()) return resolve(true);
    const timer = setTimeout(() => { onEvent = null; resolve(false); }, ms);
    onEvent = () => { if (pred()) { clearTimeout(timer); onEvent = null; resolve(true); } };
  });
  expect(await waitFor(() => events.some((e) => e.name === 'plan.progress'), 30_000), 'no progress report within 30 s').toBe(true);
  await new Promise((r) => setTimeout(r, delayMs));
  expect(events.some((e) => e.name === 'plan.finished'), 'finished before the cancel').toBe(false);
  const t0 = performance.now();
  const c = await api.request('plan.cancel', { jobId });
  expect(c).toEqual({ ok: true, value: { cancelled: true } });
  expect(await waitFor(() => events.some((e) => e.name === 'plan.finished'), 15_000), 'no result within 15 s of cancel').toBe(true);
  const fin = events.find((e) => e.name === 'plan.finished')!;
  return { took: fin.at - t0, outcome: (fin.payload as { outcome: string }).outcome, freeAfter: api.session.planJob === null };
}

describe('cancel through the planning worker', () => {
  const rnd = prng(77);
  const delays = [0, 1, 2].map(() => Math.round(rnd() * 1500));
  const latencies: number[] = [];

  it(`always ends the job with a result and frees the session (${delays.length} cancels at seeded moments)`, { timeout: 120_000 }, async () => {
    for (const d of delays) {
      const r = await cancelOnce(d);
      latencies.push(r.took);
      expect(r.outcome).toBe('cancelled');
      expect(r.freeAfter).toBe(true);
    }
    console.log(`cancel latencies (ms, cancel() to result): ${latencies.map((x) => x.toFixed(1)).join(', ')}`);
  });

  // The planning worker is asked to stop and, if it has not answered within its grace
  // period, terminated (src-main/worker/run-plan.ts), so every cancel must land in 100 ms.
  it('takes effect within 100 ms every time', () => {
    expect(latencies.length).toBe(delays.length);
    expect(Math.max(...latencies)).toBeLessThanOrEqual(100);
  });
});
