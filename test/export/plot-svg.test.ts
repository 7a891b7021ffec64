// The plot SVG builder: each kind is well-formed XML read back by an independent parser
// (fast-xml-parser, from npm), user text is escaped (a rail named like markup stays text),
// ticks are in engineering notation with units, and no inline style is written (the
// window's content security policy allows none).
import { describe, expect, it } from 'vitest';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { linePlotSvg, niceTicks, scatterPlotSvg, tickText, windowPlotSvg } from '../../src-main/export/plot-svg.ts';

const evil = 'Rail <b>&"x"</b> \u202E';
const parser = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '@' });

function texts(svg: string): string[] {
  const out: string[] = [];
  const walk = (n: unknown) => {
    if (Array.isArray(n)) n.forEach(walk);
    else if (n && typeof n === 'object') for (const [k, v] of Object.entries(n)) {
      if (k === 'text') (Array.isArray(v) ? v : [v]).forEach((t) => out.push(typeof t === 'object' ? String((t as Record<string, unknown>)['#text'] ?? '') : String(t)));
      walk(v);
    }
  };
  walk(parser.parse(svg));
  return out;
}

describe('plot SVG builder', () => {
  const line = linePlotSvg({
    type: 'line', title: `${evil}: efficiency`, subtitle: 'sub',
    x: { label: 'load current', kind: 'current', fromZero: true },
    panels: [{ label: 'efficiency', kind: 'ratio' }, { label: 'loss', kind: 'power', fromZero: true }],
    series: [{ name: evil, points: [0.1, 0.5, 1].map((x) => ({ x, y: [0.8 + x / 10, x / 5] })) }, { name: 'V max', points: [{ x: 0.1, y: [0.7, 0.05] }, { x: 1, y: [0.85, 0.3] }] }],
    markers: [{ name: 'mode', x: 1, y: [0.9, 0.2] }],
  });
  const win = windowPlotSvg({ type: 'windows', title: 't', subtitle: 's', modes: ['run', evil], rows: [
    { name: evil, target: 3.3, bandMin: 3.135, bandMax: 3.465, min: 3.25, max: 3.34, inside: true, marks: [{ mode: 'run', v: 3.3 }, { mode: evil, v: 3.31 }] },
    { name: 'neg', target: -5, bandMin: -5.25, bandMax: -4.75, min: -5.4, max: -5.0, inside: false, marks: [] },
  ] });
  const sc = scatterPlotSvg({ type: 'scatter', title: 't', subtitle: '', x: { label: 'cost', kind: 'number' }, y: { label: 'loss', kind: 'power' },
    points: [{ label: 'Tree A', x: 4.2, y: 0.6, highlight: true }, { label: evil, x: 3.1, y: 0.9, highlight: false }] });

  it('writes well-formed SVG of each kind', () => {
    for (const svg of [line, win, sc]) {
      expect(XMLValidator.validate(svg)).toBe(true);
      const doc = parser.parse(svg) as { svg: Record<string, string> };
      expect(doc.svg['@xmlns']).toBe('http://www.w3.org/2000/svg');
      expect(svg).not.toMatch(/style=|<style/);
    }
  });

  it('escapes user text: markup in a name stays text, bidi controls are shown', () => {
    for (const svg of [line, win, sc]) {
      expect(svg).not.toContain('<b>');
      expect(svg).not.toContain('\u202E');
      const t = texts(svg).join('\n');
      expect(t).toContain('Rail <b>&"x"</b>');
    }
    const doc = parser.parse(line) as { svg: { g: Array<{ path?: { '@data-series': string } | Array<{ '@data-series': string }> }> } };
    const series = doc.svg.g.flatMap((g) => (g.path ? (Array.isArray(g.path) ? g.path : [g.path]) : [])).map((p) => p['@data-series']);
    expect(series).toContain('Rail <b>&"x"</b> \\u{202E}');
  });

  it('ticks: 1-2-5 steps in engineering notation with units', () => {
    expect(niceTicks(0, 1, 5)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(niceTicks(0.013, 0.047, 4)).toEqual([0.02, 0.03, 0.04]);
    expect(tickText(0.25, 'current')).toBe('250 mA');
    expect(tickText(0.85, 'ratio')).toBe('85 %');
    expect(tickText(1500, 'power')).toBe('1.5 kW');
    const t = texts(line);
    expect(t).toContain('200 mA');
    expect(t.some((x) => / %$/.test(x))).toBe(true);
    expect(t.some((x) => / mW$/.test(x))).toBe(true);
  });

  it('the window chart marks a rail outside its band', () => {
    expect(win).toMatch(/data-rail="neg" data-inside="false"/);
    expect(texts(win).some((x) => x.includes('(outside)'))).toBe(true);
    expect(sc).toMatch(/data-point="Tree A" data-highlight="true"/);
  });
});
