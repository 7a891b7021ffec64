/**
 * Line plots as SVG text (pure: no DOM). Axes with "nice" ticks in engineering notation and
 * units, a legend, colours from the window's CSS variables (--ink, --ink-soft, --line-soft, --panel,
 * --accent, --plot-2…--plot-4, with fallbacks so a saved file reads on its own). Every piece of user
 * text (stage and rail names, series labels) is XML-escaped.
 */
import { formatQuantity } from '../../src-main/api/window-shared.ts';
import type { QuantityKind } from '../../src-main/api/contract.ts';

export interface PlotSeries {
  label: string;
  /** `label`: a short tag drawn beside the point of a scatter (escaped). */
  points: Array<{ x: number; y: number; label?: string }>;
  /** Marked point (the operating point), drawn as a ring. */
  mark?: { x: number; y: number };
}

export interface PlotSpec {
  title: string;
  xLabel: string;
  yLabel: string;
  /** Quantity of each axis for engineering notation ('percent' prints as %, 'number' plain). */
  xKind: AxisKind;
  yKind: AxisKind;
  series: PlotSeries[];
  width?: number;
  height?: number;
  /** Draw points only (a scatter) instead of lines. */
  scatter?: boolean;
  /** Index of the highlighted point of a scatter (series 0). */
  highlight?: number;
}

export type AxisKind = QuantityKind | 'percent' | 'number';

/** XML text/attribute escape (common practice: the five predefined entities). */
export function xmlEscape(s: string): string {
  return String(s).replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;' })[c]!)
    // Control characters are not allowed in XML 1.0 text: drop them.
    // eslint-disable-next-line no-control-regex
    .replace(/[\u0000-\u0008\u000B\u000C\u000E-\u001F]/g, '');
}

/** Ticks at 1, 2, 5 × 10^n steps covering [lo, hi] (common practice for chart axes). */
export function niceTicks(lo: number, hi: number, target = 5): number[] {
  if (!(Number.isFinite(lo) && Number.isFinite(hi))) return [0, 1];
  if (hi <= lo) { const d = Math.abs(lo) * 0.1 || 1; lo -= d; hi += d; }
  const raw = (hi - lo) / target;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const start = Math.floor(lo / step + 1e-9) * step;
  const ticks: number[] = [];
  for (let v = start; v <= hi + step * 0.5 && ticks.length < 50; v += step) ticks.push(Math.round(v / step) * step);
  if (ticks[ticks.length - 1]! < hi - 1e-12 * Math.abs(hi)) ticks.push(ticks[ticks.length - 1]! + step);
  return ticks;
}

/** Data that are all ≥ 0 (a cost, a current) get no negative ticks (the axis starts at 0). */
function nonNegative(ticks: number[], data: number[]): number[] {
  if (!data.length || Math.min(...data) < 0 || ticks[0]! >= 0) return ticks;
  const kept = ticks.filter((t) => t >= 0);
  return kept[0] === 0 ? (kept.length >= 2 ? kept : [0, ticks[ticks.length - 1]!]) : [0, ...kept];
}

export function tickText(v: number, kind: AxisKind): string {
  if (kind === 'percent') return `${(Math.round(v * 1000) / 10).toString()} %`;
  if (kind === 'number') return String(Number(v.toPrecision(4)));
  if (v === 0) return formatQuantity(0, kind, 3);
  return formatQuantity(v, kind, 3);
}

const COLOURS = ['var(--accent, #0f5f59)', 'var(--plot-2, #d0722f)', 'var(--plot-3, #2f6fd0)', 'var(--plot-4, #9b4fc0)'];

