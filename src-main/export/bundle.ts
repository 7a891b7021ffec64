/**
 * Everything the exports draw on, computed once: roll-up, BOM, laid-out tree, magnetics.
 * Each export below is a function from the bundle to bytes or text; writing files is the
 * job of write-all.ts.
 */
import type { Requirements } from '../engine/model.ts';
import type { Plan, PlanResult } from '../engine/plan-types.ts';
import { figuresForMode, heaviestMode, rollupPlan, RollupError, type Rollup } from '../engine/rollup.ts';
import { buildBom, type Bom } from '../engine/bom.ts';
import { buildTreeView, layoutTree, fmtQty, type ElkLike, type LaidOutTree } from '../engine/layout.ts';
import type { LibraryRow } from '../engine/library.ts';
import { hasStageNetlist, stageNetlist } from '../engine/stages/index.ts';
import type { Amps, Volts } from '../engine/units.ts';
import { bomToCsv, bomToXlsx } from './bom-files.ts';
import { treeToSvg } from './tree-svg.ts';
import { treeToPdf } from './tree-pdf.ts';
import { reportToPdf, type PlannedProject } from './report-pdf.ts';
import { magneticSpecMarkdown } from './magnetic-spec.ts';
import { spiceComment } from './spice.ts';

export interface ExportBundle extends PlannedProject {
  names: Map<string, string>;
}

export class ExportError extends Error {}

export async function prepareExport(args: {
  req: Requirements;
  result: PlanResult;
  library: LibraryRow[];
  elk: ElkLike;
  /** Mode whose figures the drawing shows (default: the one with the most load power). */
  modeId?: string;
  replanned?: boolean;
}): Promise<ExportBundle> {
  const { req, result, library } = args;
  const plan = result.best;
  if (!plan) {
    const why = result.infeasible.map((x) => x.text).join('; ');
    throw new ExportError(`the project has no feasible plan to export${why ? `: ${why}` : ''}`);
  }
  let rollup: Rollup;
  try {
    rollup = rollupPlan(req, result.rails, plan);
  } catch (e) {
    if (e instanceof RollupError) throw new ExportError(`the plan cannot be rolled up: ${e.message}`);
    throw e;
  }
  const bom = buildBom(req, plan, library);
  const figures = figuresForMode(req, rollup, args.modeId);
  const tree = await layoutTree(buildTreeView(req, result.rails, plan, figures), args.elk);
  const names = new Map<string, string>(result.rails.map((r) => [r.id, r.name]));
  for (const n of plan.internalNodes) names.set(n.id, n.name);
  for (const s of req.sources) names.set(s.id, s.name);
  return { req, result, plan, rollup, bom, tree, names, replanned: !!args.replanned };
}

export function exportBomCsv(b: ExportBundle): string {
  return bomToCsv(b.bom, b.req.meta.name);
}

export function exportBomXlsx(b: ExportBundle): Promise<Uint8Array> {
  return bomToXlsx(b.bom, b.req.meta.name);
}

export function exportTreeSvg(b: ExportBundle): string {
  return treeToSvg(b.tree);
}

export function exportTreePdf(b: ExportBundle): Promise<Uint8Array> {
  return treeToPdf(b.tree);
}

/** One Markdown specification sheet per custom coupled-winding magnetic. */
export function exportMagneticSpecs(b: ExportBundle): Array<{ file: string; text: string; ref: string; stageId: string; saturation: number }> {
  const out: Array<{ file: string; text: string; ref: string; stageId: string; saturation: number }> = [];
  for (const st of b.plan.stages) {
    const d = st.design;
    if (!d || d.kind !== 'cwbuck') continue;
    const item = b.bom.items.find((i) => i.stageId === st.id && i.partClass === 'magnetic-custom');
    const ref = item?.refs[0] ?? 'T?';
    const file = item?.specRef ?? `magnetic-${st.id}.md`;
    const m = magneticSpecMarkdown(b.req, st, d, ref, b.names);
    out.push({ file, ref, stageId: st.id, text: m.text, saturation: m.saturation });
  }
  return out;
}

/**
 * SPICE netlists of every switching stage, at the heaviest mode and nominal input (the
 * operating point of the roll-up). Stages the netlist writer cannot express are listed in
 * `skipped` with the reason.
 */
export function exportNetlists(b: ExportBundle): { files: Array<{ file: string; text: string; stageId: string }>; skipped: string[] } {
  const mode = heaviestMode(b.rollup);
  const files: Array<{ file: string; text: string; stageId: string }> = [];
  const skipped: string[] = [];
  for (const st of b.plan.stages) {
    const d = st.design;
    // Switching kinds have a netlist writer (their `netlist` in stages/registry.ts); an LDO,
    // a load switch and an isolated module do not.
    if (!d || !hasStageNetlist(d.kind)) continue;
    const f = mode?.cases.nom.stages.find((x) => x.stageId === st.id);
    if (!f) { skipped.push(`${st.id}: no operating point`); continue; }
    const iout = d.outputs.map((o) => (f.outputs.find((x) => x.nodeId === o.nodeId)?.i ?? 0) as Amps);
    const op = { vin: f.vin as Volts, iout, ambient: b.req.limits.ambient };
    const file = `${st.id.replace(/[^A-Za-z0-9._-]+/g, '_')}.cir`;
    try {
      const text = stageNetlist(d, op);
      if (text === null) { skipped.push(`${st.id}: its kind has no netlist writer`); continue; }
      // Names come from the project file, which anyone may have written: one comment line.
      const title = spiceComment(`Stage ${st.name} (${st.id}) of project "${b.req.meta.name}", mode "${mode!.modeName}", Vin ${fmtQty(f.vin, 'V')}`);
      files.push({ file, text: `${title}\n${text}`, stageId: st.id });
    } catch (e) {
      skipped.push(`${st.id}: ${(e as Error).message}`);
    }
  }
  return { files, skipped };
}

export function exportReportPdf(b: ExportBundle): Promise<Uint8Array> {
  const specs = exportMagneticSpecs(b);
  const magnetics = specs.flatMap((s) => {
    const st = b.plan.stages.find((x) => x.id === s.stageId)!;
    const d = st.design;
    // Every sheet is of a coupled-winding stage (exportMagneticSpecs): this only narrows.
    if (d?.kind !== 'cwbuck') return [];
    return [{
      ref: s.ref, stageId: s.stageId, stageName: st.name, specRef: s.file,
      summary: `Lp ${fmtQty(d.inductance, 'H')}, turns ${[d.primaryTurns, ...d.secondaries.map((w) => w.turns)].join(' : ')}, saturation ≥ ${fmtQty(s.saturation, 'A')}${d.isolation && d.isolation.class !== 'none' ? `, ${d.isolation.class} isolation at ${fmtQty(d.isolation.workingVoltage, 'V')} working` : st.barriers[0] ? `, ${st.barriers[0].isolation} isolation at ${fmtQty(st.barriers[0].workingVoltage, 'V')} working` : ''}`,
    }];
  });
  return reportToPdf({ req: b.req, result: b.result, plan: b.plan, rollup: b.rollup, bom: b.bom, tree: b.tree, magnetics, replanned: b.replanned });
}
