/**
 * Roll-up and BOM figures of one plan for the window, converted to the contract's plain
 * shapes. The computation lives in the engine (rollup.ts with the stage models, bom.ts);
 * this module only adapts.
 */
import type { Plan } from '../engine/plan-types.ts';
import type { TreeFigures } from '../engine/layout.ts';
import { groupRails } from '../engine/rails.ts';
import { figuresForMode, rollupPlan, type Rollup, type StageModels } from '../engine/rollup.ts';
import { evaluateStage, stageWindows } from '../engine/stages/index.ts';
import type { BomView, RollupView, StageFigures } from './contract.ts';
import type { PartLibraryRow, Requirements } from '../engine/model.ts';
import { describeProblem, fromStoreRows, type LibraryRow } from '../engine/library.ts';
import { buildBom, compactRefs } from '../engine/bom.ts';
import type { Session } from './session.ts';

export const ENGINE_MODELS: StageModels = {
  evaluate: (design, op) => evaluateStage(design, op),
  windows: (design, corners, opts) => stageWindows(design, corners, opts),
};

export interface ComputedRollup {
  raw: Rollup;
  view: RollupView;
}

export function toRollupView(s: Session, r: Rollup): RollupView {
  const req = s.requirements;
  const limit = req.limits.tjMax - req.limits.tjMargin;
  const stages: StageFigures[] = [];
  for (const m of r.modes) {
    const at = (c: 'min' | 'max', id: string) => m.cases[c].stages.find((x) => x.stageId === id);
    for (const f of m.cases.nom.stages) {
      const lo = at('min', f.stageId);
      const hi = at('max', f.stageId);
      stages.push({
        byCase: {
          vMin: lo ? { vin: lo.vin, loss: lo.loss, efficiency: lo.efficiency } : null,
          vNom: { vin: f.vin, loss: f.loss, efficiency: f.efficiency },
          vMax: hi ? { vin: hi.vin, loss: hi.loss, efficiency: hi.efficiency } : null,
        },
        stageId: f.stageId, modeId: m.modeId, vin: f.vin, pin: f.pin, pout: f.pout, loss: f.loss,
        efficiency: f.efficiency, duty: f.duty, lossBreakdown: { ...f.lossBreakdown },
        parts: f.parts.map((p) => ({ role: p.role, power: p.power, tj: p.tj, thetaJA: p.thetaJA, thetaSource: p.thetaSource, margin: limit - p.tj })),
        outputs: f.outputs.map((o) => ({ nodeId: o.nodeId, voltage: o.v, current: o.i, ripplePP: o.ripplePP })),
        flags: f.flags.map((x) => ({ code: x.code, severity: x.severity, text: x.text })),
      });
    }
  }
  const sumI = (c: Rollup['modes'][number]['cases']['nom']) => Object.values(c.sources).reduce((a, x) => a + x.i, 0);
  const system = r.modes.map((m) => ({
    modeId: m.modeId,
    efficiency: { vMin: m.cases.min.efficiency, vNom: m.cases.nom.efficiency, vMax: m.cases.max.efficiency },
    sourceCurrent: { vMin: sumI(m.cases.min), vNom: sumI(m.cases.nom), vMax: sumI(m.cases.max) },
    pin: m.cases.nom.sourcePower, pout: m.cases.nom.loadPower, loss: m.cases.nom.loss,
    cases: {
      vMin: { pin: m.cases.min.sourcePower, pout: m.cases.min.loadPower, loss: m.cases.min.loss },
      vNom: { pin: m.cases.nom.sourcePower, pout: m.cases.nom.loadPower, loss: m.cases.nom.loss },
      vMax: { pin: m.cases.max.sourcePower, pout: m.cases.max.loadPower, loss: m.cases.max.loss },
    },
  }));
  const messages: string[] = [];
  if (r.unfed.length) messages.push(`No stage feeds ${r.unfed.length} rail(s): ${r.unfed.join(', ')}`);
  return {
    revision: req.meta.revision,
    stages,
    windows: r.windows.map((w) => ({
      nodeId: w.nodeId, target: w.target, min: w.min, max: w.max, allowedMin: w.allowedMin, allowedMax: w.allowedMax,
      inside: w.inside, minCorner: w.minCorner, maxCorner: w.maxCorner, proved: w.proved,
    })),
    system,
    weightedLoss: r.weighted.loss,
    messages,
    batteries: r.batteries.map((b) => ({
      sourceId: b.sourceId, sourceName: req.sources.find((x) => x.id === b.sourceId)?.name ?? b.sourceId,
      energyWh: b.energyWh, mixPower: b.mixPower, mixHours: Number.isFinite(b.mixHours) ? b.mixHours : null,
      perMode: b.perMode.map((m) => ({ modeId: m.modeId, modeName: m.modeName, power: m.power, hours: Number.isFinite(m.hours) ? m.hours : null })),
    })),
  };
}

