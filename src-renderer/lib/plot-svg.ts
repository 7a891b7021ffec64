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
  points: Array<{ x: number; y: number }>;
  /** Marked point (the operating point), drawn as a ring. */
  mark?: { x: number; y: number };
}

export interface PlotSpec {
  title: string;
  xLabel: string;
  yLabel: string;
  /** Quantity of each axis for engineering notation ('ratio' prints as %). */
  xKind: QuantityKind | 'percent';
  yKind: QuantityKind | 'percent';
  series: PlotSeries[];
  width?: number;
  height?: number;
  /** Draw points only (a scatter) instead of lines. */
  scatter?: boolean;
  /** Index of the highlighted point of a scatter (series 0). */
  highlight?: number;
}

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

export function tickText(v: number, kind: QuantityKind | 'percent'): string {
  if (kind === 'percent') return `${(Math.round(v * 1000) / 10).toString()} %`;
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
  const xt = niceTicks(xs.length ? Math.min(...xs) : 0, xs.length ? Math.max(...xs) : 1, W < 420 ? 4 : 6);
  const yt = niceTicks(ys.length ? Math.min(...ys) : 0, ys.length ? Math.max(...ys) : 1);
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
      });
    } else {
      const d = s.points.map((p, i) => `${i ? 'L' : 'M'}${f(X(p.x))} ${f(Y(p.y))}`).join(' ');
      out.push(`<path d="${d}" fill="none" stroke="${c}" stroke-width="1.6"/>`);
    }
    if (s.mark) out.push(`<circle class="mark" cx="${f(X(s.mark.x))}" cy="${f(Y(s.mark.y))}" r="4" fill="none" stroke="var(--ink, #1f2933)" stroke-width="1.2"/>`);
    out.push('</g>');
    const ly = m.t + ph + 38 + 14 * k;
    out.push(`<g class="legend"><line x1="${m.l}" y1="${ly - 3}" x2="${m.l + 16}" y2="${ly - 3}" stroke="${c}" stroke-width="2"/><text x="${m.l + 20}" y="${ly}" fill="var(--ink, #1f2933)">${xmlEscape(s.label)}</text></g>`);
  });
  out.push('</svg>');
  return out.join('');
}
