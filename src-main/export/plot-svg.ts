/**
 * Plots as SVG (pure): line plots (efficiency and loss against a swept quantity, two panels
 * on one x axis), the rail-window chart (each rail's worst-case window against its band)
 * and the loss-versus-cost scatter of the alternatives. One document serves the window and
 * the saved file: colours are presentation attributes (so the file reads anywhere) and every
 * element carries a class, which the window's stylesheet themes with its own variables.
 * No inline style (the window's content security policy allows none). Ticks are 1-2-5 steps
 * printed in engineering notation (engine/notation.ts, the formatter the window uses). User
 * text (rail, stage and mode names) goes through escapeXml (text-rules.ts, then entities).
 */
import { formatQuantity } from '../engine/notation.ts';
import type { QuantityKind } from '../engine/units.ts';
import { escapeXml } from './tree-svg.ts';

/** A quantity kind, or a plain number (costs: the currency is in the axis label). */
export type AxisKind = QuantityKind | 'number';

export interface Axis { label: string; kind: AxisKind; fromZero?: boolean }

export interface LinePlot {
  type: 'line';
  title: string;
  subtitle: string;
  x: Axis;
  /** Stacked panels sharing the x axis (e.g. efficiency above, loss below). */
  panels: Axis[];
  /** Each series: one y per panel at each x. */
  series: { name: string; points: { x: number; y: number[] }[] }[];
  /** Operating points marked on the curves (e.g. the roll-up's own figures). */
  markers?: { name: string; x: number; y: number[] }[];
}

export interface WindowRow {
  name: string;
  target: number;
  bandMin: number;
  bandMax: number;
  min: number;
  max: number;
  inside: boolean;
  /** The voltage each mode delivers (nominal input). */
  marks: { mode: string; v: number }[];
}

export interface WindowPlot { type: 'windows'; title: string; subtitle: string; modes: string[]; rows: WindowRow[] }

export interface ScatterPlot {
  type: 'scatter';
  title: string;
  subtitle: string;
  x: Axis;
  y: Axis;
  points: { label: string; x: number; y: number; highlight: boolean }[];
}

export type PlotScene = LinePlot | WindowPlot | ScatterPlot;

/** Default palette (the window overrides it through the classes). */
const SERIES = ['#0f5f59', '#b45309', '#4054b2', '#9d174d', '#2e7d4f', '#52606d'];
const DASH = ['', '6 3', '2 3', '8 3 2 3', '', '4 2'];
const INK = '#1f2933';
const SOFT = '#616e7c';
const GRID = '#e4e7eb';
const AXIS = '#7b8794';
const FONT = "system-ui, 'DejaVu Sans', sans-serif";

const n2 = (x: number) => (Math.round(x * 100) / 100).toString();

/** Tick values over [lo, hi] in steps of 1, 2 or 5 × 10^k, about `want` of them. */
export function niceTicks(lo: number, hi: number, want = 5): number[] {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return [];
  if (hi < lo) [lo, hi] = [hi, lo];
  if (hi === lo) { const d = Math.abs(hi) * 0.1 || 1; lo -= d; hi += d; }
  const raw = (hi - lo) / Math.max(1, want);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : Number(v.toPrecision(12)));
  return out;
}

/** Range for an axis: the data's, widened to whole ticks (from zero when asked). */
function range(values: number[], fromZero = false): [number, number] {
  const f = values.filter(Number.isFinite);
  let lo = f.length ? Math.min(...f) : 0;
  let hi = f.length ? Math.max(...f) : 1;
  if (fromZero) { lo = Math.min(0, lo); hi = Math.max(0, hi); }
  if (hi === lo) { const d = Math.abs(hi) * 0.1 || 1; lo = fromZero && lo === 0 ? 0 : lo - d; hi += d; }
  const t = niceTicks(lo, hi);
  const step = t.length > 1 ? t[1]! - t[0]! : (hi - lo) / 4;
  return [Math.min(lo, Math.floor(lo / step + 1e-9) * step), Math.max(hi, Math.ceil(hi / step - 1e-9) * step)];
}

