/**
 * Invented boards of our own (test/fixtures/scenarios/*.json, each labelled invented),
 * planned with the real stage engine and the default library the way the planning worker
 * does (src-main/worker/plan-worker.ts), within a bounded budget. Each test checks the
 * tree against what a senior power engineer would expect of it (written out in
 * test/fixtures/scenarios/README.md): structural checks, not an exact plan.
 *
 * Where the planner's tree on main does not meet a reasonable expectation the check is
 * `it.fails` with a comment naming the gap, so it flips when the planner is fixed.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { libraryCostModel, tableToRows, type LibraryRow } from '../../src-main/engine/library.ts';
import { readCsv } from '../../src-main/export/csv.ts';
import { importProjectJson } from '../../src-main/store/json-format.ts';
import { PlanSolver } from '../../src-main/engine/planner/solver.ts';
import { engineEvaluator } from '../../src-main/engine/planner/evaluator.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import type { Plan, PlanResult, PlanStage } from '../../src-main/engine/plan-types.ts';
import type { StageEvaluator } from '../../src-main/engine/planner/types.ts';
import type { Amps, Volts } from '../../src-main/engine/units.ts';
import { checkPlan } from './helpers/check-plan.ts';
import { parse } from 'csv-parse/sync';
import ELK from 'elkjs/lib/elk.bundled.js';
import { rollupPlan } from '../../src-main/engine/rollup.ts';
import { runtimeLines } from '../../src-main/cli/plan.ts';
import { toRollupView } from '../../src-main/api/figures.ts';
import { prepareExport, exportBomCsv, exportNetlists, exportReportPdf } from '../../src-main/export/bundle.ts';
import { BOM_HEADER } from '../../src-main/export/bom-files.ts';
import type { ElkLike } from '../../src-main/engine/layout.ts';
import { pdfPages } from '../export/pdf-text.ts';

const library: LibraryRow[] = (() => {
  const r = tableToRows(readCsv(readFileSync(join(import.meta.dirname, '../../db/default-library.csv'), 'utf8')));
  if (!r.ok) throw new Error('default library');
  return r.rows;
})();

/** Budget per plan: large enough that every plan designs its whole space and finishes its search (1–3 s each on an idle core), so the trees do not depend on machine load. */
const BUDGET_MS = 60_000;
const HANG = 120_000;

// Engineering limits a reviewer applies [common practice, from memory]:
/** An LDO dissipating more than this needs copper area and a thermal review; on these boards none should. */
const LDO_MAX_W = 0.5;
/** Secondary-to-primary turns ratio of a coupled-winding stage: beyond about 1:4 leakage and stress grow fast. */
const MAX_TURNS_RATIO = 4;
/** Fewest primary turns: below about 5 the integer turns make the secondaries coarse and the coupling poor. */
const MIN_PRIMARY_TURNS = 5;
/** Rectifier reverse voltage on these low-voltage boards: 100 V-class Schottky or ultrafast parts at most. */
const MAX_RECTIFIER_V = 100;

interface Planned { req: Requirements; result: PlanResult; plan: Plan; ev: StageEvaluator; feeder: Map<string, PlanStage> }

function planScenario(file: string): Planned {
  const doc = importProjectJson(readFileSync(join(import.meta.dirname, '../fixtures/scenarios', file), 'utf8'));
  if (!doc.ok) throw new Error(`${file}: ${doc.problems.map((p) => `${p.path}: ${p.message}`).join('; ')}`);
  const req = doc.doc.requirements;
  const l = req.limits;
  const ev = engineEvaluator({ library, electrolyticDerating: l.electrolyticDerating, margins: { controllerInput: l.inputRatingMargin ?? 0.1 } });
  const result = new PlanSolver(req, {
    evaluator: ev,
    costModel: libraryCostModel(library, { powerDerating: l.powerDerating, electrolyticDerating: l.electrolyticDerating }),
    budgetMs: BUDGET_MS,
  }).solve();
  if (!result.best) throw new Error(`${file}: no plan: ${result.infeasible.map((i) => i.text).join('; ')}`);
  const feeder = new Map<string, PlanStage>();
  for (const st of result.best.stages) for (const o of st.outputs) feeder.set(o.nodeId, st);
  return { req, result, plan: result.best, ev, feeder };
}

