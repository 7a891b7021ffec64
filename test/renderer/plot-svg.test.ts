// The plot SVG parses with an independent XML parser (fast-xml-parser) and escapes user text.
import { describe, expect, it } from 'vitest';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { deviation, niceTicks, plotSvg, windowChartSvg } from '../../src-renderer/lib/plot-svg.ts';

const hostile = '<x>&"';
const svg = plotSvg({
  title: `Efficiency vs load — ${hostile}`, xLabel: 'Output current', yLabel: 'Efficiency', xKind: 'current', yKind: 'percent',
  series: [
    { label: `Vin min ${hostile}`, points: [{ x: 0.01, y: 0.7 }, { x: 0.1, y: 0.88 }, { x: 0.2, y: 0.9 }], mark: { x: 0.1, y: 0.88 } },
    { label: 'Vin max', points: [{ x: 0.01, y: 0.65 }, { x: 0.2, y: 0.86 }] },
  ],
});

describe('plot SVG', () => {
  it('is well-formed XML with one path per series and a legend entry each', () => {
    expect(XMLValidator.validate(svg)).toBe(true);
    const doc = new XMLParser({ ignoreAttributes: false }).parse(svg);
    expect(doc.svg).toBeDefined();
    expect((svg.match(/<path /g) ?? []).length).toBe(2);
    expect((svg.match(/class="legend"/g) ?? []).length).toBe(2);
  });
  it('escapes a hostile name in the title and the legend', () => {
    expect(svg).not.toContain(hostile);
    expect(svg).toContain('&lt;x&gt;&amp;&quot;');
    const doc = new XMLParser({ ignoreAttributes: false }).parse(svg);
    // Decoded by the parser, the title is the original text again, and no <x> element appeared.
    expect(String(doc.svg.title)).toBe(`Efficiency vs load — ${hostile}`);
    expect(JSON.stringify(doc)).not.toMatch(/"x":\{/);
  });
  it('ticks in engineering notation with units', () => {
    expect(svg).toMatch(/mA</);
    expect(svg).toMatch(/ %</);
  });
  it('nice ticks cover the range in 1-2-5 steps (common practice)', () => {
    const t = niceTicks(0.013, 0.87);
    expect(t[0]!).toBeLessThanOrEqual(0.013);
    expect(t[t.length - 1]!).toBeGreaterThanOrEqual(0.87);
    const step = t[1]! - t[0]!;
    expect([0.1, 0.2, 0.5].some((s) => Math.abs(s - step) < 1e-12)).toBe(true);
  });
});

describe('rail window chart SVG', () => {
  const chart = windowChartSvg({
    title: `Windows — ${hostile}`,
    barLabels: ['all modes', `mode ${hostile}`],
    rows: [
      { name: `3V3 ${hostile}`, target: 3.3, bandMin: 3.201, bandMax: 3.399, bars: [
        { label: 'all modes', min: 3.25, max: 3.36, inside: true, proved: false },
        { label: `mode ${hostile}`, min: 3.26, max: 3.35, inside: true, proved: true },
      ] },
      { name: '-12V', target: -12, bandMin: -12.6, bandMax: -11.4, bars: [
        { label: 'all modes', min: -12.9, max: -11.8, inside: false, proved: true },
        { label: 'mode x', min: -12.2, max: -11.8, inside: true, proved: true },
      ] },
    ],
  });
  it('is well-formed XML (fast-xml-parser) with a row per rail, a bar per window, a band each', () => {
    expect(XMLValidator.validate(chart)).toBe(true);
    expect((chart.match(/<g class="rail"/g) ?? []).length).toBe(2);
    expect((chart.match(/<rect class="window/g) ?? []).length).toBe(4);
    expect((chart.match(/<rect class="band"/g) ?? []).length).toBe(2);
    // Legend: the two bar names, the band and "not proved".
    expect((chart.match(/class="legend"/g) ?? []).length).toBe(4);
  });
  it('escapes user text (rail names, mode names) and marks unproved and outside windows', () => {
    expect(chart).not.toContain(hostile);
    const doc = new XMLParser({ ignoreAttributes: false }).parse(chart);
    expect(String(doc.svg.title)).toBe(`Windows — ${hostile}`);
    expect((chart.match(/class="window unproved"/g) ?? []).length).toBe(1);
    expect((chart.match(/class="window outside"/g) ?? []).length).toBe(1);
  });
  it('places windows by deviation from nominal: a −12 V rail reads as % of its magnitude (common practice)', () => {
    expect(deviation(-12.6, -12)).toBeCloseTo(-0.05, 12);
    expect(deviation(3.399, 3.3)).toBeCloseTo(0.03, 12);
    expect(chart).toMatch(/\+\d+(\.\d+)? %</);
  });
  it('a scatter labels its points (escaped) and a cost axis gets no negative ticks', () => {
    const sc = plotSvg({ title: 'Loss versus cost', xLabel: 'Estimated cost', yLabel: 'Loss', xKind: 'number', yKind: 'power', scatter: true, highlight: 0,
      series: [{ label: 'alternatives', points: [{ x: 0, y: 1.4, label: hostile }] }] });
    expect(XMLValidator.validate(sc)).toBe(true);
    expect(sc).toContain('&lt;x&gt;&amp;&quot;');
    expect(sc).not.toMatch(/>-\d/);
  });
});