/** A tick label in engineering notation with its unit. */
export function tickText(v: number, kind: AxisKind): string {
  if (kind === 'number') return String(Number(v.toPrecision(4)));
  if (v === 0) return kind === 'ratio' ? '0 %' : `0`;
  return formatQuantity(v, kind, 3);
}

/** Room a text takes at `size` px (an estimate: no font metrics outside the window). */
const textWidth = (s: string, size: number) => s.length * size * 0.56;

/** Shorten a name to `width` px with an ellipsis (the full name stays in the title). */
function fit(s: string, size: number, width: number): string {
  if (textWidth(s, size) <= width) return s;
  const n = Math.max(1, Math.floor(width / (size * 0.56)) - 1);
  return `${s.slice(0, n)}…`;
}

class Svg {
  parts: string[] = [];
  text(x: number, y: number, s: string, cls: string, size: number, opts: { anchor?: 'start' | 'middle' | 'end'; fill?: string; bold?: boolean; rotate?: boolean; title?: string } = {}): void {
    const a = opts.anchor && opts.anchor !== 'start' ? ` text-anchor="${opts.anchor}"` : '';
    const r = opts.rotate ? ` transform="rotate(-90 ${n2(x)} ${n2(y)})"` : '';
    const t = opts.title ? `<title>${escapeXml(opts.title)}</title>` : '';
    this.parts.push(`<text class="${cls}" x="${n2(x)}" y="${n2(y)}" font-size="${size}" fill="${opts.fill ?? INK}"${opts.bold ? ' font-weight="bold"' : ''}${a}${r}>${t}${escapeXml(s)}</text>`);
  }
  line(x1: number, y1: number, x2: number, y2: number, cls: string, stroke: string, width = 1, dash = ''): void {
    this.parts.push(`<line class="${cls}" x1="${n2(x1)}" y1="${n2(y1)}" x2="${n2(x2)}" y2="${n2(y2)}" stroke="${stroke}" stroke-width="${width}"${dash ? ` stroke-dasharray="${dash}"` : ''}/>`);
  }
  rect(x: number, y: number, w: number, h: number, cls: string, fill: string, extra = ''): void {
    this.parts.push(`<rect class="${cls}" x="${n2(x)}" y="${n2(y)}" width="${n2(Math.max(0, w))}" height="${n2(Math.max(0, h))}" fill="${fill}"${extra}/>`);
  }
  raw(s: string): void { this.parts.push(s); }
  doc(width: number, height: number, title: string, kind: string, body: string[] = this.parts): string {
    return [
      `<svg xmlns="http://www.w3.org/2000/svg" class="rw-plot" data-plot="${escapeXml(kind)}" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="${escapeXml(FONT)}" role="img" aria-label="${escapeXml(title)}">`,
      `<title>${escapeXml(title)}</title>`,
      `<rect class="pl-bg" x="0" y="0" width="${width}" height="${height}" fill="#ffffff"/>`,
      ...body,
      '</svg>',
    ].join('\n');
  }
}

function header(g: Svg, p: { title: string; subtitle: string }, width: number): void {
  g.text(16, 20, p.title, 'pl-title', 14, { bold: true });
  if (p.subtitle) g.text(16, 37, fit(p.subtitle, 11, width - 32), 'pl-sub', 11, { fill: SOFT, title: p.subtitle });
}

function legend(g: Svg, x: number, y: number, items: { name: string; k: number; marker?: boolean }[], width: number): void {
  items.forEach((it, i) => {
    const yy = y + i * 18;
    const c = SERIES[it.k % SERIES.length]!;
    g.raw(`<g class="pl-legend pl-s${it.k % SERIES.length}" data-legend="${escapeXml(it.name)}">`);
    if (it.marker) g.raw(`<circle class="pl-mark" cx="${n2(x + 11)}" cy="${n2(yy - 4)}" r="4" fill="#ffffff" stroke="${INK}" stroke-width="1.5"/>`);
    else g.line(x, yy - 4, x + 22, yy - 4, 'pl-line', c, 2.2, DASH[it.k % DASH.length]);
    g.text(x + 28, yy, fit(it.name, 11.5, width - 30), 'pl-legend-text', 11.5, { title: it.name });
    g.raw('</g>');
  });
}