const railOf = (p: Planned, loadId: string) => p.result.rails.find((r) => r.loadIds.includes(loadId))!;
const sourceIds = (p: Planned) => new Set(p.req.sources.map((s) => s.id));
interface Sec { turns: number; rectifierReverseVoltage: number }
const secondaries = (st: PlanStage) => ((st.design as { secondaries?: Sec[] }).secondaries ?? []);
const primaryTurns = (st: PlanStage) => (st.design as { primaryTurns: number }).primaryTurns;

/** The checks every scenario gets. */
/** A known planner gap turns that common check into `it.fails` (it flips when the planner is fixed); the text names the gap. */
interface Gaps { ldoLoss?: string; windings?: string }

function commonChecks(get: () => Planned, gaps: Gaps = {}): void {
  it('is a complete, feasible tree: every rail fed once, barriers, windows, Tj, no engine error', () => {
    const p = get();
    expect(checkPlan(p.req, p.result, p.plan, p.ev)).toEqual([]);
  });
  it('ends every quiet rail behind an LDO', () => {
    const p = get();
    for (const r of p.result.rails.filter((x) => x.noiseClass === 'quiet')) expect(p.feeder.get(r.id)!.kind, r.name).toBe('ldo');
  });
  (gaps.ldoLoss ? it.fails : it)(`burns no more than ${LDO_MAX_W} W in any LDO (worst input, largest current)${gaps.ldoLoss ? ` [gap: ${gaps.ldoLoss}]` : ''}`, () => {
    const p = get();
    for (const st of p.plan.stages.filter((s) => s.kind === 'ldo')) {
      const d = st.design as { vinMin: number; vinMax: number; outputs: { voltage: number; currentMax: number }[] };
      const vin = Math.max(Math.abs(d.vinMin), Math.abs(d.vinMax));
      const e = p.ev.evaluate(st.design!, { vin: (Math.sign(d.outputs[0]!.voltage) * vin) as Volts, iout: [d.outputs[0]!.currentMax as Amps], ambient: p.req.limits.ambient });
      expect(e.loss, st.name).toBeLessThanOrEqual(LDO_MAX_W);
    }
  });
  (gaps.windings ? it.fails : it)(`keeps coupled windings within engineering limits (turns ratio, rectifier stress)${gaps.windings ? ` [gap: ${gaps.windings}]` : ''}`, () => {
    const p = get();
    for (const st of p.plan.stages.filter((s) => s.kind === 'cwbuck')) {
      const d = st.design as { vinMax: number; outputs: { voltage: number }[] };
      secondaries(st).forEach((s, k) => {
        const n = Math.abs(s.turns) / primaryTurns(st);
        expect(n, `${st.name} ${s.turns}:${primaryTurns(st)}`).toBeLessThanOrEqual(MAX_TURNS_RATIO);
        // The winding's steady reverse voltage n·(Vin,max − Vpri) + |Vout| (the turn-on spike
        // above it is the rectifier rating's or a snubber's business).
        const steady = n * (d.vinMax - Math.abs(d.outputs[0]!.voltage)) + Math.abs(d.outputs[k + 1]!.voltage);
        expect(steady, st.name).toBeLessThanOrEqual(MAX_RECTIFIER_V);
      });
    }
  });
  it('uses at most one magnetic per isolated domain', () => {
    const p = get();
    for (const dom of p.req.domains.filter((d) => d.isolation !== 'none')) {
      const crossing = p.plan.stages.filter((s) => s.barriers.some((b) => b.toDomainId === dom.id));
      expect(crossing.length, dom.name).toBeLessThanOrEqual(1);
    }
  });
  it('runs every buck at a frequency whose on-time and duty pass at both input extremes', () => {
    const p = get();
    for (const st of p.plan.stages.filter((s) => s.kind === 'buck' || s.kind === 'cwbuck')) {
      const d = st.design as { vinMin: number; vinMax: number; fsw: number; controller: { minOnTime: number; maxDuty: number }; outputs: { currentMax: number }[] };
      for (const vin of [d.vinMin, d.vinMax]) {
        const e = p.ev.evaluate(st.design!, { vin: vin as Volts, iout: d.outputs.map((o) => o.currentMax) as Amps[], ambient: p.req.limits.ambient });
        // On-time = D/fsw [Erickson & Maksimović, ch. 2].
        expect(e.duty! / d.fsw, `${st.name} at ${vin} V`).toBeGreaterThanOrEqual(d.controller.minOnTime);
        expect(e.duty!, `${st.name} at ${vin} V`).toBeLessThanOrEqual(d.controller.maxDuty);
      }
    }
  });
}

