/**
 * A plot the window drew (src-renderer/lib/plot-svg.ts, the one plot SVG builder) as a file
 * of its own. The markup comes over the contract, so it is checked before it is written: one
 * <svg> element in the SVG namespace, no script, no event attribute, no link, no embedded
 * foreign content, no DOCTYPE or entity declaration, no processing instruction. The window's
 * theme colours (`var(--name, #hex)`) become their fallback colour so the file reads the same
 * in any viewer. Pure: text in, text out.
 */
export class PlotFileError extends RangeError {}

/** Largest accepted plot markup (a plot of a few hundred points is some tens of kB). */
export const PLOT_SVG_MAX = 2_000_000;

const FORBIDDEN: Array<[RegExp, string]> = [
  [/<\s*script/i, 'a script element'],
  [/<\s*foreignObject/i, 'foreign content'],
  [/<!/, 'a DOCTYPE, entity declaration or CDATA section'],
  [/<\?/, 'a processing instruction'],
  [/\son[a-z]+\s*=/i, 'an event attribute'],
  [/\bhref\s*=/i, 'a link'],
  [/javascript:/i, 'a script address'],
  [/url\s*\(\s*(?!#)/i, 'an external reference (only a reference inside the drawing, url(#…), is allowed)'],
];

export function plotSvgFile(svg: string): string {
  if (typeof svg !== 'string' || svg.length === 0) throw new PlotFileError('svg: give the plot markup to save');
  if (svg.length > PLOT_SVG_MAX) throw new PlotFileError(`svg: the plot markup is ${svg.length} characters, above the ${PLOT_SVG_MAX} allowed`);
  const t = svg.trim();
  if (!t.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')) throw new PlotFileError('svg: not a plot drawing (it must be one <svg> element in the SVG namespace)');
  if (!t.endsWith('</svg>') || t.indexOf('<svg', 1) !== -1) throw new PlotFileError('svg: not a plot drawing (one <svg> element, closed at the end)');
  for (const [re, what] of FORBIDDEN) if (re.test(t)) throw new PlotFileError(`svg: the plot markup holds ${what}, which a plot never does; nothing was written`);
  const colours = t.replace(/var\(--[\w-]+,\s*(#[0-9a-fA-F]{3,8})\)/g, '$1');
  if (/var\(/.test(colours)) throw new PlotFileError('svg: a colour without a fallback value');
  return `<?xml version="1.0" encoding="UTF-8"?>\n${colours}\n`;
}
