// The plot SVG parses with an independent XML parser (fast-xml-parser) and escapes user text.
import { describe, expect, it } from 'vitest';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { niceTicks, plotSvg } from '../../src-renderer/lib/plot-svg.ts';

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