/** No custom magnetic where plain bucks and LDOs do (no isolated domain, no negative rail). */
function noCustomMagnetic(p: Planned): void {
  expect(p.plan.stages.filter((s) => s.kind === 'cwbuck').map((s) => s.name)).toEqual([]);
}

describe('scenario: 24 V industrial controller with an isolated analog domain (invented)', () => {
  let p: Planned;
  beforeAll(() => { p = planScenario('industrial-24v-isolated-analog.json'); }, HANG);
  commonChecks(() => p, { ldoLoss: 'the 1.8 V rail is an LDO from a higher rail burning about 0.6 W where a buck is the engineer\'s choice; the planner ranks it cheaper', windings: 'the isolated ±15 V windings on the 5 V primary see about 360 V steady at 24 V input (a 1:15-class ratio) where a reviewer expects ≤ 100 V' });
  // Gap (planner, with parts from the library): one magnetic crosses into the analog domain (the
  // magnetics-per-domain limit holds), but the quiet 5 V comes from an LDO on the +15 V rail
  // (10 V dropped) instead of an LDO on a tap a volt or two above it: a tap winding costs more
  // in the score than the LDO's loss at this current.
  it.fails('makes the isolated ±15 V and 5 V from one coupled-winding stage across the basic 250 V barrier', () => {
    const ids = ['ain-p15', 'ain-n15', 'ain-adc5'].map((id) => railOf(p, id).id);
    const cw = p.plan.stages.filter((s) => s.kind === 'cwbuck' && s.barriers.some((b) => b.toDomainId === 'ain' && b.isolation === 'basic' && b.workingVoltage === 250));
    expect(cw).toHaveLength(1);
    // Each isolated rail is a secondary of that stage or an LDO fed from one of its taps.
    for (const id of ids) {
      const st = p.feeder.get(id)!;
      const src = st.kind === 'ldo' ? p.feeder.get(st.inputNodeId)! : st;
      expect(src.id, id).toBe(cw[0]!.id);
    }
  });
  it('feeds the 3.3 V ±3 % logic rail from a buck (a routine rail, with a fitting feedback grade)', () => {
    const st = p.feeder.get(railOf(p, 'io33').id)!;
    expect(st.kind).toBe('buck');
  });
  it('takes the 1.0 V core from a buck (from 24 V at a lower frequency, or from a lower rail)', () => {
    const st = p.feeder.get(railOf(p, 'core10').id)!;
    expect(st.kind).toBe('buck');
  });
});

describe('scenario: 48 V board with an intermediate bus (invented)', () => {
  let p: Planned;
  beforeAll(() => { p = planScenario('bus-48v-intermediate.json'); }, HANG);
  commonChecks(() => p, { ldoLoss: 'the 1.8 V rail is an LDO burning about 0.72 W where a buck from the bus is expected' });
  it('takes at most two stages straight from 48 V (the bus converters)', () => {
    const src = sourceIds(p);
    expect(p.plan.stages.filter((s) => src.has(s.inputNodeId)).length).toBeLessThanOrEqual(2);
  });
  it('feeds the 3.3 V and 1.2 V logic rails from an intermediate rail, not from 48 V', () => {
    const src = sourceIds(p);
    for (const id of ['p33', 'core12']) expect(src.has(p.feeder.get(railOf(p, id).id)!.inputNodeId), id).toBe(false);
  });
  // Gap (planner): the 2.5 V quiet clock rail's LDO sits on a tap winding of the 5 V stage that
  // runs from 48 V, instead of on the 3.3 V or 5 V rail (see the custom-magnetic check below).
  it.fails('feeds every rail of 3.3 V or less from an intermediate rail (no stage or tap on the 48 V input)', () => {
    const src = sourceIds(p);
    for (const r of p.result.rails.filter((x) => Math.abs(x.voltage) <= 3.3 + 1e-9)) {
      let st = p.feeder.get(r.id)!;
      if (st.kind === 'ldo' && !src.has(st.inputNodeId) && !p.result.rails.some((x) => x.id === st.inputNodeId)) st = p.feeder.get(st.inputNodeId) ?? st;
      expect(src.has(st.inputNodeId), r.name).toBe(false);
    }
  });
  // Gap (planner, coupled-winding model): the 2.5 V quiet clock rail comes from a tap winding
  // added to the 5 V buck (a custom magnetic) instead of an LDO from the 3.3 V or 5 V rail, on
  // a board with no isolated domain and no negative rail.
  it.fails('uses no custom magnetic (no isolation, no negative rail)', () => noCustomMagnetic(p));
});