/** Line plot: stacked panels over one x axis, a legend at the right. */
export function linePlotSvg(p: LinePlot, width = 680): string {
  const g = new Svg();
  const legendW = 170;
  const L = 72;
  const R = width - legendW - 12;
  const top = 52;
  const panelH = p.panels.length > 1 ? 150 : 220;
  const gap = 34;
  const height = top + p.panels.length * panelH + (p.panels.length - 1) * gap + 52;
  header(g, p, width);
  const xs = p.series.flatMap((s) => s.points.map((q) => q.x)).concat((p.markers ?? []).map((m) => m.x));
  const [x0, x1] = range(xs, p.x.fromZero);
  const X = (v: number) => L + ((v - x0) / (x1 - x0 || 1)) * (R - L);
  p.panels.forEach((ax, k) => {
    const py = top + k * (panelH + gap);
    const ys = p.series.flatMap((s) => s.points.map((q) => q.y[k]!)).concat((p.markers ?? []).map((m) => m.y[k]!));
    const [y0, y1] = range(ys, ax.fromZero);
    const Y = (v: number) => py + panelH - ((v - y0) / (y1 - y0 || 1)) * panelH;
    g.raw(`<g class="pl-panel" data-panel="${escapeXml(ax.label)}">`);
    for (const t of niceTicks(y0, y1, 4)) {
      if (t < y0 - 1e-12 || t > y1 + 1e-12) continue;
      g.line(L, Y(t), R, Y(t), 'pl-grid', GRID);
      g.text(L - 6, Y(t) + 3.5, tickText(t, ax.kind), 'pl-tick', 10.5, { anchor: 'end', fill: SOFT });
    }
    for (const t of niceTicks(x0, x1, 6)) {
      if (t < x0 - 1e-12 || t > x1 + 1e-12) continue;
      g.line(X(t), py, X(t), py + panelH, 'pl-grid', GRID);
      if (k === p.panels.length - 1) g.text(X(t), py + panelH + 15, tickText(t, p.x.kind), 'pl-tick', 10.5, { anchor: 'middle', fill: SOFT });
    }
    g.line(L, py + panelH, R, py + panelH, 'pl-axis', AXIS);
    g.line(L, py, L, py + panelH, 'pl-axis', AXIS);
    g.text(18, py + panelH / 2, ax.label, 'pl-axis-title', 11.5, { anchor: 'middle', rotate: true, fill: INK });
    p.series.forEach((s, si) => {
      const pts = s.points.filter((q) => Number.isFinite(q.x) && Number.isFinite(q.y[k]!));
      if (!pts.length) return;
      const c = SERIES[si % SERIES.length]!;
      const d = pts.map((q, i) => `${i ? 'L' : 'M'}${n2(X(q.x))} ${n2(Y(q.y[k]!))}`).join(' ');
      g.raw(`<path class="pl-line pl-s${si % SERIES.length}" data-series="${escapeXml(s.name)}" data-points="${pts.length}" d="${d}" fill="none" stroke="${c}" stroke-width="2.2"${DASH[si % DASH.length] ? ` stroke-dasharray="${DASH[si % DASH.length]}"` : ''}/>`);
    });
    for (const m of p.markers ?? []) {
      if (!Number.isFinite(m.y[k]!)) continue;
      g.raw(`<circle class="pl-mark" data-marker="${escapeXml(m.name)}" cx="${n2(X(m.x))}" cy="${n2(Y(m.y[k]!))}" r="4" fill="#ffffff" stroke="${INK}" stroke-width="1.5"><title>${escapeXml(`${m.name}: ${tickText(m.x, p.x.kind)}, ${tickText(m.y[k]!, ax.kind)}`)}</title></circle>`);
    }
    g.raw('</g>');
  });
  const bottom = top + p.panels.length * panelH + (p.panels.length - 1) * gap;
  g.text((L + R) / 2, bottom + 36, p.x.label, 'pl-axis-title', 11.5, { anchor: 'middle' });
  const items = p.series.map((s, k) => ({ name: s.name, k }));
  if (p.markers?.length) items.push({ name: 'operating point (roll-up)', k: 0, marker: true } as never);
  legend(g, R + 18, top + 12, items, legendW - 10);
  return g.doc(width, height, p.title, 'line');
}