/** The roll-up of one plan with the stage engine (window figures, CLI runtime lines). */
export function rollupOf(req: Requirements, plan: Plan): Rollup {
  return rollupPlan(req, groupRails(req), plan, ENGINE_MODELS);
}

export function computeRollup(s: Session, plan: Plan): ComputedRollup {
  const raw = rollupOf(s.requirements, plan);
  return { raw, view: toRollupView(s, raw) };
}

/** Stored library rows as the typed rows the planner and the BOM use, or every problem described. */
export function typedLibrary(rows: PartLibraryRow[]): { ok: true; rows: LibraryRow[] } | { ok: false; problems: string[] } {
  const r = fromStoreRows(rows);
  return r.ok ? { ok: true, rows: r.rows } : { ok: false, problems: r.problems.map(describeProblem) };
}

/**
 * Typed rows per stored library (the BOM of every alternative reads them on every edit). A
 * library is never changed in place (Session.edit), so its typed rows stay valid.
 */
const typedRows = new WeakMap<object, ReturnType<typeof typedLibrary>>();

export function libraryRows(s: Session): LibraryRow[] {
  const rows = Array.isArray(s.library) ? (s.library as PartLibraryRow[]) : [];
  let r = typedRows.get(rows);
  if (!r) {
    r = typedLibrary(rows);
    typedRows.set(rows, r);
  }
  if (!r.ok) throw new Error(`the part library has problems: ${r.problems.slice(0, 3).join('; ')}`);
  return r.rows;
}

/**
 * The BOM view per plan, with what it was built from: buildBom reads only the plan, the
 * library rows and the two derating limits, so an edit of a load (which changes none of
 * them) reuses the BOM of every alternative instead of picking all their parts again.
 */
const bomViews = new WeakMap<Plan, { rows: LibraryRow[]; powerDerating: number; electrolyticDerating: number; view: BomView }>();

export function computeBom(s: Session, plan: Plan): BomView {
  const rows = libraryRows(s);
  const { powerDerating, electrolyticDerating } = s.requirements.limits;
  const hit = bomViews.get(plan);
  if (hit && hit.rows === rows && hit.powerDerating === powerDerating && hit.electrolyticDerating === electrolyticDerating) return hit.view;
  const view = bomView(buildBom(s.requirements, plan, rows));
  bomViews.set(plan, { rows, powerDerating, electrolyticDerating, view });
  return view;
}

function bomView(bom: ReturnType<typeof buildBom>): BomView {
  const lines = bom.lines.map((l) => ({
    group: l.partClass,
    stageId: l.stages[0] ?? null,
    role: compactRefs(l.refs),
    description: l.description,
    problem: l.problem ?? null,
    value: [l.value, l.rating, l.package].filter((x) => x).join(' · '),
    quantity: l.quantity,
    unitCost: l.unitCost,
    extended: l.extendedCost,
    estimate: /estimate/i.test(l.costNote),
  }));
  return { lines, total: bom.totalCost, parts: bom.totalParts, currency: 'units' };
}

export function treeFigures(s: Session, r: ComputedRollup | null, modeId?: string): TreeFigures | undefined {
  return r ? figuresForMode(s.requirements, r.raw, modeId) : undefined;
}