export function plotSvg(spec: PlotSpec): string {
  const W = spec.width ?? 340;
  const H = spec.height ?? 230;
  const series = spec.series.filter((s) => s.points.length > 0);
  const legendRows = series.length;
  const m = { l: 62, r: 22, t: 22, b: 34 + 14 * legendRows };
  const xs = series.flatMap((s) => s.points.map((p) => p.x)).filter(Number.isFinite);
  const ys = series.flatMap((s) => s.points.map((p) => p.y)).filter(Number.isFinite);
  const xt = nonNegative(niceTicks(xs.length ? Math.min(...xs) : 0, xs.length ? Math.max(...xs) : 1, W < 420 ? 4 : 6), xs);
  const yt = nonNegative(niceTicks(ys.length ? Math.min(...ys) : 0, ys.length ? Math.max(...ys) : 1), ys);
  const x0 = xt[0]!, x1 = xt[xt.length - 1]!, y0 = yt[0]!, y1 = yt[yt.length - 1]!;
  const pw = W - m.l - m.r, ph = H - m.t - m.b;
  const X = (v: number) => m.l + ((v - x0) / (x1 - x0 || 1)) * pw;
  const Y = (v: number) => m.t + ph - ((v - y0) / (y1 - y0 || 1)) * ph;
  const f = (v: number) => v.toFixed(1);
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" font-family="system-ui, sans-serif" font-size="10" role="img" aria-label="${xmlEscape(spec.title)}">`);
  out.push(`<title>${xmlEscape(spec.title)}</title>`);
  out.push(`<rect x="0" y="0" width="${W}" height="${H}" fill="var(--panel, #ffffff)"/>`);
  out.push(`<text x="${m.l}" y="13" font-size="11" font-weight="600" fill="var(--ink, #1f2933)">${xmlEscape(spec.title)}</text>`);
  out.push('<g class="grid">');
  for (const t of xt) out.push(`<line x1="${f(X(t))}" y1="${m.t}" x2="${f(X(t))}" y2="${m.t + ph}" stroke="var(--line-soft, #e4e7eb)" stroke-width="0.5"/>`);
  for (const t of yt) out.push(`<line x1="${m.l}" y1="${f(Y(t))}" x2="${m.l + pw}" y2="${f(Y(t))}" stroke="var(--line-soft, #e4e7eb)" stroke-width="0.5"/>`);
  out.push('</g>');
  out.push(`<rect x="${m.l}" y="${m.t}" width="${pw}" height="${ph}" fill="none" stroke="var(--ink-soft, #616e7c)" stroke-width="0.8"/>`);
  out.push('<g class="ticks" fill="var(--ink, #1f2933)">');
  for (const t of xt) out.push(`<text x="${f(X(t))}" y="${m.t + ph + 12}" text-anchor="middle">${xmlEscape(tickText(t, spec.xKind))}</text>`);
  for (const t of yt) out.push(`<text x="${m.l - 4}" y="${f(Y(t) + 3)}" text-anchor="end">${xmlEscape(tickText(t, spec.yKind))}</text>`);
  out.push('</g>');
  out.push(`<text x="${m.l + pw / 2}" y="${m.t + ph + 25}" text-anchor="middle" fill="var(--ink-soft, #616e7c)">${xmlEscape(spec.xLabel)}</text>`);
  out.push(`<text transform="translate(10 ${m.t + ph / 2}) rotate(-90)" text-anchor="middle" fill="var(--ink-soft, #616e7c)">${xmlEscape(spec.yLabel)}</text>`);
  series.forEach((s, k) => {
    const c = COLOURS[k % COLOURS.length]!;
    out.push(`<g class="series" data-series="${k}">`);
    if (spec.scatter) {
      s.points.forEach((p, i) => {
        const hi = spec.highlight === i && k === 0;
        out.push(`<circle cx="${f(X(p.x))}" cy="${f(Y(p.y))}" r="${hi ? 5 : 3.2}" fill="${hi ? c : 'none'}" stroke="${c}" stroke-width="${hi ? 2 : 1.2}"/>`);
        if (p.label) out.push(`<text class="point-label" x="${f(X(p.x) + 7)}" y="${f(Y(p.y) - 5)}" fill="var(--ink, #1f2933)">${xmlEscape(p.label)}</text>`);
      });
    } else {
      const d = s.points.map((p, i) => `${i ? 'L' : 'M'}${f(X(p.x))} ${f(Y(p.y))}`).join(' ');
      out.push(`<path d="${d}" fill="none" stroke="${c}" stroke-width="1.6"/>`);
    }
    if (s.mark) out.push(`<circle class="mark" cx="${f(X(s.mark.x))}" cy="${f(Y(s.mark.y))}" r="4" fill="none" stroke="var(--ink, #1f2933)" stroke-width="1.2"/>`);
    out.push('</g>');
    const ly = m.t + ph + 38 + 14 * k;
    const swatch = spec.scatter ? `<circle cx="${m.l + 8}" cy="${ly - 3}" r="3.2" fill="none" stroke="${c}" stroke-width="1.2"/>` : `<line x1="${m.l}" y1="${ly - 3}" x2="${m.l + 16}" y2="${ly - 3}" stroke="${c}" stroke-width="2"/>`;
    out.push(`<g class="legend">${swatch}<text x="${m.l + 20}" y="${ly}" fill="var(--ink, #1f2933)">${xmlEscape(s.label)}</text></g>`);
  });
  out.push('</svg>');
  return out.join('');
}

