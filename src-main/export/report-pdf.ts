/**
 * The design report (PDF): requirements, the tree, the planner's reasons, the roll-up per
 * mode, the thermal table, the worst-case windows, the BOM, the custom magnetics and the
 * safety cautions. Pure: data in, bytes out.
 */
import type { Requirements } from '../engine/model.ts';
import type { Plan, PlanResult } from '../engine/plan-types.ts';
import type { Rollup } from '../engine/rollup.ts';
import { VIN_CASES } from '../engine/rollup.ts';
import { runtimeText } from '../engine/battery.ts';
import type { Bom } from '../engine/bom.ts';
import { compactRefs } from '../engine/bom.ts';
import { fmtPct, fmtQty, stageKindLabel, textWidth, type LaidOutTree } from '../engine/layout.ts';
import { buildScene, SAFETY_LINE, type Prim, type Scene } from './tree-scene.ts';
import { drawScene, newDoc, pdfText, table, type Doc } from './pdf-kit.ts';

export const REPORT_SECTIONS = [
  '1 Requirements',
  '2 Power tree',
  '3 Decisions and reasons',
  '4 Roll-up per operating mode',
  '5 Thermal table',
  '6 Worst-case windows',
  '7 Bill of materials',
  '8 Custom magnetics',
  '9 Safety cautions',
] as const;

export const SAFETY_CAUTIONS = [
  'Mains and isolation barriers can kill. Work on them only with the training, equipment and supervision they require.',
  'Creepage, clearance, insulation and touch current follow the applicable safety standard and local codes; this report records the isolation class each barrier needs but does not compute them.',
  'A qualified engineer and the test lab decide whether the design is safe and compliant. The tool certifies nothing.',
  'Junction temperatures use θJA figures that compare packages (JEDEC JESD51-2); they do not predict a particular board. Measure the hot parts on the real board.',
  'Costs are estimates from the project part library; rows marked "invented estimate" are invented figures, not quotations.',
];

/** A planned project with everything computed from it: what every export starts from. */
export interface PlannedProject {
  req: Requirements;
  result: PlanResult;
  plan: Plan;
  rollup: Rollup;
  bom: Bom;
  tree: LaidOutTree;
  /** Whether the plan had to be recomputed for this export (stale or missing). */
  replanned: boolean;
}

export interface ReportInput extends PlannedProject {
  /** Custom magnetics: designator, stage and spec file name. */
  magnetics: Array<{ ref: string; stageId: string; stageName: string; specRef: string; summary: string }>;
}

const q = fmtQty;

/** Smallest type the report prints the tree in, in points (legible on paper: common practice). */
export const TREE_MIN_PT = 6;
/** Room for the tree on a landscape A4 page (842 × 595 pt less margins, heading and notes). */
const TILE_ROOM = { w: 842 - 84, h: 595 - 42 - 42 - 40 - 52 };

interface Tile { row: number; col: number; x: number; y: number; w: number; h: number; scale: number; overlap: number; prims: Prim[] }

/**
 * Split the scene into page tiles: the scale fits the whole tree on one page when its
 * smallest text still prints at TREE_MIN_PT, else it is held at that scale and the drawing is
 * cut into overlapping tiles. The safety line is printed as a paragraph on each page instead.
 */
export function treeTiles(scene: Scene): Tile[] {
  const prims = scene.prims.filter((p) => !(p.t === 'text' && p.text === SAFETY_LINE));
  const minText = Math.min(...prims.flatMap((p) => (p.t === 'text' ? [p.size] : [])));
  const height = scene.height - 30; // the scene's footer held the safety line
  const fit = Math.min(1, TILE_ROOM.w / scene.width, TILE_ROOM.h / height);
  const scale = Math.max(fit, TREE_MIN_PT / minText);
  const tw = TILE_ROOM.w / scale;
  const th = TILE_ROOM.h / scale;
  // Neighbouring tiles share at least the widest text line, so every line shows whole on one.
  const textW = (p: Prim) => (p.t === 'text' ? textWidth(p.text, p.size, p.bold) : 0);
  const ox = Math.min(tw / 2, Math.max(...prims.map(textW)) + 8);
  const oy = Math.min(th / 2, 40);
  const cols = scene.width <= tw + 0.5 ? 1 : Math.ceil((scene.width - ox) / (tw - ox));
  const rows = height <= th + 0.5 ? 1 : Math.ceil((height - oy) / (th - oy));
  const out: Tile[] = [];
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const x = cols === 1 ? 0 : Math.min(c * (tw - ox), scene.width - tw);
      const y = rows === 1 ? 0 : Math.min(r * (th - oy), height - th);
      const inTile = (bx: number, by: number, bw: number, bh: number) => bx < x + tw && bx + bw > x && by < y + th && by + bh > y;
      const kept = prims.filter((p) => {
        if (p.t === 'rect') return inTile(p.x, p.y, p.w, p.h);
        if (p.t === 'line') {
          const xs = p.pts.map((q) => q.x);
          const ys = p.pts.map((q) => q.y);
          return inTile(Math.min(...xs), Math.min(...ys), Math.max(...xs) - Math.min(...xs) + 1, Math.max(...ys) - Math.min(...ys) + 1);
        }
        // Text is kept only where it shows whole (the overlap shows it on a neighbour).
        const w = textW(p);
        return p.x >= x - 0.5 && p.x + w <= x + tw + 0.5 && p.y - p.size >= y - 0.5 && p.y + p.size * 0.3 <= y + th + 0.5;
      });
      out.push({ row: r, col: c, x, y, w: Math.min(tw, scene.width), h: Math.min(th, height), scale, overlap: ox, prims: kept });
    }
  }
  return out;
}

