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

/** Attributes whose value is user text (escaped by the builder), not a reference. */
const TEXT_ATTRIBUTES = new Set(['aria-label']);

/**
 * What in the markup a plot never holds, or null. User text (escaped by the builder, so it
 * holds no `<` and no `"`) sits in text nodes and in text attributes, and is not searched:
 * a rail named "onload=x" or "url(x)" is no reason to refuse.
 */
function forbidden(t: string): string | null {
  if (t.includes('<!')) return 'a DOCTYPE, entity declaration or CDATA section';
  if (t.includes('<?')) return 'a processing instruction';
  const tags = /<\/?([A-Za-z][\w:.-]*)([^>]*)>/g;
  let m: RegExpExecArray | null;
  while ((m = tags.exec(t)) !== null) {
    const name = m[1]!.toLowerCase();
    if (name === 'script') return 'a script element';
    if (name === 'foreignobject' || name.includes(':')) return 'foreign content';
    const attrs = m[2]!;
    const attr = /([\w:.-]+)\s*=\s*"([^"]*)"/g;
    let a: RegExpExecArray | null;
    let rest = attrs;
    while ((a = attr.exec(attrs)) !== null) {
      rest = rest.replace(a[0], '');
      const key = a[1]!.toLowerCase();
      if (key.startsWith('on')) return 'an event attribute';
      if (key === 'href' || key.endsWith(':href')) return 'a link';
      if (TEXT_ATTRIBUTES.has(key) || key.startsWith('data-')) continue;
      if (/javascript:/i.test(a[2]!)) return 'a script address';
      if (/url\s*\(\s*(?!#)/i.test(a[2]!)) return 'an external reference (only a reference inside the drawing, url(#…), is allowed)';
    }
    if (!/^[\s/]*$/.test(rest)) return 'an attribute without a quoted value';
  }
  // Everything outside the tags is text: it may hold no markup of its own.
  if (t.replace(tags, '').includes('<')) return 'markup that is not a well-formed tag';
  return null;
}

export function plotSvgFile(svg: string): string {
  if (typeof svg !== 'string' || svg.length === 0) throw new PlotFileError('svg: give the plot markup to save');
  if (svg.length > PLOT_SVG_MAX) throw new PlotFileError(`svg: the plot markup is ${svg.length} characters, above the ${PLOT_SVG_MAX} allowed`);
  const t = svg.trim();
  if (!t.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')) throw new PlotFileError('svg: not a plot drawing (it must be one <svg> element in the SVG namespace)');
  if (!t.endsWith('</svg>') || t.indexOf('<svg', 1) !== -1) throw new PlotFileError('svg: not a plot drawing (one <svg> element, closed at the end)');
  const what = forbidden(t);
  if (what) throw new PlotFileError(`svg: the plot markup holds ${what}, which a plot never does; nothing was written`);
  const colours = t.replace(/var\(--[\w-]+,\s*(#[0-9a-fA-F]{3,8})\)/g, '$1');
  if (/var\(/.test(colours)) throw new PlotFileError('svg: a colour without a fallback value');
  return `<?xml version="1.0" encoding="UTF-8"?>\n${colours}\n`;
}