/** One rail of a window chart: its band and a window per operating mode (and over all modes). */
export interface WindowRow {
  name: string;
  target: number;
  bandMin: number;
  bandMax: number;
  /** Bars top to bottom; `proved`: every corner evaluated (drawn solid, else hatched). */
  bars: Array<{ label: string; min: number; max: number; inside: boolean; proved: boolean }>;
}

export interface WindowChartSpec {
  title: string;
  /** Names of the bars in each row (the legend), in the rows' order. */
  barLabels: string[];
  rows: WindowRow[];
  width?: number;
}

/** Deviation from the rail's nominal voltage as a fraction of its magnitude. */
export const deviation = (v: number, target: number): number => (v - target) / (Math.abs(target) || 1);

/**
 * Rail windows against their bands, one row per rail on a common axis: deviation from the
 * nominal voltage in %. The band is the shaded span; each bar a worst-case window, solid
 * where proved, hatched where not every corner was evaluated; a window outside its band is
 * outlined in the error colour. Values come only from the rows given (nothing is invented).
 */
export function windowChartSvg(spec: WindowChartSpec): string {
  const W = spec.width ?? 640;
  const nb = Math.max(1, spec.barLabels.length);
  const barH = 5, gap = 2;
  const rowH = nb * (barH + gap) + 10;
  // Room for the longest label ("name 3.3 V", the name cut at NAME_MAX), ~5.8 px a character at 10 px.
  const NAME_MAX = 26;
  const labelLen = (r: WindowRow) => Math.min(NAME_MAX, r.name.length) + 1 + tickText(r.target, 'voltage').length;
  const nameW = Math.min(14 + 5.8 * (NAME_MAX + 8), 14 + 5.8 * Math.max(8, ...spec.rows.map(labelLen)));
  const legendRows = Math.ceil((spec.barLabels.length + 2) / 2);
  const m = { l: nameW, r: 22, t: 24, b: 36 + 14 * legendRows };
  const ph = Math.max(rowH, rowH * spec.rows.length);
  const H = m.t + ph + m.b;
  const pw = W - m.l - m.r;
  const devs = spec.rows.flatMap((r) => [deviation(r.bandMin, r.target), deviation(r.bandMax, r.target), ...r.bars.flatMap((b) => [deviation(b.min, r.target), deviation(b.max, r.target)])]).filter(Number.isFinite);
  const xt = niceTicks(devs.length ? Math.min(...devs) : -0.05, devs.length ? Math.max(...devs) : 0.05, W < 420 ? 4 : 6);
  const x0 = xt[0]!, x1 = xt[xt.length - 1]!;
  const X = (v: number) => m.l + ((v - x0) / (x1 - x0 || 1)) * pw;
  const f = (v: number) => v.toFixed(1);
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${f(H)}" width="${W}" height="${f(H)}" font-family="system-ui, sans-serif" font-size="10" role="img" aria-label="${xmlEscape(spec.title)}">`);
  out.push(`<title>${xmlEscape(spec.title)}</title>`);
  out.push('<defs><pattern id="unproved" width="4" height="4" patternUnits="userSpaceOnUse" patternTransform="rotate(45)"><rect width="4" height="4" fill="var(--panel, #ffffff)"/><line x1="0" y1="0" x2="0" y2="4" stroke="var(--ink-soft, #616e7c)" stroke-width="2"/></pattern></defs>');
  out.push(`<rect x="0" y="0" width="${W}" height="${f(H)}" fill="var(--panel, #ffffff)"/>`);
  out.push(`<text x="8" y="14" font-size="11" font-weight="600" fill="var(--ink, #1f2933)">${xmlEscape(spec.title)}</text>`);
  out.push('<g class="grid">');
  for (const t of xt) out.push(`<line x1="${f(X(t))}" y1="${m.t}" x2="${f(X(t))}" y2="${f(m.t + ph)}" stroke="var(--line-soft, #e4e7eb)" stroke-width="${t === 0 ? 1 : 0.5}"/>`);
  out.push('</g>');
  spec.rows.forEach((r, k) => {
    const y = m.t + k * rowH;
    const a = deviation(r.bandMin, r.target), b = deviation(r.bandMax, r.target);
    const name = r.name.length > NAME_MAX ? `${r.name.slice(0, NAME_MAX - 1)}…` : r.name;
    out.push(`<g class="rail" data-rail="${k}">`);
    if (k % 2) out.push(`<rect x="0" y="${f(y)}" width="${W}" height="${rowH}" fill="var(--head, #f0f3f6)" opacity="0.5"/>`);
    out.push(`<rect class="band" x="${f(X(Math.min(a, b)))}" y="${f(y + 3)}" width="${f(Math.abs(X(b) - X(a)))}" height="${rowH - 6}" fill="var(--accent-soft, #b8dcd8)" opacity="0.55"/>`);
    out.push(`<text x="${m.l - 6}" y="${f(y + rowH / 2 + 3.5)}" text-anchor="end" fill="var(--ink, #1f2933)">${xmlEscape(name)} <tspan fill="var(--ink-soft, #616e7c)">${xmlEscape(tickText(r.target, 'voltage'))}</tspan></text>`);
    r.bars.forEach((bar, j) => {
      const by = y + 5 + j * (barH + gap);
      const lo = deviation(Math.min(bar.min, bar.max), r.target), hi = deviation(Math.max(bar.min, bar.max), r.target);
      const c = WINDOW_COLOURS[j % WINDOW_COLOURS.length]!;
      const x = X(Math.min(lo, hi)), w = Math.max(1.5, Math.abs(X(hi) - X(lo)));
      out.push(`<rect class="window${bar.proved ? '' : ' unproved'}${bar.inside ? '' : ' outside'}" data-bar="${j}" x="${f(x)}" y="${f(by)}" width="${f(w)}" height="${barH}" fill="${bar.proved ? c : 'url(#unproved)'}" stroke="${bar.inside ? c : 'var(--bad, #b42318)'}" stroke-width="${bar.inside ? 0.8 : 1.6}"><title>${xmlEscape(`${r.name}, ${bar.label}: ${tickText(bar.min, 'voltage')} … ${tickText(bar.max, 'voltage')}${bar.proved ? '' : ' (not proved)'}${bar.inside ? '' : ' (outside the band)'}`)}</title></rect>`);
    });
    out.push('</g>');
  });
  out.push(`<rect x="${m.l}" y="${m.t}" width="${pw}" height="${f(ph)}" fill="none" stroke="var(--ink-soft, #616e7c)" stroke-width="0.8"/>`);
  out.push('<g class="ticks" fill="var(--ink, #1f2933)">');
  for (const t of xt) out.push(`<text x="${f(X(t))}" y="${f(m.t + ph + 12)}" text-anchor="middle">${xmlEscape(`${t > 0 ? '+' : ''}${tickText(t, 'percent')}`)}</text>`);
  out.push('</g>');
  out.push(`<text x="${f(m.l + pw / 2)}" y="${f(m.t + ph + 25)}" text-anchor="middle" fill="var(--ink-soft, #616e7c)">Deviation from the rail's nominal voltage</text>`);
  const legend: Array<{ label: string; swatch: string }> = [
    ...spec.barLabels.map((l, j) => ({ label: l, swatch: `fill="${WINDOW_COLOURS[j % WINDOW_COLOURS.length]}"` })),
    { label: 'tolerance band', swatch: 'fill="var(--accent-soft, #b8dcd8)"' },
    { label: 'not proved (not every corner evaluated)', swatch: 'fill="url(#unproved)" stroke="var(--ink-soft, #616e7c)" stroke-width="0.5"' },
  ];
  const colW = (W - 16) / 2;
  legend.forEach((e, k) => {
    const lx = 8 + (k % 2) * colW, ly = m.t + ph + 40 + 14 * Math.floor(k / 2);
    out.push(`<g class="legend"><rect x="${f(lx)}" y="${f(ly - 8)}" width="16" height="8" ${e.swatch}/><text x="${f(lx + 20)}" y="${f(ly)}" fill="var(--ink, #1f2933)">${xmlEscape(e.label)}</text></g>`);
  });
  out.push('</svg>');
  return out.join('');
}

/** Bar colours of a window chart: over all modes in ink, then one per mode. */
const WINDOW_COLOURS = ['var(--ink-soft, #616e7c)', ...COLOURS];