/** Each rail's worst-case window against its band, as deviation from its nominal voltage. */
export function windowPlotSvg(p: WindowPlot, width = 680): string {
  const g = new Svg();
  const nameW = 210;
  const L = nameW + 24;
  const R = width - 24;
  const top = 72;
  const rowH = 40;
  const height = top + Math.max(1, p.rows.length) * rowH + 58;
  header(g, p, width);
  // Mode legend.
  let lx = 16;
  p.modes.forEach((m, k) => {
    g.raw(`<g class="pl-legend pl-s${(k + 1) % SERIES.length}" data-legend="${escapeXml(m)}">`);
    g.raw(`<path class="pl-modemark pl-s${(k + 1) % SERIES.length}" d="M${n2(lx + 5)} ${n2(52)} l5 8 h-10 z" fill="${SERIES[(k + 1) % SERIES.length]}"/>`);
    const label = fit(m, 11, 150);
    g.text(lx + 14, 60, label, 'pl-legend-text', 11, { title: m });
    g.raw('</g>');
    lx += 22 + textWidth(label, 11) + 14;
  });
  const dev = (v: number, r: WindowRow) => (v - r.target) / (Math.abs(r.target) || 1);
  const span = Math.max(0.01, ...p.rows.flatMap((r) => [r.bandMin, r.bandMax, r.min, r.max, ...r.marks.map((m) => m.v)].map((v) => Math.abs(dev(v, r))))) * 1.15;
  const [x0, x1] = range([-span, span]);
  const X = (d: number) => L + ((d - x0) / (x1 - x0)) * (R - L);
  const bottom = top + p.rows.length * rowH;
  for (const t of niceTicks(x0, x1, 6)) {
    if (t < x0 - 1e-12 || t > x1 + 1e-12) continue;
    g.line(X(t), top - 4, X(t), bottom, t === 0 ? 'pl-axis' : 'pl-grid', t === 0 ? AXIS : GRID);
    g.text(X(t), bottom + 15, t > 0 ? `+${tickText(t, 'ratio')}` : tickText(t, 'ratio'), 'pl-tick', 10.5, { anchor: 'middle', fill: SOFT });
  }
  g.line(L, bottom, R, bottom, 'pl-axis', AXIS);
  g.text((L + R) / 2, bottom + 36, 'deviation from the rail\'s nominal voltage (0 = nominal)', 'pl-axis-title', 11.5, { anchor: 'middle' });
  p.rows.forEach((r, i) => {
    const y = top + i * rowH;
    const mid = y + rowH / 2;
    g.raw(`<g class="pl-row${r.inside ? '' : ' pl-outside'}" data-rail="${escapeXml(r.name)}" data-inside="${r.inside}">`);
    g.text(16, mid - 3, fit(r.name, 12, nameW), 'pl-name', 12, { bold: true, title: r.name });
    const lo = Math.min(r.min, r.max);
    const hi = Math.max(r.min, r.max);
    g.text(16, mid + 12, `${formatQuantity(lo, 'voltage', 4)} … ${formatQuantity(hi, 'voltage', 4)}${r.inside ? '' : ' (outside)'}`, r.inside ? 'pl-note' : 'pl-note pl-bad', 10.5, { fill: r.inside ? SOFT : '#b42318', bold: !r.inside });
    const bl = X(Math.min(dev(r.bandMin, r), dev(r.bandMax, r)));
    const br = X(Math.max(dev(r.bandMin, r), dev(r.bandMax, r)));
    g.raw(`<rect class="pl-band" x="${n2(bl)}" y="${n2(mid - 11)}" width="${n2(Math.max(0, br - bl))}" height="22" fill="#b8dcd8"><title>${escapeXml(`band ${formatQuantity(r.bandMin, 'voltage', 4)} … ${formatQuantity(r.bandMax, 'voltage', 4)}`)}</title></rect>`);
    const wl = X(dev(lo, r));
    const wr = X(dev(hi, r));
    g.raw(`<rect class="pl-window${r.inside ? '' : ' pl-bad'}" x="${n2(wl)}" y="${n2(mid - 5)}" width="${n2(Math.max(1.5, wr - wl))}" height="10" fill="${r.inside ? '#0f5f59' : '#b42318'}"><title>${escapeXml(`worst-case window ${formatQuantity(lo, 'voltage', 4)} … ${formatQuantity(hi, 'voltage', 4)}`)}</title></rect>`);
    g.line(X(0), mid - 13, X(0), mid + 13, 'pl-nominal', INK, 2);
    r.marks.forEach((m) => {
      const k = p.modes.indexOf(m.mode);
      const c = SERIES[(k + 1) % SERIES.length]!;
      g.raw(`<path class="pl-modemark pl-s${(k + 1) % SERIES.length}" data-mode="${escapeXml(m.mode)}" d="M${n2(X(dev(m.v, r)))} ${n2(mid + 6)} l5 8 h-10 z" fill="${c}"><title>${escapeXml(`${m.mode}: ${formatQuantity(m.v, 'voltage', 4)}`)}</title></path>`);
    });
    g.raw('</g>');
  });
  return g.doc(width, height, p.title, 'windows');
}