describe('scenario: 12 V automotive-range board, 9–16 V (invented)', () => {
  let p: Planned;
  beforeAll(() => { p = planScenario('automotive-12v.json'); }, HANG);
  commonChecks(() => p);
  it('feeds 5 V and 3.3 V from bucks on the battery rail range (no LDO from 16 V)', () => {
    for (const id of ['v5', 'v33']) expect(p.feeder.get(railOf(p, id).id)!.kind, id).not.toBe('ldo');
  });
  // Gap (planner): the 3.3 V quiet receiver rail comes from a 3:3 tap winding on the 5 V buck
  // (4.8 V tap, a custom magnetic with a 3-turn primary) and an LDO, where an LDO from the 5 V
  // rail does the same with an off-the-shelf inductor.
  it.fails('uses no custom magnetic (no isolation, no negative rail)', () => noCustomMagnetic(p));
  it.fails(`gives every coupled-winding primary at least ${MIN_PRIMARY_TURNS} turns`, () => {
    for (const st of p.plan.stages.filter((s) => s.kind === 'cwbuck')) expect(primaryTurns(st), st.name).toBeGreaterThanOrEqual(MIN_PRIMARY_TURNS);
  });
});

describe('scenario: wide-range 9–36 V data logger (invented)', () => {
  let p: Planned;
  beforeAll(() => { p = planScenario('wide-9-36v.json'); }, HANG);
  commonChecks(() => p);
  it('makes the small −5 V rail from a reversed winding on a main buck, through a negative LDO or directly', () => {
    const r = railOf(p, 'wneg5');
    let st = p.feeder.get(r.id)!;
    if (st.kind === 'ldo') st = p.feeder.get(st.inputNodeId)!;
    expect(st.kind).toBe('cwbuck');
    expect(secondaries(st).some((s) => s.turns < 0)).toBe(true);
  });
  // Was a gap (a 3-turn 3.3 V primary); closed since the coupled-winding designer sets the
  // primary turns from the designed core's flux limit.
  it(`gives every coupled-winding primary at least ${MIN_PRIMARY_TURNS} turns`, () => {
    for (const st of p.plan.stages.filter((s) => s.kind === 'cwbuck')) expect(primaryTurns(st), st.name).toBeGreaterThanOrEqual(MIN_PRIMARY_TURNS);
  });
});

describe('scenario: 12 V board with only non-isolated rails (invented)', () => {
  let p: Planned;
  beforeAll(() => { p = planScenario('nonisolated-12v.json'); }, HANG);
  commonChecks(() => p, { windings: 'a tap winding on the board\'s coupled-winding stage exceeds the board\'s 100 V / 1:4 limits' });
  it('crosses no barrier', () => {
    expect(p.plan.stages.flatMap((s) => s.barriers)).toEqual([]);
  });
  // Gap (planner, with parts from the library): the 1.0 V core is the primary of a coupled-winding
  // stage that also makes the quiet rail's tap, not a plain buck.
  it.fails('feeds the 2 A 1.0 V core from a buck', () => {
    expect(p.feeder.get(railOf(p, 'n10').id)!.kind).toBe('buck');
  });
  // Gap (planner): the 2.5 V quiet codec rail comes from a tap winding on the 5 V buck (a
  // custom magnetic) and an LDO, where an LDO from the 3.3 V rail (0.04 W) is what a
  // reviewer expects on a board of plain positive rails.
  it.fails('uses no custom magnetic (no isolation, no negative rail)', () => noCustomMagnetic(p));
});