function heading(doc: Doc, text: string): void {
  if (doc.y > doc.page.height - doc.page.margins.bottom - 80) doc.addPage();
  doc.moveDown(0.6);
  doc.font('Helvetica-Bold').fontSize(13).fillColor('#1d2733').text(pdfText(text), doc.page.margins.left, doc.y);
  doc.moveDown(0.3);
}

function para(doc: Doc, text: string, opts: { size?: number; color?: string; bold?: boolean } = {}): void {
  doc.font(opts.bold ? 'Helvetica-Bold' : 'Helvetica').fontSize(opts.size ?? 9).fillColor(opts.color ?? '#1d2733')
    .text(pdfText(text), doc.page.margins.left, doc.y, { width: doc.page.width - doc.page.margins.left - doc.page.margins.right });
  doc.moveDown(0.25);
}

export async function reportToPdf(input: ReportInput): Promise<Uint8Array> {
  const { req, plan, rollup, bom, result } = input;
  const { doc, done } = newDoc({ size: 'A4', margin: 42, bufferPages: true });
  doc.info.Title = `Design report: ${req.meta.name}`;
  const W = doc.page.width - 84;
  const railName = new Map<string, string>(result.rails.map((r) => [r.id, r.name]));
  for (const n of plan.internalNodes) railName.set(n.id, n.name);
  for (const s of req.sources) railName.set(s.id, s.name);
  const stageName = new Map(plan.stages.map((s) => [s.id, s.name]));

  // Title block and the cautions up front.
  doc.font('Helvetica-Bold').fontSize(18).fillColor('#1d2733').text(pdfText(`Design report: ${req.meta.name}`));
  para(doc, `${req.meta.description || ''}`.trim() || ' ', { color: '#5b6878' });
  para(doc, `Requirements revision ${req.meta.revision}; plan ${plan.id} (${plan.labels.join(', ') || 'chosen'}); ${plan.stages.length} stages, ${result.rails.length} rails.${input.replanned ? ' The saved plan was missing or stale, so the tree was planned again for this report.' : ''}`);
  const boxY = doc.y + 4;
  doc.font('Helvetica-Bold').fontSize(9);
  const cautionText = pdfText('Safety: mains and isolation barriers can kill; creepage, clearance and touch current follow the applicable safety standard and local codes; a qualified engineer and the test lab decide. The tool certifies nothing. Costs are invented estimates unless the library says otherwise.');
  const h = doc.heightOfString(cautionText, { width: W - 16 }) + 12;
  doc.rect(42, boxY, W, h).lineWidth(1).fillAndStroke('#fbf4ec', '#b5452f');
  doc.fillColor('#b5452f').text(cautionText, 50, boxY + 6, { width: W - 16 });
  doc.y = boxY + h + 6;

  // 1 Requirements
  heading(doc, REPORT_SECTIONS[0]);
  table(doc, [
    { header: 'Source', width: 150 }, { header: 'Nominal', width: 70, align: 'right' }, { header: 'Min', width: 70, align: 'right' },
    { header: 'Max', width: 70, align: 'right' }, { header: 'Current limit', width: 80, align: 'right' },
  ], req.sources.map((s) => [s.name, q(s.vNom, 'V'), q(s.vMin, 'V'), q(s.vMax, 'V'), q(s.currentLimit, 'A')]));
  table(doc, [{ header: 'Domain', width: 170 }, { header: 'Isolation', width: 100 }, { header: 'Working voltage', width: 100, align: 'right' }],
    req.domains.map((d) => [d.name, d.isolation, d.isolation === 'none' ? '—' : q(d.workingVoltage, 'V')]));
  table(doc, [{ header: 'Operating mode', width: 170 }, { header: 'Share of time', width: 100, align: 'right' }],
    req.modes.map((m) => [m.name, fmtPct(m.share)]));
  const domName = new Map(req.domains.map((d) => [d.id, d.name]));
  table(doc, [
    { header: 'Load', width: 120 }, { header: 'Domain', width: 80 }, { header: 'Voltage', width: 55, align: 'right' },
    { header: 'Tol.', width: 40, align: 'right' }, { header: 'Ripple limit', width: 55, align: 'right' }, { header: 'Noise', width: 50 },
    { header: 'Current per mode', width: W - 400 },
  ], req.loads.map((l) => [l.name, domName.get(l.domainId) ?? l.domainId, q(l.voltage, 'V', 4), `±${(l.tolerance * 100).toFixed(1)} %`, q(l.rippleLimit, 'V'), l.noiseClass,
    req.modes.map((m) => `${m.name} ${q(l.current[m.id] ?? 0, 'A')}`).join(', ')]), { size: 7.5 });
  const L = req.limits;
  para(doc, `Design limits: ambient ${L.ambient} °C; junction limit ${L.tjMax} °C with ${L.tjMargin} K margin; ceramic capacitors at most ${fmtPct(L.ceramicDerating)} of rating, aluminium/polymer ${fmtPct(L.electrolyticDerating)}; resistors and semiconductors at most ${fmtPct(L.powerDerating)} of rated power.`);

  // 2 Power tree: landscape pages, text never below 6 pt; a wide tree is split into tiles
  // that overlap, each on a page of its own.
  const scene = buildScene(input.tree);
  const tiles = treeTiles(scene);
  tiles.forEach((t, i) => {
    doc.addPage({ size: 'A4', layout: 'landscape', margin: 42 });
    heading(doc, tiles.length > 1 ? `${REPORT_SECTIONS[1]} (part ${i + 1} of ${tiles.length}: row ${t.row + 1}, column ${t.col + 1})` : REPORT_SECTIONS[1]);
    const y0 = doc.y;
    doc.save();
    doc.rect(42, y0, t.w * t.scale, t.h * t.scale).clip();
    drawScene(doc, { ...scene, prims: t.prims }, 42 - t.x * t.scale, y0 - t.y * t.scale, t.scale);
    doc.restore();
    doc.y = y0 + t.h * t.scale + 6;
    para(doc, `${tiles.length > 1 ? `Part ${i + 1} shows the drawing from x ${Math.round(t.x)} to ${Math.round(t.x + t.w)} and y ${Math.round(t.y)} to ${Math.round(t.y + t.h)} of ${Math.round(scene.width)} × ${Math.round(scene.height)}; neighbouring parts overlap by ${Math.round(t.overlap)}. ` : ''}Dashed outlines mark galvanic barriers; bars across an edge mark a winding that crosses one. ${input.tree.modeName ? `Figures are for the mode "${input.tree.modeName}" at nominal input.` : 'No roll-up figures.'}`, { size: 8, color: '#5b6878' });
    para(doc, SAFETY_LINE, { size: 8, color: '#b5452f' });
  });

  // 3 Reasons (back to portrait)
  doc.addPage({ size: 'A4', layout: 'portrait', margin: 42 });
  heading(doc, REPORT_SECTIONS[2]);
  table(doc, [{ header: 'Stage', width: 110 }, { header: 'Kind', width: 100 }, { header: 'Input', width: 100 }, { header: 'Outputs', width: W - 310 }],
    plan.stages.map((s) => [s.name, stageKindLabel(s.kind), railName.get(s.inputNodeId) ?? s.inputNodeId,
      s.outputs.map((o) => `${railName.get(o.nodeId) ?? o.nodeId}${o.role !== 'output' ? ` (${o.role}${o.turns !== undefined ? `, ${o.turns} T` : ''})` : ''}`).join('; ')]));
  if (plan.reasons.length === 0) para(doc, 'The plan carries no reasons.');
  for (const r of plan.reasons) para(doc, `• ${r.text}`, { size: 8.5 });
  if (result.alternatives.length > 1) {
    para(doc, 'Alternatives the planner kept (time-weighted loss, estimated cost, part count):', { bold: true, size: 8.5 });
    table(doc, [
      { header: 'Plan', width: 90 }, { header: 'Labels', width: 150 }, { header: 'Stages', width: 50, align: 'right' },
      { header: 'Loss', width: 70, align: 'right' }, { header: 'Cost (est.)', width: 70, align: 'right' }, { header: 'Parts', width: W - 430, align: 'right' },
    ], result.alternatives.map((a) => [a.id === plan.id ? `${a.id} (this report)` : a.id, a.labels.join(', '), String(a.stages.length),
      q(a.score.loss, 'W'), a.score.cost.toFixed(2), String(a.score.parts)]), { size: 7.5 });
  }

  // 4 Roll-up
  heading(doc, REPORT_SECTIONS[3]);
  const w = rollup.weighted;
  para(doc, `Time-weighted at nominal input: source power ${q(w.sourcePower, 'W')}, load power ${q(w.loadPower, 'W')}, losses ${q(w.loss, 'W')}, system efficiency ${fmtPct(w.efficiency)}.`, { bold: true });
  for (const s of req.sources) {
    const sc = w.sourceCurrent[s.id]!;
    para(doc, `${s.name}: time-weighted current ${q(sc.min, 'A')} at Vin min ${q(s.vMin, 'V')}, ${q(sc.nom, 'A')} at nominal ${q(s.vNom, 'V')}, ${q(sc.max, 'A')} at Vin max ${q(s.vMax, 'V')}.`);
  }
  for (const b of rollup.batteries ?? []) {
    const s = req.sources.find((x) => x.id === b.sourceId);
    para(doc, `Battery runtime (power drawn at nominal input, conversion losses included) — ${runtimeText(b, s?.name ?? b.sourceId)}.`, { bold: true });
  }
  if (rollup.unfed.length) para(doc, `Rails no stage of this plan feeds (left out of the figures): ${rollup.unfed.map((id) => railName.get(id) ?? id).join(', ')}.`, { bold: true, size: 8.5, color: '#b5452f' });
  for (const o of rollup.sourceOverloads) para(doc, `Source over its limit: ${o.text}.`, { bold: true, size: 8.5, color: '#b5452f' });
  for (const m of rollup.modes) {
    const c = m.cases.nom;
    para(doc, `Mode "${m.modeName}" (${fmtPct(m.share)} of the time): source ${q(c.sourcePower, 'W')}, loads ${q(c.loadPower, 'W')}, losses ${q(c.loss, 'W')}, efficiency ${fmtPct(c.efficiency)}; source current ${req.sources.map((src) => `${req.sources.length > 1 ? `${src.name} ` : ''}${VIN_CASES.map((k) => `${q(m.cases[k].sources[src.id]?.i ?? 0, 'A')} (${k})`).join(', ')}`).join('; ')}.`, { bold: true, size: 8.5 });
    table(doc, [
      { header: 'Stage', width: 120 }, { header: 'Vin', width: 55, align: 'right' }, { header: 'Iin', width: 55, align: 'right' },
      { header: 'Pin', width: 60, align: 'right' }, { header: 'Pout', width: 60, align: 'right' }, { header: 'Loss', width: 60, align: 'right' },
      { header: 'Efficiency', width: 55, align: 'right' }, { header: 'Duty', width: W - 465, align: 'right' },
    ], c.stages.map((f) => [stageName.get(f.stageId) ?? f.stageId, q(f.vin, 'V'), q(f.iin, 'A'), q(f.pin, 'W'), q(f.pout, 'W'), q(f.loss, 'W'), fmtPct(f.efficiency), f.duty === null ? '—' : fmtPct(f.duty)]), { size: 7.5 });
  }
  table(doc, [
    { header: 'Stage (time-weighted)', width: 150 }, { header: 'Pin', width: 80, align: 'right' }, { header: 'Pout', width: 80, align: 'right' },
    { header: 'Loss', width: 80, align: 'right' }, { header: 'Efficiency', width: 80, align: 'right' },
  ], w.stages.map((s) => [s.name, q(s.pin, 'W'), q(s.pout, 'W'), q(s.loss, 'W'), fmtPct(s.efficiency)]), { size: 7.5 });
  if (rollup.flags.length) {
    para(doc, 'Stage flags met in some mode or input case:', { bold: true, size: 8.5 });
    for (const f of rollup.flags) para(doc, `• ${stageName.get(f.stageId) ?? f.stageId} [${f.flag.severity}] ${f.flag.text}`, { size: 8, color: f.flag.severity === 'error' ? '#b5452f' : '#1d2733' });
  }

  // 5 Thermal
  heading(doc, REPORT_SECTIONS[4]);
  para(doc, `Each part at its hottest mode and input case; the limit is the junction limit less the margin (${L.tjMax} − ${L.tjMargin} = ${L.tjMax - L.tjMargin} °C). Tj = Ta + P·θJA.`, { size: 8 });
  table(doc, [
    { header: 'Stage', width: 95 }, { header: 'Part', width: 90 }, { header: 'Power', width: 50, align: 'right' }, { header: 'θJA K/W', width: 42, align: 'right' },
    { header: 'θJA from', width: 88 }, { header: 'Tj', width: 45, align: 'right' }, { header: 'Margin', width: 42, align: 'right' }, { header: 'Where', width: W - 452 },
  ], rollup.thermal.map((t) => [t.stageName, t.role, q(t.power, 'W'), t.thetaJA.toFixed(0), t.thetaSource === 'library' ? 'library' : t.thetaSource === 'core-surface' ? 'core surface, computed' : 'default, from memory',
    `${t.tj.toFixed(1)} °C`, `${t.margin.toFixed(1)} K`, `${t.modeName}, Vin ${t.vinCase}`]), { size: 7.5 });

  // 6 Windows
  heading(doc, REPORT_SECTIONS[5]);
  table(doc, [
    { header: 'Rail or node', width: 100 }, { header: 'Target', width: 44, align: 'right' }, { header: 'Worst min', width: 50, align: 'right' },
    { header: 'Worst max', width: 50, align: 'right' }, { header: 'Allowed', width: 92, align: 'right' }, { header: 'Inside', width: 30 }, { header: 'Corners (min / max)', width: W - 366 },
  ], rollup.windows.map((r) => [r.name, q(r.target, 'V', 4), q(r.min, 'V', 4), q(r.max, 'V', 4), `${q(r.allowedMin, 'V', 4)} … ${q(r.allowedMax, 'V', 4)}`, r.inside ? 'yes' : 'NO', `min: ${r.minCorner}; max: ${r.maxCorner}`]), { size: 6.5 });

  // 7 BOM
  heading(doc, REPORT_SECTIONS[6]);
  table(doc, [
    { header: 'Refs', width: 70 }, { header: 'Qty', width: 28, align: 'right' }, { header: 'Description', width: 150 }, { header: 'Value', width: 80 },
    { header: 'Rating', width: 70 }, { header: 'Package', width: 55 }, { header: 'Ext. cost', width: W - 453, align: 'right' },
  ], [
    ...bom.lines.map((l) => [compactRefs(l.refs), String(l.quantity), l.problem ? `${l.description}: ${l.problem}` : l.description + (l.specRef ? ` (spec ${l.specRef})` : ''), l.value, l.rating, l.package, l.extendedCost.toFixed(3)]),
    ['Total', String(bom.totalParts), `${bom.lines.length} lines`, '', '', '', bom.totalCost.toFixed(3)],
  ], { size: 7 });
  para(doc, bom.allCostsInvented ? 'All costs are invented estimates from the default part library, not quotations.' : 'Costs are estimates from the project part library; rows marked "invented estimate" are invented.', { size: 8, color: '#5b6878' });
  for (const p of bom.problems) para(doc, `• Not in the library: ${p}`, { size: 8, color: '#b5452f' });

  // 8 Magnetics
  heading(doc, REPORT_SECTIONS[7]);
  if (input.magnetics.length === 0) para(doc, 'The plan uses no custom magnetic.');
  for (const m of input.magnetics) para(doc, `${m.ref} (${m.stageName}): ${m.summary}. Specification sheet: ${m.specRef}.`);

  // 9 Cautions
  heading(doc, REPORT_SECTIONS[8]);
  for (const c of SAFETY_CAUTIONS) para(doc, `• ${c}`);

  // Page footers.
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    doc.font('Helvetica').fontSize(7).fillColor('#5b6878')
      .text(pdfText(`${req.meta.name}, revision ${req.meta.revision}. Planning aid only; the tool certifies nothing. Page ${i + 1} of ${range.count}`), 42, doc.page.height - 28, { width: doc.page.width - 84, align: 'center', lineBreak: false });
    doc.page.margins.bottom = bottom;
  }
  doc.end();
  return done;
}