/** Scatter of points with labels; highlighted points drawn larger and in the accent colour. */
export function scatterPlotSvg(p: ScatterPlot, width = 680): string {
  const g = new Svg();
  const L = 84;
  const R = width - 28;
  const top = 56;
  const H = 300;
  const height = top + H + 54;
  header(g, p, width);
  const [x0, x1] = range(p.points.map((q) => q.x), p.x.fromZero);
  const [y0, y1] = range(p.points.map((q) => q.y), p.y.fromZero);
  const X = (v: number) => L + ((v - x0) / (x1 - x0 || 1)) * (R - L);
  const Y = (v: number) => top + H - ((v - y0) / (y1 - y0 || 1)) * H;
  for (const t of niceTicks(y0, y1, 5)) {
    if (t < y0 - 1e-12 || t > y1 + 1e-12) continue;
    g.line(L, Y(t), R, Y(t), 'pl-grid', GRID);
    g.text(L - 6, Y(t) + 3.5, tickText(t, p.y.kind), 'pl-tick', 10.5, { anchor: 'end', fill: SOFT });
  }
  for (const t of niceTicks(x0, x1, 6)) {
    if (t < x0 - 1e-12 || t > x1 + 1e-12) continue;
    g.line(X(t), top, X(t), top + H, 'pl-grid', GRID);
    g.text(X(t), top + H + 15, tickText(t, p.x.kind), 'pl-tick', 10.5, { anchor: 'middle', fill: SOFT });
  }
  g.line(L, top + H, R, top + H, 'pl-axis', AXIS);
  g.line(L, top, L, top + H, 'pl-axis', AXIS);
  g.text((L + R) / 2, top + H + 38, p.x.label, 'pl-axis-title', 11.5, { anchor: 'middle' });
  g.text(18, top + H / 2, p.y.label, 'pl-axis-title', 11.5, { anchor: 'middle', rotate: true });
  // Highlighted points last, so they sit on top.
  for (const q of [...p.points].sort((a, b) => Number(a.highlight) - Number(b.highlight))) {
    const cls = q.highlight ? 'pl-point pl-hi' : 'pl-point';
    g.raw(`<g class="${cls}" data-point="${escapeXml(q.label)}" data-highlight="${q.highlight}">`);
    g.raw(`<circle cx="${n2(X(q.x))}" cy="${n2(Y(q.y))}" r="${q.highlight ? 8 : 5.5}" fill="${q.highlight ? '#b45309' : '#0f5f59'}" stroke="${INK}" stroke-width="${q.highlight ? 1.5 : 0.8}"><title>${escapeXml(`${q.label}: ${tickText(q.x, p.x.kind)}, ${tickText(q.y, p.y.kind)}`)}</title></circle>`);
    g.text(X(q.x) + 11, Y(q.y) - 7, q.highlight ? `${q.label} (shown)` : q.label, 'pl-point-label', 12, { bold: true });
    g.raw('</g>');
  }
  return g.doc(width, height, p.title, 'scatter');
}

export function plotSvg(p: PlotScene, width?: number): string {
  switch (p.type) {
    case 'line': return linePlotSvg(p, width);
    case 'windows': return windowPlotSvg(p, width);
    case 'scatter': return scatterPlotSvg(p, width);
  }
}