describe('scenario: handheld sensor on one 1S Li-ion cell, 3.0–4.2 V, two modes (invented)', () => {
  let p: Planned;
  beforeAll(() => { p = planScenario('li-ion-1s-handheld.json'); }, HANG);
  commonChecks(() => p);
  it('makes 3.3 V (inside the cell range) with a four-switch buck-boost and 5 V (above it) with a boost, from the cell', () => {
    // 3.3 V ±5 %: a buck needs Vin ≥ 3.3 V / Dmax, above the 3.0 V end of discharge; a boost
    // needs the rail above 4.2 V (Erickson & Maksimović, ch. 2: Vout = D·Vin and Vin/(1 − D)).
    const st33 = p.feeder.get(railOf(p, 'io').id)!;
    expect(st33.kind).toBe('buck-boost-4s');
    expect(st33.inputNodeId).toBe('cell');
    const st5 = p.feeder.get(railOf(p, 'sens').id)!;
    expect(st5.kind).toBe('boost');
    const why = p.plan.reasons.find((r) => r.subjectId === railOf(p, 'io').id && r.code === 'feed-buck-boost-4s')!.text;
    expect(why).toMatch(/four-switch buck-boost, because a buck cannot reach 3\.3 V below [0-9.]+ V input .* the input falls to 3 V/);
    // The cores stay below the cell's lowest 3.0 V: a buck or an LDO, never a step-up stage.
    for (const id of ['core', 'mem']) expect(['buck', 'ldo'], id).toContain(p.feeder.get(railOf(p, id).id)!.kind);
  });
  it('gives the battery runtime for the mode mix and per mode from the roll-up (losses included)', () => {
    const roll = rollupPlan(p.req, p.result.rails, p.plan);
    expect(roll.batteries).toHaveLength(1);
    const b = roll.batteries[0]!;
    // Usable energy of the 2.4 A·h cell down to 3.0 V (preset curve, from memory): below 2.4 A·h × 4.2 V, above 2.4 A·h × 3.0 V.
    expect(b.energyWh).toBeGreaterThan(2.4 * 3.0);
    expect(b.energyWh).toBeLessThan(2.4 * 4.2);
    const load = (m: string) => p.req.loads.reduce((a, l) => a + Math.abs(l.voltage) * (l.current[m] ?? 0), 0);
    for (const m of b.perMode) {
      // Power drawn = load power + conversion losses; runtime = energy / power (hand arithmetic).
      expect(m.power, m.modeName).toBeGreaterThan(load(m.modeId));
      expect(m.hours).toBeCloseTo(b.energyWh / m.power, 9);
    }
    expect(b.mixPower).toBeCloseTo(0.1 * b.perMode[0]!.power + 0.9 * b.perMode[1]!.power, 12);
    expect(b.mixHours).toBeCloseTo(b.energyWh / b.mixPower, 9);
    expect(b.mixHours).toBeGreaterThan(b.perMode[0]!.hours);
    // The window's Budget view reads the same figures through the contract (RollupView.batteries).
    const view = toRollupView({ requirements: p.req } as Parameters<typeof toRollupView>[0], roll);
    expect(view.batteries).toEqual([{
      sourceId: 'cell', sourceName: 'Li-ion cell 1S', energyWh: b.energyWh, mixPower: b.mixPower, mixHours: b.mixHours,
      perMode: b.perMode.map((m) => ({ modeId: m.modeId, modeName: m.modeName, power: m.power, hours: m.hours })),
    }]);
    expect(runtimeLines(p.req, p.plan)[0]).toMatch(/^Battery runtime \(roll-up, at nominal input\) — Li-ion cell 1S: [0-9.]+ Wh usable .* runtime [0-9.]+ (h|days) for the mode mix .*Active [0-9.]+ h .*Sleep/);
  });
  it('exports: the BOM CSV reads back with csv-parse, the report states the runtime, the switching stages have netlists', async () => {
    const b = await prepareExport({ req: p.req, result: p.result, library, elk: new ELK() as unknown as ElkLike });
    const rows = parse(exportBomCsv(b), { relax_column_count: true }) as string[][];
    expect(rows[0]).toEqual([...BOM_HEADER]);
    const body = rows.slice(1, 1 + b.bom.lines.length);
    // The BOM lists the parts the stages were designed with: the four-switch and boost controllers.
    expect(body.some((r) => /Four-switch buck-boost regulator/.test(r.join(' ')))).toBe(true);
    expect(body.some((r) => /Boost regulator/.test(r.join(' ')))).toBe(true);
    expect(body.filter((r) => r.some((c) => /no library part/.test(c)))).toEqual([]);
    const text = (await pdfPages(await exportReportPdf(b))).join('\n').replace(/\s+/g, ' ');
    expect(text).toMatch(/Battery runtime .* Li-ion cell 1S: [0-9.]+ Wh usable/);
    const nets = exportNetlists(b);
    const kinds = new Set(nets.files.map((f) => p.plan.stages.find((s) => s.id === f.stageId)!.kind));
    expect(kinds.has('boost') && kinds.has('buck-boost-4s')).toBe(true);
  }, HANG);
});
